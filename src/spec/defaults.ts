/**
 * Defaults of spec keys that analysis/ also reads. They live here because spec/ (the schema's
 * documentation and the validation rules) cannot import analysis/; src/analysis/constants.ts
 * re-exports them, so every default of the analysis still has one home to look in.
 */

/** Effective cells per side of the basin map: fine enough to draw a smooth basin boundary on a page. */
export const DEFAULT_BASIN_RESOLUTION = 1024;
/** Cells per side of the basin map's first uniform pass: sets the smallest basin guaranteed to be seen. */
export const DEFAULT_BASIN_COARSE = 64;
/** A claimed point is near a computed one within this fraction of the window in each state (common practice: 2 %). */
export const DEFAULT_CLAIM_NEAR = 0.02;
/** condition-decides claims: parameter points sampled across the ranges. */
export const DEFAULT_CLAIM_CONDITION_SAMPLES = 64;

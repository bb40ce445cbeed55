/**
 * The methods section, written from the named constants of analysis/ and the settings the run
 * recorded in results.json, so the prose cannot drift from the code.
 */
import {
  CAPTURE_SAFETY,
  CLASSIFY_REL_TOL,
  CONDITION_MARGIN_TOL,
  DEDUP_REL_TOL,
  DEFAULT_CLAIM_CONDITION_SAMPLES,
  DEFAULT_CLAIM_NEAR,
  LOCATE_TOL,
  MANIFOLD_OFFSET,
  MAP_RESOLUTION,
  OUTCOME_GRID_SIZE,
  OUTCOME_SAMPLES,
  ROOT_RESIDUAL_TOL,
  SHOOT_RELATIVE_TOL,
  SHOOT_RESIDUAL_TOL,
  SLOW_ARRIVAL_DISTANCE,
  SWITCH_LOCATE_TOL,
  SYMBOLIC_MATCH_TOL,
} from "../../analysis/constants.js";
import { formatNumber } from "../format.js";

/** "64 × 64", kept on one line. */
export const gridSize = (n: number) => `${n}\u00a0×\u00a0${n}`;
const percent = (fraction: number) => `${formatNumber(100 * fraction)}%`;

interface RecordedSettings {
  equilibria?: { gridSize?: number; edgeSamples?: number };
  trajectories?: { integrator?: string; relativeTolerance?: number; absoluteToleranceOfWindow?: number };
  basins?: {
    resolution?: number;
    coarse?: number;
    integrator?: string;
    relativeTolerance?: number;
    absoluteToleranceOfWindow?: number;
    horizon?: number;
  };
}

function equilibriumMethod(s: RecordedSettings): string {
  const grid =
    s.equilibria?.gridSize !== undefined
      ? `a ${gridSize(s.equilibria.gridSize)} grid and its cell centres`
      : "a grid and its cell centres";
  const edges =
    s.equilibria?.edgeSamples !== undefined ? `, sampled at ${s.equilibria.edgeSamples} points per edge` : "";
  return (
    `Equilibria: damped Newton from a deterministic multistart set (${grid}, window edges and axes, roots of each component along each edge${edges}); ` +
    `a root is accepted when every residual is below ${formatNumber(ROOT_RESIDUAL_TOL)} of that component's scale over the window; ` +
    `roots closer than ${formatNumber(DEDUP_REL_TOL)} of the window are merged.`
  );
}

function classificationMethod(): string {
  return (
    `Classification: trace, determinant and discriminant are called zero within ${formatNumber(CLASSIFY_REL_TOL)} relative to scales a change of units leaves unchanged ` +
    "(the spectral radius, and the sizes of the terms that cancel); such borderline cases are reported as non-hyperbolic or center."
  );
}

function trajectoryMethod(s: RecordedSettings): string {
  const t = s.trajectories ?? {};
  const tolerances = [
    t.relativeTolerance !== undefined ? `relative tolerance ${formatNumber(t.relativeTolerance)}` : "",
    t.absoluteToleranceOfWindow !== undefined
      ? `absolute tolerance ${formatNumber(t.absoluteToleranceOfWindow)} of each state's window width`
      : "",
  ]
    .filter((x) => x)
    .join(", ");
  return (
    `Trajectories: ${t.integrator ?? "adaptive integration"}${tolerances ? `; ${tolerances}` : ""}. ` +
    "A trajectory counts as converged once it enters a neighbourhood of a stable equilibrium on which the linearisation's quadratic Lyapunov function " +
    `was checked by sampling to decrease (only ${percent(CAPTURE_SAFETY)} of the checked level is used, as sampling is not a proof).`
  );
}

function cycleMethod(): string {
  return (
    "Periodic orbits: recurrence through a ray section from an equilibrium, then shooting (secant iteration on the return map) " +
    `integrated at relative tolerance ${formatNumber(SHOOT_RELATIVE_TOL)}, until the return misses its start by less than ${formatNumber(SHOOT_RESIDUAL_TOL)} of the window; ` +
    "the Floquet multiplier is exp of the integral of the Jacobian's trace over one period."
  );
}

function separatrixMethod(): string {
  return `Separatrices: each saddle's manifolds integrated from points ${formatNumber(MANIFOLD_OFFSET)} of the window along its eigenvectors (stable manifolds backward in time).`;
}

/** The basin pass's method, from the settings it recorded (none when it did not run). */
function basinMethod(s: RecordedSettings, timeUnit: string): string[] {
  const b = s.basins;
  if (!b || b.resolution === undefined || b.coarse === undefined) return [];
  return [
    `Basins: a first pass over ${gridSize(b.coarse)} cells, then cells subdivided near basin boundaries up to ${gridSize(b.resolution)}; ` +
      `each cell's trajectory integrated${b.integrator ? ` by ${b.integrator}` : ""}` +
      (b.relativeTolerance !== undefined
        ? ` at relative tolerance ${formatNumber(b.relativeTolerance)}`
        : "") +
      (b.absoluteToleranceOfWindow !== undefined
        ? `, absolute tolerance ${formatNumber(b.absoluteToleranceOfWindow)} of the window`
        : "") +
      (b.horizon !== undefined ? `, for at most t = ${formatNumber(b.horizon, 4)} ${timeUnit}` : "") +
      ".",
  ];
}

function conditionMethods(studied: boolean, mapped: boolean): string[] {
  if (!studied) return [];
  return [
    "Deciding conditions: each ranged parameter varied alone; branches of equilibria followed by pseudo-arclength continuation, and each threshold located " +
      `to ${formatNumber(LOCATE_TOL)} of the range's width. The outcome (the attractors, found from a multistart grid of ${gridSize(OUTCOME_GRID_SIZE)}, and every scenario's fate) ` +
      `is also sampled at ${OUTCOME_SAMPLES} evenly spaced values, and a change between samples that no threshold explains is bisected to ` +
      `${formatNumber(SWITCH_LOCATE_TOL)} of the range. A trajectory still undecided at its horizon within ${formatNumber(SLOW_ARRIVAL_DISTANCE)} of the window of a stable ` +
      `equilibrium, or still closing in on it, counts as reaching it. A threshold matches a symbolic invasion condition when they agree to ${formatNumber(SYMBOLIC_MATCH_TOL)}, relatively.`,
    ...(mapped
      ? [
          `Outcome maps: the attractors at the centre of each of ${gridSize(MAP_RESOLUTION)} cells over the two ranges.`,
        ]
      : []),
  ];
}

function claimMethods(): string {
  return (
    `Claims: a claimed point is near an equilibrium within ${percent(DEFAULT_CLAIM_NEAR)} of the window in each state unless the claim says otherwise; ` +
    `a condition is tested at ${DEFAULT_CLAIM_CONDITION_SAMPLES} parameter points of a Halton sequence across the ranges unless the claim says otherwise, ` +
    `skipping points where its two sides agree to ${formatNumber(CONDITION_MARGIN_TOL)}, relatively.`
  );
}

/** One paragraph per method, in the order of the analysis. */
export function methodsWords(
  settings: Record<string, unknown>,
  context: { timeUnit: string; studied: boolean; mapped: boolean; claims: boolean },
): string[] {
  const s = settings as RecordedSettings;
  return [
    equilibriumMethod(s),
    classificationMethod(),
    trajectoryMethod(s),
    cycleMethod(),
    separatrixMethod(),
    ...basinMethod(s, context.timeUnit),
    ...conditionMethods(context.studied, context.mapped),
    ...(context.claims ? [claimMethods()] : []),
  ];
}

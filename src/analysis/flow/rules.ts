import { literal as L } from "../../model/codegen.js";
import type { Box } from "../numeric/window.js";
import type { CaptureRegion } from "./capture.js";
import {
  ALGEBRAIC_HEADING,
  ALGEBRAIC_NEAR,
  ALGEBRAIC_STEPS,
  ARRIVAL_DISTANCE,
  BLOWUP_EFOLDING_FRACTION,
  BLOWUP_WINDOWS,
  CYCLE_CAPTURE_HITS,
  CYCLE_CAPTURE_RADIUS,
  WINDOW_EXIT_SLACK,
} from "../constants.js";

/**
 * The fate rules: how a trajectory's fate is decided, shared by the trajectory follower
 * (follow.ts, which interprets them) and the generated basin kernel (basins/kernel.ts, which
 * emits them as straight-line code through the emit* functions here). Both test, at every
 * accepted step and in this order:
 *
 *  1. non-finite right-hand side → left-window when the window was left before, else undecided;
 *  2. farther than BLOWUP_WINDOWS window widths outside the window → blow-up when growing faster
 *     than exponentially (e-folding time below BLOWUP_EFOLDING_FRACTION of the time since the
 *     exit), else a plain exit;
 *  3. outside the window by more than WINDOW_EXIT_SLACK → keep integrating only to tell rule 2
 *     from a plain exit;
 *  4. inside a verified capture region of an attracting equilibrium → that equilibrium (linear);
 *  5. [follower only] near a saddle with no component along its unstable direction → the saddle,
 *     along its stable manifold (a basin map has no such starts but a set of measure zero);
 *  6. near a non-hyperbolic equilibrium, heading at it and closing in for ALGEBRAIC_STEPS steps
 *     in a row → that equilibrium (algebraic approach);
 *  7. periodic orbits: the follower looks for recurrence through the ray of each non-saddle
 *     equilibrium (a candidate the caller confirms by shooting); the kernel, knowing the stable
 *     cycles, labels a start whose section crossings close in on one (CYCLE_CAPTURE_HITS within
 *     CYCLE_CAPTURE_RADIUS);
 *  8. horizon or step limit → left-window when the window was left, else undecided.
 *
 * Each realisation keeps its own arithmetic (the follower divides by the window widths, the
 * kernel multiplies by their inlined reciprocals), so both reproduce their established results
 * bit for bit; the rules, their order and their thresholds are stated here once. Two known
 * differences: the kernel takes the window exit at the start of the step that left (the follower
 * locates it on the interpolant), and it accepts arrival within ARRIVAL_DISTANCE of a
 * non-hyperbolic equilibrium whatever the heading (the follower only while heading in).
 */

/** Rule 3: how far x lies outside the window, as a fraction of the widest overshoot (0 or less inside). */
export function outsideBy(box: Box, x: ArrayLike<number>): number {
  let worst = 0;
  for (let k = 0; k < box.lo.length; k++) {
    const below = (box.lo[k] - x[k]) / box.width[k];
    const above = (x[k] - box.hi[k]) / box.width[k];
    worst = Math.max(worst, below, above);
  }
  return worst;
}

export const hasLeftWindow = (outside: number) => outside > WINDOW_EXIT_SLACK;
/** Rule 2: far enough out to test for a blow-up ... */
export const isFarOutside = (outside: number) => outside > BLOWUP_WINDOWS;
/** ... and growing faster than exponentially. */
export const isBlowUp = (eFolding: number, sinceExit: number) =>
  eFolding < BLOWUP_EFOLDING_FRACTION * sinceExit;

/** Kernel code for rule 3: declares `off`, the overshoot of (x, y) beyond the window. */
export function emitOutsideBy(box: Box): string {
  const [lo0, lo1] = box.lo,
    [hi0, hi1] = box.hi,
    [w0, w1] = box.width;
  return `const out0 = Math.max((${L(lo0)} - x) * ${L(1 / w0)}, (x - ${L(hi0)}) * ${L(1 / w0)});
      const out1 = Math.max((${L(lo1)} - y) * ${L(1 / w1)}, (y - ${L(hi1)}) * ${L(1 / w1)});
      const off = Math.max(out0, out1);`;
}

export const emitHasLeftWindow = (outside: string) => `${outside} > ${L(WINDOW_EXIT_SLACK)}`;
export const emitIsFarOutside = (outside: string) => `${outside} > ${L(BLOWUP_WINDOWS)}`;
export const emitIsBlowUp = (eFolding: string, sinceExit: string) =>
  `${eFolding} < ${L(BLOWUP_EFOLDING_FRACTION)} * (${sinceExit})`;

/** Rule 4 as kernel code: true when (x, y) lies in the capture region (the follower calls isCaptured). */
export function emitCaptureTest(region: CaptureRegion, box: Box): { setup: string; test: string } {
  const [p00, p01, , p11] = region.p;
  return {
    setup: `const z0 = (x - ${L(region.center[0])}) * ${L(1 / box.width[0])}, z1 = (y - ${L(region.center[1])}) * ${L(1 / box.width[1])};`,
    test: `${L(p00)} * z0 * z0 + ${L(2 * p01)} * z0 * z1 + ${L(p11)} * z1 * z1 < ${L(region.level)}`,
  };
}

/** Rule 6: the run of steps closing in on a non-hyperbolic equilibrium. */
export interface AlgebraicRun {
  /** Distance at the last step of the run. */
  last: number;
  count: number;
}

/** Rule 6, one step: the run continues when near, heading in and closer than before; else it ends (null). */
export function continueAlgebraicRun(
  run: AlgebraicRun | null,
  distance: number,
  heading: number,
): AlgebraicRun | null {
  if (distance < ALGEBRAIC_NEAR && heading > ALGEBRAIC_HEADING && (!run || distance < run.last)) {
    return { last: distance, count: (run?.count ?? 0) + 1 };
  }
  return null;
}

/** Rule 6 (and rule 5's floor): arrived after ALGEBRAIC_STEPS closing steps, or within ARRIVAL_DISTANCE. */
export const hasArrived = (count: number, distance: number) =>
  count >= ALGEBRAIC_STEPS || distance < ARRIVAL_DISTANCE;

/** Rule 6 as kernel code for slow sink i (run state slowCount${i}, slowLast${i}); `d` and `heading` are in scope. */
export function emitAlgebraicStep(i: number, label: number): string {
  return `if (d < ${L(ALGEBRAIC_NEAR)} && heading > ${L(ALGEBRAIC_HEADING)} && d < slowLast${i}) { slowCount${i}++; slowLast${i} = d; }
        else { slowCount${i} = 0; slowLast${i} = Infinity; }
        if (slowCount${i} >= ${ALGEBRAIC_STEPS} || d < ${L(ARRIVAL_DISTANCE)}) { label = ${label}; break; }`;
}

/** Rule 7 (kernel) as code for stable cycle i at scaled section radius `radius`; `r` (the crossing's radius) is in scope. */
export function emitCycleCapture(i: number, label: number, radius: number): string {
  return `const gap = Math.abs(r - ${L(radius)});
            if (gap < ${L(CYCLE_CAPTURE_RADIUS)} && gap < cycleGap${i}) { if (++cycleHits${i} >= ${CYCLE_CAPTURE_HITS}) { label = ${label}; break; } }
            else cycleHits${i} = 0;
            cycleGap${i} = gap;`;
}

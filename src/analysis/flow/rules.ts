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
  EVENT_BISECTION_STEPS,
  WINDOW_EXIT_SLACK,
} from "../constants.js";

/**
 * The fate rules: how a trajectory's fate is decided, shared by the trajectory follower
 * (follow.ts, which interprets them) and the generated basin kernel (basins/kernel.ts, which
 * emits them as straight-line code through the emit* functions here). A trajectory is followed
 * inside the feasible region (the states' min/max, `bounds`); the window only sets the scale
 * (overshoots and distances are divided by its widths) and where basin starts lie, so a
 * trajectory may leave the window and come back. Both test, at every accepted step and in this
 * order:
 *
 *  0. the step passes within SINGULAR_ARRIVAL_DISTANCE of a singular point (the field not defined
 *     there, as 0/0) → undecided, reason "singular-point": the equations do not say what follows;
 *  1. non-finite right-hand side → left-window when the feasible region was left before, else
 *     undecided;
 *  2. farther than BLOWUP_WINDOWS window widths outside the feasible region at the step's end →
 *     blow-up when growing faster than exponentially (e-folding time below
 *     BLOWUP_EFOLDING_FRACTION of the time since the exit), else a plain exit;
 *  3. outside the feasible region by more than WINDOW_EXIT_SLACK anywhere within the step, on the
 *     step's interpolant (so an excursion between two accepted steps counts: the follower
 *     searches odex's dense output, numeric/excursion.ts; the kernel the cubic Hermite
 *     interpolant of its shorter steps, KERNEL_HERMITE_HELPERS) → the fate is left-window,
 *     through the bound crossed first; integration goes on only to tell rule 2 from a plain exit;
 *  4. inside a verified capture region of an attracting equilibrium → that equilibrium (linear);
 *  5. [follower only] near a saddle with no component along its unstable direction → the saddle,
 *     along its stable manifold (a basin map has no such starts but a set of measure zero);
 *  6. near a non-hyperbolic equilibrium, heading at it and closing in for ALGEBRAIC_STEPS steps
 *     in a row → that equilibrium (algebraic approach);
 *  7. periodic orbits: a crossing of a known stable cycle's section inside its capture (the radii
 *     CycleResult.capture verified when the cycle was solved, or, where none was verified,
 *     CYCLE_CAPTURE_RADIUS either side of its fixed point, attracting by its multiplier) → that
 *     cycle; the follower also looks for recurrence through the ray of each non-saddle
 *     equilibrium (a candidate the caller confirms by shooting);
 *  8. horizon or step limit → left-window when the feasible region was left, else undecided.
 *
 * Each realisation keeps its own arithmetic (the follower divides by the window widths, the
 * kernel multiplies by their inlined reciprocals); the rules, their order and their thresholds
 * are stated here once. Known differences: the kernel takes the exit time at the start of the
 * step that left (the follower locates it on the interpolant); it accepts arrival within
 * ARRIVAL_DISTANCE of a non-hyperbolic equilibrium whatever the heading (the follower only while
 * heading in); it reads exits and section crossings from the Hermite interpolant (the follower
 * from odex's dense output).
 */

/** Rule 2: how far x lies outside `bounds`, as a fraction of `width` (the window's), the worst component (0 or less inside). */
export function outsideBy(bounds: Box, x: ArrayLike<number>, width: readonly number[]): number {
  let worst = 0;
  for (let k = 0; k < bounds.lo.length; k++) {
    const below = (bounds.lo[k] - x[k]) / width[k];
    const above = (x[k] - bounds.hi[k]) / width[k];
    worst = Math.max(worst, below, above);
  }
  return worst;
}

/** Rule 2: far enough out to test for a blow-up ... */
export const isFarOutside = (outside: number) => outside > BLOWUP_WINDOWS;
/** ... and growing faster than exponentially. */
export const isBlowUp = (eFolding: number, sinceExit: number) =>
  eFolding < BLOWUP_EFOLDING_FRACTION * sinceExit;

/**
 * Kernel helpers for rules 3 and 7, emitted once ahead of the kernel. The kernel reads a step
 * from its cubic Hermite interpolant (values y0, y1 and derivatives times the step d0, d1 at
 * both ends; third-order accurate, error h⁴ max|y⁗| / 384: Burden & Faires, Numerical Analysis,
 * 9th ed., section 3.4, from memory), far below the tolerance on the kernel's short steps:
 * hermiteAt is its value at s ∈ [0, 1]; stepOvershoot the overshoot of its range beyond
 * [lo, hi] times `inv` (first a bound on its distance from the chord, max(|d0 − Δ|, |d1 − Δ|)/4
 * with Δ = y1 − y0, which clears most steps; else the cubic's critical points by the stable
 * quadratic formula); crossingAt the time it crosses c in `sense`, by bisection.
 */
export const KERNEL_HERMITE_HELPERS = `
const hermiteAt = (y0, y1, d0, d1, s) => y0 + s * (d0 + s * ((3 * (y1 - y0) - 2 * d0 - d1) + s * (2 * (y0 - y1) + d0 + d1)));
function stepOvershoot(y0, y1, d0, d1, lo, hi, inv) {
  const chord = y1 - y0;
  const dev = 0.25 * Math.max(Math.abs(d0 - chord), Math.abs(d1 - chord));
  let a = Math.min(y0, y1), b = Math.max(y0, y1);
  if (a - dev > lo && b + dev < hi) return Math.max((lo - a) * inv, (b - hi) * inv);
  const qa = 3 * (2 * (y0 - y1) + d0 + d1), qb = 2 * (3 * (y1 - y0) - 2 * d0 - d1), qc = d0;
  let s1 = -1, s2 = -1;
  if (qa === 0) { if (qb !== 0) s1 = -qc / qb; }
  else {
    const disc = qb * qb - 4 * qa * qc;
    if (disc >= 0) { const q = -0.5 * (qb + (qb >= 0 ? 1 : -1) * Math.sqrt(disc)); s1 = q / qa; if (q !== 0) s2 = qc / q; }
  }
  if (s1 > 0 && s1 < 1) { const v = hermiteAt(y0, y1, d0, d1, s1); a = Math.min(a, v); b = Math.max(b, v); }
  if (s2 > 0 && s2 < 1) { const v = hermiteAt(y0, y1, d0, d1, s2); a = Math.min(a, v); b = Math.max(b, v); }
  return Math.max((lo - a) * inv, (b - hi) * inv);
}
function crossingAt(y0, y1, d0, d1, c, sense) {
  let a = 0, b = 1;
  for (let k = 0; k < ${EVENT_BISECTION_STEPS}; k++) {
    const m = 0.5 * (a + b);
    if (m === a || m === b) break;
    if (sense * (hermiteAt(y0, y1, d0, d1, m) - c) >= 0) b = m; else a = m;
  }
  return b;
}`;

/**
 * Kernel code for rules 2 and 3 after a step from (xPrev, yPrev) to (x, y) of length hs, with
 * derivatives (f0a, f0b) at its start and (k1a, k1b) at its end: declares `offEnd`, the end's
 * overshoot beyond `bounds`, and `off`, the step's.
 */
export function emitStepOutside(bounds: Box, width: readonly number[]): string {
  const [lo0, lo1] = bounds.lo.map(L),
    [hi0, hi1] = bounds.hi.map(L);
  const [i0, i1] = width.map((w) => L(1 / w));
  // stepOvershoot's chord bound inlined, so the call is made only for a step near an edge
  const component = (v: string, prev: string, f0: string, f1: string, lo: string, hi: string, inv: string) =>
    `{ const c = ${v} - ${prev}, u = hs * ${f0} - c, w = hs * ${f1} - c;
        const dev = 0.25 * Math.max(Math.abs(u), Math.abs(w));
        if (!(dev < Math.min(${v}, ${prev}) - ${lo} && dev < ${hi} - Math.max(${v}, ${prev}))) off = Math.max(off, stepOvershoot(${prev}, ${v}, hs * ${f0}, hs * ${f1}, ${lo}, ${hi}, ${inv})); }`;
  return `const offEnd = Math.max((${lo0} - x) * ${i0}, (x - ${hi0}) * ${i0}, (${lo1} - y) * ${i1}, (y - ${hi1}) * ${i1});
      let off = offEnd;
      ${component("x", "xPrev", "f0a", "k1a", lo0, hi0, i0)}
      ${component("y", "yPrev", "f0b", "k1b", lo1, hi1, i1)}`;
}

/** Rule 3's slack as kernel code (the follower widens the bounds by it instead). */
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

/** A stable cycle as rule 7 sees it: its section (the ray through `center`, crossed in `sense`) and its capture radii (scaled). */
export interface CycleTarget {
  label: number;
  center: [number, number];
  sense: 1 | -1;
  radii: [number, number];
}

/**
 * Rule 7 as kernel code: a crossing of the cycle's section within the step (located on the
 * Hermite interpolant of the second state, the first state read there) inside its capture radii
 * labels the cycle.
 */
export function emitCycleCapture(cycle: CycleTarget, width: readonly number[]): string {
  const { label, center, sense, radii } = cycle;
  const crossed = sense === 1 ? "before < 0 && after >= 0" : "before > 0 && after <= 0";
  return `{
        const before = yPrev - ${L(center[1])}, after = y - ${L(center[1])};
        if (${crossed}) {
          const s = crossingAt(yPrev, y, hs * f0b, hs * k1b, ${L(center[1])}, ${sense});
          const r = (hermiteAt(xPrev, x, hs * f0a, hs * k1a, s) - ${L(center[0])}) * ${L(1 / width[0])};
          if (r >= ${L(radii[0])} && r <= ${L(radii[1])}) { label = ${label}; break; }
        } }`;
}

import { correct, dot3, stepAlong, tangentAt, type ContinuationSystem, type CurvePoint } from "./system.js";
import type { BranchVertex } from "./branch.js";
import { LOCATE_ITERATIONS, LOCATE_MAX_ITERATIONS, LOCATE_TOL, LOCATE_ULPS } from "../../constants.js";

/** A chart of the branch near a point: the branch parametrised by scaled arclength along t from z. */
export interface Chart {
  z: CurvePoint;
  t: Float64Array;
}

/** The branch point at chart coordinate s: corrected within the hyperplane t · (u − u_chart) = s. */
export function pointAlong(
  sys: ContinuationSystem,
  chart: Chart,
  s: number,
  guess: ArrayLike<number> | null = null,
): CurvePoint | null {
  const anchor = stepAlong(sys, chart.z, chart.t, s);
  const c = correct(sys, guess ?? anchor, chart.t, anchor, LOCATE_ITERATIONS);
  return c.converged ? c.z : null;
}

export interface Located {
  z: CurvePoint;
  /** Tangent there, oriented along the branch. */
  t: Float64Array;
  /** Test function at z. */
  value: number;
}

/**
 * Zero of a test function along the branch between consecutive points a and b where it changes
 * sign: Illinois (modified regula falsi) on the chart coordinate s ∈ [0, s_b], every trial point
 * corrected back onto the branch, with a bisection whenever one end has been kept twice.
 */
export function locateBetween(
  sys: ContinuationSystem,
  a: BranchVertex,
  b: BranchVertex,
  test: (z: CurvePoint) => number,
): Located | null {
  const chart: Chart = { z: a.z, t: a.t };
  const sEnd = dot3(
    a.t,
    [0, 1, 2].map((k) => (b.z[k] - a.z[k]) / sys.span[k]),
  );
  if (!(sEnd > 0)) return null;
  const size = Math.max(...[0, 1, 2].map((k) => Math.abs(a.z[k] / sys.span[k])), 1);
  const tol = Math.max(LOCATE_TOL, LOCATE_ULPS * size);
  let lo = { s: 0, z: a.z, g: test(a.z) };
  let hi = { s: sEnd, z: b.z, g: test(b.z) };
  if (lo.g === 0) return finish(sys, lo.z, a.t, 0);
  if (hi.g === 0) return finish(sys, hi.z, a.t, 0);
  if (Math.sign(lo.g) === Math.sign(hi.g)) return null;
  let gLo = lo.g; // Illinois: the function value used for an end kept twice is halved
  let gHi = hi.g;
  let side = 0; // end replaced last: −1 lo, +1 hi
  let run = 0; // how many times in a row that end was replaced
  let failed = false; // the last trial point did not converge
  for (let it = 0; it < LOCATE_MAX_ITERATIONS && hi.s - lo.s > tol; it++) {
    let s = run >= 3 || failed ? 0.5 * (lo.s + hi.s) : (lo.s * gHi - hi.s * gLo) / (gHi - gLo);
    if (!(s > lo.s && s < hi.s)) s = 0.5 * (lo.s + hi.s);
    const w = (s - lo.s) / (hi.s - lo.s);
    const guess = [0, 1, 2].map((k) => lo.z[k] + w * (hi.z[k] - lo.z[k]));
    const z = pointAlong(sys, chart, s, guess);
    // near a branch point the corrector stops converging: a bisection step away from the failed
    // trial point is tried once, then the bracket so far is the answer
    if (!z && failed) break;
    failed = !z;
    if (!z) continue;
    const g = test(z);
    if (g === 0) return finish(sys, z, a.t, 0);
    const replaced = Math.sign(g) === Math.sign(lo.g) ? -1 : 1;
    run = replaced === side ? run + 1 : 1;
    side = replaced;
    if (replaced < 0) {
      lo = { s, z, g };
      gLo = g;
      if (run >= 2) gHi /= 2;
    } else {
      hi = { s, z, g };
      gHi = g;
      if (run >= 2) gLo /= 2;
    }
  }
  const best = Math.abs(lo.g) <= Math.abs(hi.g) ? lo : hi;
  return finish(sys, best.z, a.t, best.g);
}

function finish(sys: ContinuationSystem, z: CurvePoint, orient: Float64Array, value: number): Located {
  return { z, t: tangentAt(sys, z, orient) ?? orient, value };
}

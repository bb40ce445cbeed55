import type { BranchResult, BranchVertexResult } from "../../analysis/parameters/continuation/index.js";
import type { NormalizedState } from "../../spec/types.js";

/**
 * The feasible parts of a branch of equilibria, for the bifurcation diagram: continuation runs on
 * through infeasible states (a negative population) so that it sees bound crossings, but an
 * equilibrium outside the feasible region is drawn in no panel, whichever state the panel shows.
 */

/** A coordinate within this fraction of the window width of a bound is on it (continuation noise about an invariant axis is ~1e-40). */
const ON_BOUND_SLACK = 1e-9;

type Bounds = { name: string; lo: number; hi: number; slack: number }[];

/** The vertex with each coordinate within slack of a bound put on it. */
function snapped(p: BranchVertexResult, bounds: Bounds): BranchVertexResult {
  const point = { ...p.point };
  for (const b of bounds) {
    if (Math.abs(point[b.name] - b.lo) <= b.slack) point[b.name] = b.lo;
    if (Math.abs(point[b.name] - b.hi) <= b.slack) point[b.name] = b.hi;
  }
  return { ...p, point };
}

/** Liang–Barsky in every state: the part [t0, t1] of the segment a → b inside the bounds, or null. */
function insideFraction(
  a: BranchVertexResult,
  b: BranchVertexResult,
  bounds: Bounds,
): [number, number] | null {
  let t0 = 0,
    t1 = 1;
  for (const { name, lo, hi } of bounds) {
    const pa = a.point[name],
      d = b.point[name] - pa;
    for (const [num, den] of [
      [pa - lo, -d],
      [hi - pa, d],
    ]) {
      if (den === 0) {
        if (num < 0) return null;
        continue;
      }
      const t = num / den;
      if (den < 0) t0 = Math.max(t0, t);
      else t1 = Math.min(t1, t);
    }
  }
  return t0 <= t1 ? [t0, t1] : null;
}

/** The vertex a fraction t of the way from a to b; its stability is that of the end it belongs to. */
function between(a: BranchVertexResult, b: BranchVertexResult, t: number, from: BranchVertexResult) {
  if (t === 0) return a;
  if (t === 1) return b;
  const point = Object.fromEntries(
    Object.keys(a.point).map((n) => [n, a.point[n] + t * (b.point[n] - a.point[n])]),
  );
  return { ...from, value: a.value + t * (b.value - a.value), point };
}

/** The runs of the branch inside the feasible region, cut where it crosses a bound (linearly between vertices). */
export function feasibleRuns(
  branch: BranchResult,
  states: NormalizedState[],
  window: Record<string, [number, number]>,
): BranchResult[] {
  const bounds: Bounds = states.map((s) => ({
    name: s.name,
    lo: s.min,
    hi: s.max,
    slack: ON_BOUND_SLACK * (window[s.name][1] - window[s.name][0]),
  }));
  const pts = branch.points.map((p) => snapped(p, bounds));
  const runs: BranchVertexResult[][] = [];
  let run: BranchVertexResult[] = [];
  const flush = () => {
    if (run.length >= 2) runs.push(run);
    run = [];
  };
  for (let k = 0; k + 1 < pts.length; k++) {
    const [a, b] = [pts[k], pts[k + 1]];
    const t = insideFraction(a, b, bounds);
    if (!t) {
      flush();
      continue;
    }
    if (t[0] > 0) flush();
    if (!run.length) run.push(between(a, b, t[0], b));
    run.push(between(a, b, t[1], a));
    if (t[1] < 1) flush();
  }
  flush();
  return runs.map((points) => ({ ...branch, points }));
}

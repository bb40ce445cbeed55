import {
  correct,
  cross3,
  dot3,
  evaluate,
  stepAlong,
  tangentAt,
  type ContinuationSystem,
  type CurvePoint,
} from "./system.js";
import { scaledMaxDistance, segmentDistance } from "../../numeric/distance.js";
import {
  CLOSE_MIN_STEPS,
  CLOSE_MIN_TRAVEL_STEPS,
  CORRECTOR_STEP_TOL,
  EASY_ITERATIONS,
  GROW,
  HARD_ITERATIONS,
  MAX_CORRECTION,
  ON_BRANCH_MIN_TOL,
  SHRINK,
  SWITCH_OFFSET,
  CORRECTOR_ITERATIONS,
} from "../../constants.js";

/** How continuation in one direction stopped. */
export type BranchEnd =
  /** reached an end of the parameter range (the last point sits on it) */
  | "range"
  /** left the window by more than the margin */
  | "window"
  /** came back to its seed: a closed branch (an isola) */
  | "closed"
  | "step-limit"
  /** the step shrank below the minimum without a converged corrector */
  | "stalled";

export interface StepOptions {
  /** First step, scaled arclength. */
  initialStep: number;
  /** Longest step, scaled arclength: bounds the spacing of the points a diagram draws. */
  maxStep: number;
  /** Shortest step before the direction is abandoned. */
  minStep: number;
  /** Largest angle (radians) between consecutive tangents; a larger turn is retried shorter. */
  maxAngle: number;
  /** A branch may run this fraction of the window width beyond it, so that bound crossings are seen. */
  windowMargin: number;
  /** Accepted steps per direction. */
  maxSteps: number;
}

export interface BranchVertex {
  z: CurvePoint;
  /** Unit tangent (scaled), oriented along the branch's stored order. */
  t: Float64Array;
  trace: number;
  determinant: number;
  /** Sizes of the terms that cancel in the trace and in the determinant (as in stability.ts). */
  traceScale: number;
  determinantScale: number;
}

export interface ContinuedBranch {
  points: BranchVertex[];
  /** Index of the seed in points. */
  seed: number;
  /** How the start and the end of points were reached. */
  ends: [BranchEnd, BranchEnd];
}

function branchVertex(sys: ContinuationSystem, z: CurvePoint, t: Float64Array): BranchVertex {
  evaluate(sys, z);
  const j = sys.j;
  const determinant = j[0] * j[3] - j[1] * j[2];
  const radius = Math.sqrt(Math.abs(determinant));
  return {
    z,
    t,
    trace: j[0] + j[3],
    determinant,
    traceScale: Math.max(Math.abs(j[0]), Math.abs(j[3]), radius),
    determinantScale: Math.max(Math.abs(j[0] * j[3]), Math.abs(j[1] * j[2]), Math.abs(determinant)),
  };
}

function outsideWindow(sys: ContinuationSystem, z: ArrayLike<number>, margin: number): boolean {
  const { lo, hi, width } = sys.box;
  return [0, 1].some((k) => !(z[k] >= lo[k] - margin * width[k] && z[k] <= hi[k] + margin * width[k]));
}

/** The point of the branch between a and b (p on either side of bound) with p = bound exactly. */
function clipToRange(
  sys: ContinuationSystem,
  a: CurvePoint,
  b: CurvePoint,
  bound: number,
): CurvePoint | null {
  const w = (bound - a[2]) / (b[2] - a[2]);
  const start = Float64Array.from([0, 1, 2].map((k) => a[k] + w * (b[k] - a[k])));
  start[2] = bound;
  const c = correct(sys, start, [0, 0, 1], start, CORRECTOR_ITERATIONS);
  if (!c.converged) return null;
  c.z[2] = bound;
  return c.z;
}

/** Follows the branch from z0 along t0 until a stop condition; returns the points after z0. */
function continueOneWay(
  sys: ContinuationSystem,
  z0: CurvePoint,
  t0: Float64Array,
  options: StepOptions,
): { points: BranchVertex[]; end: BranchEnd } {
  const points: BranchVertex[] = [];
  const [lo, hi] = sys.range;
  let z = z0;
  let t = t0;
  let h = options.initialStep;
  let travelled = 0;
  while (points.length < options.maxSteps) {
    if (h < options.minStep) return { points, end: "stalled" };
    const predicted = stepAlong(sys, z, t, h);
    const c = correct(sys, predicted, t, predicted, CORRECTOR_ITERATIONS);
    const tNew = c.converged ? (tangentAt(sys, c.z, t) ?? t) : null;
    if (
      !c.converged ||
      !tNew ||
      scaledMaxDistance(c.z, predicted, sys.span) > MAX_CORRECTION * h ||
      Math.acos(Math.min(1, dot3(t, tNew))) > options.maxAngle
    ) {
      h /= 2;
      continue;
    }
    const zNew = c.z;
    travelled += h;
    if (zNew[2] < lo || zNew[2] > hi) {
      const bound = zNew[2] < lo ? lo : hi;
      const clipped = clipToRange(sys, z, zNew, bound);
      // a seed sitting on the end of the range clips onto itself: nothing to add
      if (clipped && scaledMaxDistance(clipped, z, sys.span) <= CORRECTOR_STEP_TOL)
        return { points, end: "range" };
      points.push(
        clipped
          ? branchVertex(sys, clipped, tangentAt(sys, clipped, tNew) ?? tNew)
          : branchVertex(sys, zNew, tNew),
      );
      return { points, end: "range" };
    }
    points.push(branchVertex(sys, zNew, tNew));
    if (outsideWindow(sys, zNew, options.windowMargin)) return { points, end: "window" };
    if (
      points.length >= CLOSE_MIN_STEPS &&
      travelled > CLOSE_MIN_TRAVEL_STEPS * h &&
      scaledMaxDistance(zNew, z0, sys.span) <= h &&
      dot3(tNew, t0) > 0
    ) {
      points.push(branchVertex(sys, Float64Array.from(z0), t0));
      return { points, end: "closed" };
    }
    z = zNew;
    t = tNew;
    const factor = c.iterations <= EASY_ITERATIONS ? GROW : c.iterations >= HARD_ITERATIONS ? SHRINK : 1;
    h = Math.min(options.maxStep, h * factor);
  }
  return { points, end: "step-limit" };
}

/** Traces the whole branch through seed, both ways; null when the seed has no unique tangent. */
export function continueBranch(
  sys: ContinuationSystem,
  seed: CurvePoint,
  options: StepOptions,
): ContinuedBranch | null {
  const t0 = tangentAt(sys, seed, null);
  if (!t0) return null;
  const first = branchVertex(sys, Float64Array.from(seed), t0);
  const forward = continueOneWay(sys, first.z, t0, options);
  if (forward.end === "closed")
    return { points: [first, ...forward.points], seed: 0, ends: ["closed", "closed"] };
  const back = continueOneWay(
    sys,
    first.z,
    Float64Array.from(t0, (v) => -v),
    options,
  );
  const backward = back.points.reverse().map((p) => ({ ...p, t: Float64Array.from(p.t, (v) => -v + 0) }));
  return {
    points: [...backward, first, ...forward.points],
    seed: backward.length,
    ends: [back.end, forward.end],
  };
}

/** Index of the segment of branch nearest to z, and its distance. */
export function nearestSegment(
  sys: ContinuationSystem,
  branch: ContinuedBranch,
  z: ArrayLike<number>,
): { index: number; distance: number } {
  let best = { index: -1, distance: Infinity };
  const pts = branch.points;
  if (pts.length === 1) return { index: 0, distance: scaledMaxDistance(z, pts[0].z, sys.span) };
  for (let k = 0; k + 1 < pts.length; k++) {
    const d = segmentDistance(z, pts[k].z, pts[k + 1].z, sys.span, "max").d;
    if (d < best.distance) best = { index: k, distance: d };
  }
  return best;
}

/** Distance a polygon of steps no longer than maxStep, turning at most maxAngle, keeps from its curve, with room. */
export function onBranchTolerance(options: StepOptions): number {
  return Math.max(ON_BRANCH_MIN_TOL, (options.maxStep * options.maxAngle) / 2);
}

/**
 * Whether the curve point z with tangent t (null: do not compare tangents) lies on branch: within
 * the polygon tolerance of one of its segments, and, when t is given, heading along it (so that a
 * branch crossing this one at z is not mistaken for it).
 */
export function liesOnBranch(
  sys: ContinuationSystem,
  branch: ContinuedBranch,
  z: ArrayLike<number>,
  t: ArrayLike<number> | null,
  options: StepOptions,
): boolean {
  const near = nearestSegment(sys, branch, z);
  if (near.distance > onBranchTolerance(options)) return false;
  if (!t) return true;
  const along = branch.points[near.index].t;
  return Math.abs(dot3(t, along)) >= Math.cos(2 * options.maxAngle);
}

/**
 * A point on the other branch through the branch point z (where the rows of [J | f_p] are
 * parallel, so its null space is a plane holding both tangents): step from z by SWITCH_OFFSET
 * along w, the direction of that plane orthogonal to the known tangent t, and correct within the
 * hyperplane orthogonal to w. That hyperplane cuts the known branch only far away, so Newton
 * lands on the crossing one.
 */
export function switchBranch(sys: ContinuationSystem, z: CurvePoint, t: ArrayLike<number>): CurvePoint[] {
  evaluate(sys, z);
  const r0 = sys.a.slice(0, 3);
  const r1 = sys.a.slice(3, 6);
  const row = Math.hypot(...r0) >= Math.hypot(...r1) ? r0 : r1;
  const w = cross3(row, t);
  const norm = Math.hypot(w[0], w[1], w[2]);
  if (!(norm > 0)) return [];
  for (let k = 0; k < 3; k++) w[k] /= norm;
  const found: CurvePoint[] = [];
  for (const sign of [1, -1]) {
    const anchor = stepAlong(sys, z, w, sign * SWITCH_OFFSET);
    const c = correct(sys, anchor, w, anchor, 2 * CORRECTOR_ITERATIONS);
    if (c.converged && scaledMaxDistance(c.z, z, sys.span) <= 3 * SWITCH_OFFSET) found.push(c.z);
  }
  return found;
}

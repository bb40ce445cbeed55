import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import { findCaptureRegions, isCaptured, type CaptureRegion } from "./capture.js";
import { integrateFlow, tolerancesFor, type IntegrationTolerances } from "../numeric/integrate.js";
import type { Box } from "../numeric/window.js";

/**
 * Following one trajectory and deciding where it goes. The decisions, in the order tried at
 * every accepted step:
 *  1. non-finite right-hand side → undecided (reason given);
 *  2. farther than BLOWUP_WINDOWS window widths from the window, and growing faster than
 *     exponentially → blow-up (an exponential escape is a plain exit);
 *  3. inside a capture region of an attracting equilibrium → converged (linear approach);
 *  4. near a saddle with no component along its unstable direction → converged along the
 *     saddle's stable manifold (as on an invariant axis where a population is absent);
 *  5. near a non-hyperbolic equilibrium and still closing in, monotonically, for
 *     ALGEBRAIC_STEPS steps → converged (algebraic approach);
 *  6. crossing the ray from a non-saddle equilibrium at a recurring point → recurrent (a
 *     periodic-orbit candidate, confirmed by the caller by shooting);
 *  7. leaving the window → integration goes on only to tell a blow-up from a plain exit.
 */
export type Fate =
  | { kind: "equilibrium"; target: string; t: number; approach: "linear" | "stable-manifold" | "algebraic" }
  | { kind: "cycle"; target: string; t: number }
  | { kind: "left-window"; t: number; point: Record<string, number>; edge: string }
  | { kind: "blow-up"; t: number; point: Record<string, number> }
  | { kind: "undecided"; t: number; reason: string };

export interface Recurrence {
  /** Equilibrium whose ray the trajectory keeps crossing. */
  around: string;
  /** +1: the orbit crosses the ray with the second state increasing; −1: decreasing. */
  sense: 1 | -1;
  /** Crossing point, state coordinates. */
  point: [number, number];
  /** Time between the last two crossings. */
  period: number;
  t: number;
}

export interface TrajectoryPath {
  t: number[];
  x: number[];
  y: number[];
}

export interface FollowResult {
  fate: Fate;
  /** Present when the trajectory recurs through a section: the caller confirms a cycle. */
  recurrence: Recurrence | null;
  path: TrajectoryPath;
  /** The window exit, when the trajectory left it (also when it then blew up). */
  exit: { t: number; point: [number, number]; edge: string } | null;
  steps: number;
  evaluations: number;
}

/** Beyond this many window widths outside the window, growth is called a blow-up ... */
export const BLOWUP_WINDOWS = 1e6;
/**
 * ... if it is also faster than exponential: the e-folding time |z|/|z'| (window-scaled) is below
 * this fraction of the time since the window exit. An exponential escape (a linear saddle) needs
 * ln(1e6) ≈ 14 e-foldings to get that far, a fraction near 1/14, and it is a plain exit; in a
 * finite-time blow-up, x ~ (t* − t)^−p, the e-folding time (t* − t)/p shrinks to nothing.
 */
export const BLOWUP_EFOLDING_FRACTION = 1e-2;
/** A state may overshoot the window by this fraction of its width before it has left. */
export const WINDOW_EXIT_SLACK = 1e-9;
/** Saddle capture: within this scaled distance ... */
export const SADDLE_NEAR = 1e-3;
/** ... with the unstable component below this fraction of the distance. */
export const SADDLE_UNSTABLE_FRACTION = 1e-6;
/**
 * Non-hyperbolic capture: within this scaled distance, closing in for ALGEBRAIC_STEPS steps in a
 * row while heading at the equilibrium (cosine above ALGEBRAIC_HEADING). The heading test keeps
 * a trajectory that merely passes by, as along the repelling side of a saddle-node, from counting.
 */
export const ALGEBRAIC_NEAR = 0.05;
export const ALGEBRAIC_STEPS = 40;
export const ALGEBRAIC_HEADING = 0.9;
/** Recurrence: consecutive ray crossings closer than this (scaled) ... */
export const RECURRENCE_TOL = 1e-6;
/** ... and farther than this from the equilibrium (else it is spiralling in or out). */
export const RECURRENCE_MIN_RADIUS = 1e-3;

export interface FlowContext {
  model: Model;
  box: Box;
  equilibria: EquilibriumResult[];
  direction: 1 | -1;
  captures: CaptureRegion[];
  saddles: { id: string; center: [number, number]; stable: [number, number]; unstable: [number, number] }[];
  nonHyperbolic: { id: string; center: [number, number] }[];
  rays: { id: string; center: [number, number] }[];
  tolerances: IntegrationTolerances;
}

export function buildFlowContext(model: Model, equilibria: EquilibriumResult[], box: Box, direction: 1 | -1): FlowContext {
  const pointOf = (e: EquilibriumResult): [number, number] => [e.point[model.stateNames[0]], e.point[model.stateNames[1]]];
  const scaled = (v: number[]): [number, number] => {
    const s: [number, number] = [v[0] / box.width[0], v[1] / box.width[1]];
    const n = Math.hypot(s[0], s[1]);
    return [s[0] / n, s[1] / n];
  };
  const saddles = equilibria
    .filter((e) => e.type === "saddle" && e.eigenvectors.length === 2)
    .map((e) => {
      // eigenvalues are sorted ascending: [stable, unstable]; in backward time they swap roles
      const [vs, vu] = direction === 1 ? [e.eigenvectors[0], e.eigenvectors[1]] : [e.eigenvectors[1], e.eigenvectors[0]];
      return { id: e.id, center: pointOf(e), stable: scaled(vs), unstable: scaled(vu) };
    });
  return {
    model,
    box,
    equilibria,
    direction,
    captures: findCaptureRegions(model, equilibria, box, direction),
    saddles,
    nonHyperbolic: equilibria.filter((e) => !e.hyperbolic).map((e) => ({ id: e.id, center: pointOf(e) })),
    rays: equilibria.filter((e) => e.type !== "saddle").map((e) => ({ id: e.id, center: pointOf(e) })),
    tolerances: tolerancesFor(box.width),
  };
}

function scaledDistance(box: Box, a: ArrayLike<number>, b: ArrayLike<number>): number {
  return Math.hypot((a[0] - b[0]) / box.width[0], (a[1] - b[1]) / box.width[1]);
}

function outsideBy(box: Box, x: ArrayLike<number>): number {
  let worst = 0;
  for (let k = 0; k < 2; k++) {
    const below = (box.lo[k] - x[k]) / box.width[k];
    const above = (x[k] - box.hi[k]) / box.width[k];
    worst = Math.max(worst, below, above);
  }
  return worst;
}

function edgeName(model: Model, box: Box, x: ArrayLike<number>): string {
  let best = "";
  let worst = -Infinity;
  for (let k = 0; k < 2; k++) {
    const below = (box.lo[k] - x[k]) / box.width[k];
    const above = (x[k] - box.hi[k]) / box.width[k];
    if (below > worst) { worst = below; best = `${model.stateNames[k]} = ${box.lo[k]}`; }
    if (above > worst) { worst = above; best = `${model.stateNames[k]} = ${box.hi[k]}`; }
  }
  return best;
}

/** Bisection on the dense interpolant for the first time in [t0, t1] where pred turns true. */
function locate(dense: (c: number, t: number) => number, t0: number, t1: number, pred: (x: [number, number]) => boolean): { t: number; x: [number, number] } {
  let a = t0, b = t1;
  for (let it = 0; it < 60; it++) {
    const m = 0.5 * (a + b);
    if (m === a || m === b) break;
    if (pred([dense(0, m), dense(1, m)])) b = m; else a = m;
  }
  return { t: b, x: [dense(0, b), dense(1, b)] };
}

export interface FollowOptions {
  horizon: number;
  /** Path points kept: every step up to this count, then thinned evenly. */
  maxPathPoints: number;
  /** Look for recurrence through equilibrium rays (cycle candidates). */
  detectRecurrence: boolean;
  maxSteps?: number;
  /** Largest step the integrator may take (default horizon / 64): curves drawn from the step points need it small. */
  maxStep?: number;
}

/** Follows one trajectory from `start` (state coordinates) in the context's time direction. */
export function followTrajectory(ctx: FlowContext, start: readonly [number, number], options: FollowOptions): FollowResult {
  const { model, box } = ctx;
  const names = model.stateNames;
  const rec = (x: ArrayLike<number>) => ({ [names[0]]: x[0], [names[1]]: x[1] });
  const path: TrajectoryPath = { t: [0], x: [start[0]], y: [start[1]] };
  let fate: Fate | null = null;
  let recurrence: Recurrence | null = null;
  let exit: FollowResult["exit"] = null;
  let steps = 0;
  const nearHistory = new Map<string, { last: number; count: number }>();
  const crossings = new Map<string, { t: number; r: number; x: [number, number] }[]>();
  const prev: [number, number] = [start[0], start[1]];
  const fBuffer = new Float64Array(2);

  // a start already inside a capture region has arrived
  for (const region of ctx.captures) {
    if (isCaptured(region, start, box)) fate = { kind: "equilibrium", target: region.equilibrium, t: 0, approach: "linear" };
  }

  const onStep = ({ t0, t1, y, dense }: { t0: number; t1: number; y: number[]; dense: (c: number, t: number) => number }) => {
    steps++;
    path.t.push(t1); path.x.push(y[0]); path.y.push(y[1]);
    const out = outsideBy(box, y);
    if (out > WINDOW_EXIT_SLACK && !exit) {
      const hit = locate(dense, t0, t1, (x) => outsideBy(box, x) > WINDOW_EXIT_SLACK);
      exit = { t: hit.t, point: hit.x, edge: edgeName(model, box, hit.x) };
    }
    if (out > BLOWUP_WINDOWS) {
      model.rhs(y, fBuffer);
      const eFolding = Math.hypot(y[0] / box.width[0], y[1] / box.width[1]) / Math.hypot(fBuffer[0] / box.width[0], fBuffer[1] / box.width[1]);
      const sinceExit = t1 - (exit as FollowResult["exit"])!.t;
      if (eFolding < BLOWUP_EFOLDING_FRACTION * sinceExit) fate = { kind: "blow-up", t: t1, point: rec(y) };
      return false; // else the fate is the exit, below
    }
    if (exit) {
      prev[0] = y[0]; prev[1] = y[1];
      return true; // outside: integrate on only to tell blow-up from exit
    }
    for (const region of ctx.captures) {
      if (isCaptured(region, y, box)) {
        fate = { kind: "equilibrium", target: region.equilibrium, t: t1, approach: "linear" };
        return false;
      }
    }
    for (const s of ctx.saddles) {
      const d = scaledDistance(box, y, s.center);
      if (d < SADDLE_NEAR) {
        // components in the eigenbasis (scaled): solve [vs vu] [α β]ᵀ = z
        const z0 = (y[0] - s.center[0]) / box.width[0], z1 = (y[1] - s.center[1]) / box.width[1];
        const det = s.stable[0] * s.unstable[1] - s.unstable[0] * s.stable[1];
        const beta = (s.stable[0] * z1 - s.stable[1] * z0) / det;
        if (Math.abs(beta) <= SADDLE_UNSTABLE_FRACTION * d || d < 1e-12) {
          fate = { kind: "equilibrium", target: s.id, t: t1, approach: "stable-manifold" };
          return false;
        }
      }
    }
    for (const e of ctx.nonHyperbolic) {
      const d = scaledDistance(box, y, e.center);
      const h = nearHistory.get(e.id);
      // heading at the equilibrium: the cosine between the velocity and the direction to it (scaled)
      model.rhs(y, fBuffer);
      const v0 = (ctx.direction * fBuffer[0]) / box.width[0], v1 = (ctx.direction * fBuffer[1]) / box.width[1];
      const q0 = (e.center[0] - y[0]) / box.width[0], q1 = (e.center[1] - y[1]) / box.width[1];
      const heading = (v0 * q0 + v1 * q1) / (Math.hypot(v0, v1) * Math.hypot(q0, q1) || 1);
      if (d < ALGEBRAIC_NEAR && heading > ALGEBRAIC_HEADING && (!h || d < h.last)) {
        const count = (h?.count ?? 0) + 1;
        nearHistory.set(e.id, { last: d, count });
        if (count >= ALGEBRAIC_STEPS || d < 1e-12) {
          fate = { kind: "equilibrium", target: e.id, t: t1, approach: "algebraic" };
          return false;
        }
      } else nearHistory.delete(e.id);
    }
    if (options.detectRecurrence) {
      for (const ray of ctx.rays) {
        const before = prev[1] - ray.center[1];
        const after = y[1] - ray.center[1];
        // crossings of the ray {second state = centre, first state > centre}, kept apart by sense
        const sense = before > 0 && after <= 0 ? -1 : before < 0 && after >= 0 ? 1 : 0;
        if (sense !== 0) {
          const hit = locate(dense, t0, t1, (x) => sense * (x[1] - ray.center[1]) >= 0);
          if (hit.x[0] <= ray.center[0]) continue;
          const r = (hit.x[0] - ray.center[0]) / box.width[0];
          const key = `${ray.id}${sense}`;
          const list = crossings.get(key) ?? [];
          list.push({ t: hit.t, r, x: hit.x });
          crossings.set(key, list);
          const n = list.length;
          if (n >= 2 && r > RECURRENCE_MIN_RADIUS && Math.abs(r - list[n - 2].r) < RECURRENCE_TOL) {
            recurrence = { around: ray.id, sense, point: hit.x, period: hit.t - list[n - 2].t, t: hit.t };
            return false;
          }
        }
      }
    }
    prev[0] = y[0]; prev[1] = y[1];
    return true;
  };

  let evaluations = 0;
  if (!fate) {
    const outcome = integrateFlow(model.rhs, start, options.horizon, {
      direction: ctx.direction,
      tolerances: ctx.tolerances,
      maxStep: options.maxStep ?? options.horizon / 64,
      maxSteps: options.maxSteps ?? 200_000,
      onStep,
    });
    evaluations = outcome.evaluations;
    if (!fate && !recurrence) {
      const finalExit = exit as FollowResult["exit"];
      if (outcome.status === "non-finite") {
        fate = finalExit
          ? { kind: "left-window", t: finalExit.t, point: rec(finalExit.point), edge: finalExit.edge }
          : { kind: "undecided", t: outcome.tEnd, reason: "the right-hand side became non-finite" };
      } else if (finalExit) {
        fate = { kind: "left-window", t: finalExit.t, point: rec(finalExit.point), edge: finalExit.edge };
      } else if (outcome.status === "step-limit") {
        fate = { kind: "undecided", t: outcome.tEnd, reason: "the integrator's step limit was reached" };
      } else {
        const slowRecurrence = findSlowRecurrence(crossings);
        if (slowRecurrence) recurrence = slowRecurrence;
        else fate = { kind: "undecided", t: outcome.tEnd, reason: "no equilibrium or periodic orbit was reached by the horizon" };
      }
    }
  }
  if (recurrence && !fate) fate = { kind: "undecided", t: (recurrence as Recurrence).t, reason: "recurrent: periodic-orbit candidate" };
  return { fate: fate!, recurrence, path: thinPath(path, options.maxPathPoints), exit, steps, evaluations };
}

/** At the horizon: crossings whose gaps shrink steadily point at a slowly attracting cycle. */
function findSlowRecurrence(crossings: Map<string, { t: number; r: number; x: [number, number] }[]>): Recurrence | null {
  for (const [key, list] of crossings) {
    const n = list.length;
    if (n < 4) continue;
    const g1 = Math.abs(list[n - 1].r - list[n - 2].r);
    const g2 = Math.abs(list[n - 2].r - list[n - 3].r);
    const g3 = Math.abs(list[n - 3].r - list[n - 4].r);
    if (list[n - 1].r > RECURRENCE_MIN_RADIUS && g1 < g2 && g2 < g3) {
      const sense = key.endsWith("-1") ? -1 : 1;
      return { around: key.slice(0, key.length - (sense === -1 ? 2 : 1)), sense, point: list[n - 1].x, period: list[n - 1].t - list[n - 2].t, t: list[n - 1].t };
    }
  }
  return null;
}

/** At most maxPoints of a path, evenly by index, first and last kept. */
export function thinPath(path: TrajectoryPath, maxPoints: number): TrajectoryPath {
  const n = path.t.length;
  if (n <= maxPoints) return path;
  const keep = Array.from({ length: maxPoints }, (_, k) => Math.round((k * (n - 1)) / (maxPoints - 1)));
  return { t: keep.map((i) => path.t[i]), x: keep.map((i) => path.x[i]), y: keep.map((i) => path.y[i]) };
}

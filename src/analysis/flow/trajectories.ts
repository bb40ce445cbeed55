import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import { buildFlowContext, thinPath, type Fate, type FlowContext, type TrajectoryPath } from "./follow.js";
import { integrateFlow } from "../numeric/integrate.js";
import { CycleRegistry, followToFate } from "./registry.js";
import type { Box, WindowEdge } from "../numeric/window.js";
import { MAX_STEP_OF_HORIZON, SCENARIO_PATH_POINTS, TRAJECTORY_MAX_STEPS } from "../constants.js";

export { CycleRegistry, followToFate, settleFate } from "./registry.js";

export interface ScenarioResult {
  name: string;
  start: Record<string, number>;
  end: Record<string, number>;
  tEnd: number;
  horizon: number;
  fate: Fate;
  /** The step points of the integration (thinned past maxPathPoints). */
  path: TrajectoryPath;
  /** Dense-output time series on an even grid, for plotting against time. */
  series: TrajectoryPath;
  exit: { t: number; point: Record<string, number>; edge: WindowEdge } | null;
  steps: number;
}

export interface PortraitTrajectory {
  seed: string;
  direction: "forward" | "backward";
  start: Record<string, number>;
  fate: Fate;
  path: TrajectoryPath;
}

export interface TrajectoryOptions {
  /** Path points kept per trajectory. */
  maxPathPoints: number;
  /** Points in each scenario's evenly spaced time series. */
  seriesPoints: number;
  /** Portrait seeds per window edge. */
  seedsPerEdge: number;
  /** Seeds on a small circle around each unstable (forward) or stable-focus (backward) equilibrium. */
  seedsAroundEquilibrium: number;
  /** Radius of that circle, as a fraction of the window. */
  seedRadius: number;
}

function recordOf(model: Model, x: ArrayLike<number>): Record<string, number> {
  return { [model.stateNames[0]]: x[0], [model.stateNames[1]]: x[1] };
}

/**
 * The time series on an even grid of [0, tEnd], read from the integrator's dense output by
 * integrating the scenario a second time with the same tolerances and step cap, so the steps
 * repeat those of the first pass. Linear interpolation between step points is not enough: odex
 * takes long steps, and the chord strays from the curve by percents (logistic growth: 6 %).
 * Grid times the second pass does not reach (it can stop early where the right-hand side turns
 * non-finite) fall back to the chord.
 */
function denseSeries(
  model: Model,
  ctx: FlowContext,
  start: [number, number],
  path: TrajectoryPath,
  horizon: number,
  points: number,
): TrajectoryPath {
  const chord = evenSeries(path, points);
  const tEnd = path.t[path.t.length - 1];
  if (points < 2 || !(tEnd > 0)) return chord;
  const out: TrajectoryPath = { t: [0], x: [start[0]], y: [start[1]] };
  integrateFlow(model.rhs, start, tEnd, {
    direction: ctx.direction,
    tolerances: ctx.tolerances,
    maxStep: horizon * MAX_STEP_OF_HORIZON,
    maxSteps: TRAJECTORY_MAX_STEPS,
    jacobian: model.jacobianAt,
    onStep: ({ t1, dense }) => {
      for (let i = out.t.length; i < points && chord.t[i] <= t1; i++) {
        out.t.push(chord.t[i]);
        out.x.push(dense(0, chord.t[i]));
        out.y.push(dense(1, chord.t[i]));
      }
      return out.t.length < points;
    },
  });
  for (let i = out.t.length; i < points; i++) {
    out.t.push(chord.t[i]);
    out.x.push(chord.x[i]);
    out.y.push(chord.y[i]);
  }
  return out;
}

/** Resamples a path on an even time grid by linear interpolation between step points. */
function evenSeries(path: TrajectoryPath, points: number): TrajectoryPath {
  const tEnd = path.t[path.t.length - 1];
  const out: TrajectoryPath = { t: [], x: [], y: [] };
  let k = 0;
  for (let i = 0; i < points; i++) {
    const t = points === 1 ? 0 : (tEnd * i) / (points - 1);
    while (k < path.t.length - 2 && path.t[k + 1] < t) k++;
    const t0 = path.t[k],
      t1 = path.t[Math.min(k + 1, path.t.length - 1)];
    const w = t1 > t0 ? (t - t0) / (t1 - t0) : 0;
    out.t.push(t);
    out.x.push(path.x[k] + w * (path.x[Math.min(k + 1, path.t.length - 1)] - path.x[k]));
    out.y.push(path.y[k] + w * (path.y[Math.min(k + 1, path.t.length - 1)] - path.y[k]));
  }
  return out;
}

/** Each scenario, integrated forward to its horizon or until its fate is decided. */
export function integrateScenarios(
  model: Model,
  ctx: FlowContext,
  registry: CycleRegistry,
  options: TrajectoryOptions,
): ScenarioResult[] {
  return model.spec.scenarios.map((sc) => {
    const start: [number, number] = [sc.initial[model.stateNames[0]], sc.initial[model.stateNames[1]]];
    const follow = followToFate(
      ctx,
      start,
      { horizon: sc.horizon, maxPathPoints: SCENARIO_PATH_POINTS, detectRecurrence: true },
      registry,
    );
    const fate = follow.fate;
    // the path and time series show the scenario's horizon; a fate decided later is still its fate
    const full = clipPath(follow.path, sc.horizon);
    // the fate is decided; the time series still runs to the horizon so a reader sees the approach
    const clipped = full.t.length < follow.path.t.length;
    if (
      (clipped || fate.kind === "equilibrium" || fate.kind === "cycle") &&
      full.t[full.t.length - 1] < sc.horizon
    ) {
      extendToHorizon(model, ctx, full, sc.horizon);
    }
    const last = full.t.length - 1;
    return {
      name: sc.name,
      start: recordOf(model, start),
      end: recordOf(model, [full.x[last], full.y[last]]),
      tEnd: full.t[last],
      horizon: sc.horizon,
      fate,
      path: thinPath(full, options.maxPathPoints),
      series: denseSeries(model, ctx, start, full, sc.horizon, options.seriesPoints),
      exit: follow.exit
        ? { t: follow.exit.t, point: recordOf(model, follow.exit.point), edge: follow.exit.edge }
        : null,
      steps: follow.steps,
    };
  });
}

/** The step points of a path up to time `horizon`. */
function clipPath(path: TrajectoryPath, horizon: number): TrajectoryPath {
  const n = path.t.findIndex((t) => t > horizon);
  return n < 0 ? path : { t: path.t.slice(0, n), x: path.x.slice(0, n), y: path.y.slice(0, n) };
}

function extendToHorizon(model: Model, ctx: FlowContext, path: TrajectoryPath, horizon: number): void {
  const k = path.t.length - 1;
  const t0 = path.t[k];
  integrateFlow(model.rhs, [path.x[k], path.y[k]], horizon - t0, {
    direction: 1,
    tolerances: ctx.tolerances,
    maxStep: horizon * MAX_STEP_OF_HORIZON,
    maxSteps: TRAJECTORY_MAX_STEPS,
    jacobian: model.jacobianAt,
    onStep: ({ t1, y }) => {
      path.t.push(t0 + t1);
      path.x.push(y[0]);
      path.y.push(y[1]);
    },
  });
}

/** A time scale of the flow: the inverse of the slowest non-zero eigenvalue real part. */
export function flowTimeScale(equilibria: EquilibriumResult[]): number {
  let slowest = Infinity;
  for (const e of equilibria)
    for (const ev of e.eigenvalues) {
      const rate = Math.hypot(ev.re, ev.im);
      if (rate > 0) slowest = Math.min(slowest, Math.abs(ev.re) > 0 ? Math.abs(ev.re) : rate);
    }
  return Number.isFinite(slowest) ? 1 / slowest : 1;
}

/**
 * Deterministic extra trajectories for the portrait: forward from evenly spaced points on each
 * window edge and from a small circle around each repelling equilibrium; backward from a small
 * circle around each stable focus (finds unstable cycles around it).
 */
export function integratePortrait(
  model: Model,
  equilibria: EquilibriumResult[],
  box: Box,
  registry: CycleRegistry,
  options: TrajectoryOptions,
  horizon: number,
  diagnostics: Diagnostic[],
  singularPoints: { id: string; point: Record<string, number> }[] = [],
): PortraitTrajectory[] {
  const forward = buildFlowContext(model, equilibria, box, 1, singularPoints);
  const backward = buildFlowContext(model, equilibria, box, -1, singularPoints);
  const seeds: { seed: string; ctx: FlowContext; x: [number, number] }[] = [];
  const n = options.seedsPerEdge;
  for (let k = 0; k < n; k++) {
    const s = (k + 0.5) / n;
    const a = box.lo[0] + s * box.width[0];
    const b = box.lo[1] + s * box.width[1];
    seeds.push(
      { seed: `edge ${model.stateNames[1]}=lo #${k + 1}`, ctx: forward, x: [a, box.lo[1]] },
      { seed: `edge ${model.stateNames[1]}=hi #${k + 1}`, ctx: forward, x: [a, box.hi[1]] },
      { seed: `edge ${model.stateNames[0]}=lo #${k + 1}`, ctx: forward, x: [box.lo[0], b] },
      { seed: `edge ${model.stateNames[0]}=hi #${k + 1}`, ctx: forward, x: [box.hi[0], b] },
    );
  }
  for (const e of equilibria) {
    const repelling = e.stable === false && e.type !== "saddle";
    const stableFocus = e.type === "stable-focus";
    if (!repelling && !stableFocus) continue;
    const c: [number, number] = [e.point[model.stateNames[0]], e.point[model.stateNames[1]]];
    for (let k = 0; k < options.seedsAroundEquilibrium; k++) {
      const th = (2 * Math.PI * (k + 0.25)) / options.seedsAroundEquilibrium;
      const x: [number, number] = [
        c[0] + options.seedRadius * box.width[0] * Math.cos(th),
        c[1] + options.seedRadius * box.width[1] * Math.sin(th),
      ];
      if (x[0] < box.lo[0] || x[0] > box.hi[0] || x[1] < box.lo[1] || x[1] > box.hi[1]) continue;
      seeds.push({
        seed: `${repelling ? "around" : "backward around"} ${e.id} #${k + 1}`,
        ctx: repelling ? forward : backward,
        x,
      });
    }
  }
  const out: PortraitTrajectory[] = [];
  for (const s of seeds) {
    const follow = followToFate(
      s.ctx,
      s.x,
      { horizon, maxPathPoints: options.maxPathPoints, detectRecurrence: true },
      registry,
      true, // one cycle per family of closed orbits in the portrait (scenarios keep their own)
    );
    const fate = follow.fate;
    out.push({
      seed: s.seed,
      direction: s.ctx.direction === 1 ? "forward" : "backward",
      start: recordOf(model, s.x),
      fate,
      path: follow.path,
    });
  }
  const undecided = out.filter((t) => t.fate.kind === "undecided").length;
  if (undecided)
    diagnostics.push({
      severity: "info",
      stage: "trajectories",
      code: "undecided-trajectories",
      data: { undecided, total: out.length, horizon },
    });
  return out;
}

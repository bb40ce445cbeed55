import { isCaptured } from "./capture.js";
import type { FlowContext } from "./context.js";
import { integrateFlow, type IntegrationResult, type StepInfo } from "../numeric/integrate.js";
import type { WindowEdge } from "../numeric/window.js";
import { firstExit, type ExitSide } from "../numeric/excursion.js";
import { bisectPredicate } from "../numeric/roots.js";
import { scaledDistance, segmentDistance } from "../numeric/distance.js";
import { solve2 } from "../numeric/linear.js";
import {
  continueAlgebraicRun,
  hasArrived,
  isBlowUp,
  isFarOutside,
  outsideBy,
  type AlgebraicRun,
} from "./rules.js";
import {
  ARRIVAL_DISTANCE,
  EVENT_BISECTION_STEPS,
  MAX_STEP_OF_HORIZON,
  RECURRENCE_MIN_RADIUS,
  RECURRENCE_TOL,
  SADDLE_NEAR,
  SADDLE_UNSTABLE_FRACTION,
  SLOW_RECURRENCE_CROSSINGS,
  TRAJECTORY_MAX_STEPS,
  WINDOW_EXIT_SLACK,
  SINGULAR_ARRIVAL_DISTANCE,
} from "../constants.js";

export { buildFlowContext, type FlowContext } from "./context.js";

/**
 * Following one trajectory and deciding its fate by the rules of rules.ts, tried in their order
 * at every accepted step: a non-finite right-hand side, a blow-up, an exit from the feasible
 * region (also between steps), a capture region, a saddle's stable manifold, an algebraic
 * approach, a known cycle's capture, recurrence through an equilibrium's ray (a periodic-orbit
 * candidate, confirmed by the caller by shooting). The trajectory is followed inside the
 * feasible region, out of the window and back if it goes so; past the region's edge the
 * integration goes on only to tell a blow-up from a plain exit.
 *
 * "left-window" (the kind's name is fixed by the results contract) is leaving the feasible
 * region: `edge` is the state bound crossed first ({ state, value: its min or max }), `bound`
 * says which of the two; where the window reaches that bound, it is also the window's edge.
 */
export type Fate =
  | { kind: "equilibrium"; target: string; t: number; approach: "linear" | "stable-manifold" | "algebraic" }
  | { kind: "cycle"; target: string; t: number }
  | { kind: "left-window"; t: number; point: Record<string, number>; edge: WindowEdge; bound: "min" | "max" }
  | { kind: "blow-up"; t: number; point: Record<string, number> }
  | { kind: "undecided"; t: number; reason: UndecidedReason; singularity?: string };

/** Why a trajectory's fate stayed undecided; report/words/fates.ts words each code. */
export type UndecidedReason =
  | "non-finite-rhs"
  | "step-limit"
  | "horizon"
  | "recurrent-candidate"
  | "no-periodic-orbit"
  /** It ran into a singular point, where the field is not defined: the equations do not say what follows. */
  | "singular-point";

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

/** Where and when a trajectory left the feasible region, and through which state bound. */
export interface WindowExit {
  t: number;
  point: [number, number];
  edge: WindowEdge;
  bound: "min" | "max";
}

export interface FollowResult {
  fate: Fate;
  /** Present when the trajectory recurs through a section: the caller confirms a cycle. */
  recurrence: Recurrence | null;
  path: TrajectoryPath;
  /** The exit from the feasible region, when the trajectory left it (also when it then blew up). */
  exit: WindowExit | null;
  steps: number;
  evaluations: number;
}

export interface FollowOptions {
  horizon: number;
  /** Path points kept: every step up to this count, then thinned evenly. */
  maxPathPoints: number;
  /** Look for recurrence through equilibrium rays (cycle candidates). */
  detectRecurrence: boolean;
  maxSteps?: number;
  /** Largest step the integrator may take (default horizon · MAX_STEP_OF_HORIZON): curves drawn from the step points need it small. */
  maxStep?: number;
}

interface Crossing {
  t: number;
  /** Scaled distance of the crossing from the ray's equilibrium. */
  r: number;
  x: [number, number];
}

/** The crossings of one equilibrium's ray in one sense, in time order. */
interface RayCrossings {
  around: string;
  sense: 1 | -1;
  crossings: Crossing[];
}

/** Bisection on the dense interpolant for the first time in [t0, t1] where pred turns true. */
function locate(
  dense: StepInfo["dense"],
  t0: number,
  t1: number,
  pred: (x: [number, number]) => boolean,
): { t: number; x: [number, number] } {
  const { hi } = bisectPredicate(t0, t1, (m) => pred([dense(0, m), dense(1, m)]), EVENT_BISECTION_STEPS);
  return { t: hi, x: [dense(0, hi), dense(1, hi)] };
}

/** The state of one trajectory being followed; step() applies the fate rules at each accepted step. */
class TrajectoryFollower {
  readonly path: TrajectoryPath;
  fate: Fate | null = null;
  recurrence: Recurrence | null = null;
  exit: WindowExit | null = null;
  steps = 0;
  /** Runs of steps closing in on each non-hyperbolic equilibrium, by id. */
  private readonly runs = new Map<string, AlgebraicRun>();
  /** Ray crossings, in the order each (ray, sense) was first crossed. */
  private readonly rays: RayCrossings[] = [];
  private readonly prev: [number, number];
  private readonly f = new Float64Array(2);

  constructor(
    private readonly ctx: FlowContext,
    start: readonly [number, number],
    private readonly detectRecurrence: boolean,
  ) {
    this.path = { t: [0], x: [start[0]], y: [start[1]] };
    this.prev = [start[0], start[1]];
    // a start already inside a capture region has arrived (the last region that holds it)
    for (const region of ctx.captures) {
      if (isCaptured(region, start, ctx.box))
        this.fate = { kind: "equilibrium", target: region.equilibrium, t: 0, approach: "linear" };
    }
  }

  private record(x: ArrayLike<number>): Record<string, number> {
    const names = this.ctx.model.stateNames;
    return { [names[0]]: x[0], [names[1]]: x[1] };
  }

  /** One accepted step; false stops the integration. */
  step(info: StepInfo): boolean {
    const { t1, y } = info;
    const { bounds, box } = this.ctx;
    this.steps++;
    this.path.t.push(t1);
    this.path.x.push(y[0]);
    this.path.y.push(y[1]);
    if (!this.exit && this.reachesSingularPoint(t1, y)) return false;
    if (!this.exit) this.exit = this.findExit(info);
    if (isFarOutside(outsideBy(bounds, y, box.width))) {
      this.testBlowUp(t1, y);
      return false; // else the fate is the exit, in settle()
    }
    if (
      !this.exit &&
      (this.captured(t1, y) ||
        this.onStableManifold(t1, y) ||
        this.approachedAlgebraically(t1, y) ||
        this.recurs(info))
    ) {
      return false;
    }
    // outside: integrate on only to tell blow-up from exit
    this.prev[0] = y[0];
    this.prev[1] = y[1];
    return true;
  }

  /**
   * Rule 3: the first time in the step the dense output passes a bound of the feasible region
   * by more than the slack (an excursion between the step points included), or null.
   */
  private findExit({ t0, t1, y, dense }: StepInfo): WindowExit | null {
    const { bounds, box, model } = this.ctx;
    let first: { s: number; k: number; side: ExitSide } | null = null;
    for (let k = 0; k < 2; k++) {
      const slack = WINDOW_EXIT_SLACK * box.width[k];
      // the end point is the integrator's own; the dense output only fills in between
      const at = (s: number) => (s === 1 ? y[k] : dense(k, t0 + s * (t1 - t0)));
      const hit = firstExit(at, bounds.lo[k] - slack, bounds.hi[k] + slack);
      if (hit && (!first || hit.s < first.s)) first = { ...hit, k };
    }
    if (!first) return null;
    const { s, k, side } = first;
    const t = t0 + s * (t1 - t0);
    return {
      t,
      point: s === 1 ? [y[0], y[1]] : [dense(0, t), dense(1, t)],
      edge: { state: model.stateNames[k], value: side === "lo" ? bounds.lo[k] : bounds.hi[k] },
      bound: side === "lo" ? "min" : "max",
    };
  }

  /** Rule 2: an e-folding time short against the time since the exit. */
  private testBlowUp(t1: number, y: number[]): void {
    const { model, box } = this.ctx;
    model.rhs(y, this.f);
    // scaled by the window, as every overshoot; the exit is from the feasible region
    const eFolding =
      Math.hypot(y[0] / box.width[0], y[1] / box.width[1]) /
      Math.hypot(this.f[0] / box.width[0], this.f[1] / box.width[1]);
    if (isBlowUp(eFolding, t1 - this.exit!.t)) this.fate = { kind: "blow-up", t: t1, point: this.record(y) };
  }

  /** Rule 4. */
  private captured(t1: number, y: number[]): boolean {
    const region = this.ctx.captures.find((r) => isCaptured(r, y, this.ctx.box));
    if (region) this.fate = { kind: "equilibrium", target: region.equilibrium, t: t1, approach: "linear" };
    return region !== undefined;
  }

  /** Rule 5: near a saddle, the component along its unstable direction negligible. */
  private onStableManifold(t1: number, y: number[]): boolean {
    const box = this.ctx.box;
    for (const s of this.ctx.saddles) {
      const d = scaledDistance(y, s.center, box.width);
      if (d >= SADDLE_NEAR) continue;
      // components in the eigenbasis (scaled): solve [vs vu] [α β]ᵀ = z
      const z0 = (y[0] - s.center[0]) / box.width[0],
        z1 = (y[1] - s.center[1]) / box.width[1];
      const beta = solve2(s.stable[0], s.unstable[0], s.stable[1], s.unstable[1], z0, z1)?.[1] ?? NaN;
      if (Math.abs(beta) <= SADDLE_UNSTABLE_FRACTION * d || d < ARRIVAL_DISTANCE) {
        this.fate = { kind: "equilibrium", target: s.id, t: t1, approach: "stable-manifold" };
        return true;
      }
    }
    return false;
  }

  /**
   * Rule 0: the step passes within SINGULAR_ARRIVAL_DISTANCE (scaled) of a singular point: the
   * field has no value there, so the trajectory cannot be followed through it (integrating on
   * would cross the singular set and report what the formula does beyond it, such as a blow-up).
   */
  private reachesSingularPoint(t1: number, y: number[]): boolean {
    for (const s of this.ctx.singularPoints) {
      if (segmentDistance(s.center, this.prev, y, this.ctx.box.width).d > SINGULAR_ARRIVAL_DISTANCE) continue;
      this.fate = { kind: "undecided", t: t1, reason: "singular-point", singularity: s.id };
      return true;
    }
    return false;
  }

  /** Rule 6: heading at a non-hyperbolic equilibrium (cosine of velocity and direction to it, scaled) and closing in. */
  private approachedAlgebraically(t1: number, y: number[]): boolean {
    const { model, box, direction } = this.ctx;
    for (const e of this.ctx.nonHyperbolic) {
      const d = scaledDistance(y, e.center, box.width);
      model.rhs(y, this.f);
      const v0 = (direction * this.f[0]) / box.width[0],
        v1 = (direction * this.f[1]) / box.width[1];
      const q0 = (e.center[0] - y[0]) / box.width[0],
        q1 = (e.center[1] - y[1]) / box.width[1];
      const heading = (v0 * q0 + v1 * q1) / (Math.hypot(v0, v1) * Math.hypot(q0, q1) || 1);
      const run = continueAlgebraicRun(this.runs.get(e.id) ?? null, d, heading);
      if (!run) {
        this.runs.delete(e.id);
        continue;
      }
      this.runs.set(e.id, run);
      if (hasArrived(run.count, d)) {
        this.fate = { kind: "equilibrium", target: e.id, t: t1, approach: "algebraic" };
        return true;
      }
    }
    return false;
  }

  /** Rule 7: crossings of the ray {second state = centre, first state > centre}, kept apart by sense; one inside a known stable cycle's capture ends there. */
  private recurs({ t0, t1, y, dense }: StepInfo): boolean {
    if (!this.detectRecurrence) return false;
    const box = this.ctx.box;
    for (const ray of this.ctx.rays) {
      const before = this.prev[1] - ray.center[1];
      const after = y[1] - ray.center[1];
      const sense = before > 0 && after <= 0 ? -1 : before < 0 && after >= 0 ? 1 : 0;
      if (sense === 0) continue;
      const hit = locate(dense, t0, t1, (x) => sense * (x[1] - ray.center[1]) >= 0);
      if (hit.x[0] <= ray.center[0]) continue;
      const r = (hit.x[0] - ray.center[0]) / box.width[0];
      const forward = sense * this.ctx.direction;
      const known = this.ctx.cycleCaptures.find(
        (c) => c.around === ray.id && c.sense === forward && r >= c.radii[0] && r <= c.radii[1],
      );
      if (known) {
        this.fate = { kind: "cycle", target: known.id, t: hit.t };
        return true;
      }
      const list = this.crossingsOf(ray.id, sense);
      list.push({ t: hit.t, r, x: hit.x });
      const n = list.length;
      if (n >= 2 && r > RECURRENCE_MIN_RADIUS && Math.abs(r - list[n - 2].r) < RECURRENCE_TOL) {
        this.recurrence = { around: ray.id, sense, point: hit.x, period: hit.t - list[n - 2].t, t: hit.t };
        return true;
      }
    }
    return false;
  }

  private crossingsOf(around: string, sense: 1 | -1): Crossing[] {
    let entry = this.rays.find((c) => c.around === around && c.sense === sense);
    if (!entry) {
      entry = { around, sense, crossings: [] };
      this.rays.push(entry);
    }
    return entry.crossings;
  }

  /** Rules 1 and 8, after the integration stopped without a decision at a step: a window exit comes first. */
  settle(integration: IntegrationResult): void {
    if (this.fate || this.recurrence) return;
    const exit = this.exit;
    if (exit) {
      this.fate = {
        kind: "left-window",
        t: exit.t,
        point: this.record(exit.point),
        edge: exit.edge,
        bound: exit.bound,
      };
    } else if (integration.status === "non-finite") {
      this.fate = { kind: "undecided", t: integration.tEnd, reason: "non-finite-rhs" };
    } else if (integration.status === "step-limit") {
      this.fate = {
        kind: "undecided",
        t: integration.tEnd,
        reason: "step-limit",
      };
    } else {
      this.recurrence = findSlowRecurrence(this.rays);
      if (!this.recurrence)
        this.fate = {
          kind: "undecided",
          t: integration.tEnd,
          reason: "horizon",
        };
    }
  }
}

/** Follows one trajectory from `start` (state coordinates) in the context's time direction. */
export function followTrajectory(
  ctx: FlowContext,
  start: readonly [number, number],
  options: FollowOptions,
): FollowResult {
  const follower = new TrajectoryFollower(ctx, start, options.detectRecurrence);
  let evaluations = 0;
  if (!follower.fate) {
    const integration = integrateFlow(ctx.model.rhs, start, options.horizon, {
      direction: ctx.direction,
      tolerances: ctx.tolerances,
      maxStep: options.maxStep ?? options.horizon * MAX_STEP_OF_HORIZON,
      maxSteps: options.maxSteps ?? TRAJECTORY_MAX_STEPS,
      jacobian: ctx.model.jacobianAt,
      onStep: (info) => follower.step(info),
    });
    evaluations = integration.evaluations;
    follower.settle(integration);
  }
  const { recurrence, exit, steps } = follower;
  const fate = follower.fate ?? {
    kind: "undecided",
    t: recurrence!.t,
    reason: "recurrent-candidate",
  };
  return { fate, recurrence, path: thinPath(follower.path, options.maxPathPoints), exit, steps, evaluations };
}

/** At the horizon: crossings whose gaps shrink steadily point at a slowly attracting cycle. */
function findSlowRecurrence(rays: RayCrossings[]): Recurrence | null {
  for (const { around, sense, crossings: list } of rays) {
    const n = list.length;
    if (n < SLOW_RECURRENCE_CROSSINGS) continue;
    const g1 = Math.abs(list[n - 1].r - list[n - 2].r);
    const g2 = Math.abs(list[n - 2].r - list[n - 3].r);
    const g3 = Math.abs(list[n - 3].r - list[n - 4].r);
    if (list[n - 1].r > RECURRENCE_MIN_RADIUS && g1 < g2 && g2 < g3) {
      return { around, sense, point: list[n - 1].x, period: list[n - 1].t - list[n - 2].t, t: list[n - 1].t };
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

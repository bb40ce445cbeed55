import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { Box } from "../numeric/window.js";
import {
  sameCycle,
  solvePeriodicOrbit,
  type CycleRejection,
  type CycleResult,
  type OrbitSolution,
} from "./cycles.js";
import { findCycleCapture, inCapture } from "./cycle-capture.js";
import { scanSection } from "./scan.js";
import {
  followTrajectory,
  thinPath,
  type Fate,
  type FlowContext,
  type FollowOptions,
  type FollowResult,
} from "./follow.js";
import { FATE_EXTENSION_MAX_STEPS, FATE_HORIZON_DOUBLINGS } from "../constants.js";

export interface CycleRegistryOptions {
  /** Probe each new stable cycle's capture on its section (later trajectories and the basin map use it) ... */
  captures: boolean;
  /** ... and each new neutral cycle's family (the basin map uses it). */
  families: boolean;
}

/** A recurrence confirmed as a known or new cycle, or the reason it is not one. */
export type Resolution = { ok: true; id: string } | { ok: false; reason: CycleRejection };

/** Registry of solved periodic orbits, filled in a fixed order so ids are deterministic. */
export class CycleRegistry {
  readonly cycles: CycleResult[] = [];
  constructor(
    private readonly model: Model,
    private readonly box: Box,
    private readonly options: CycleRegistryOptions = { captures: true, families: true },
  ) {}

  private centerOf(e: EquilibriumResult): [number, number] {
    return [e.point[this.model.stateNames[0]], e.point[this.model.stateNames[1]]];
  }

  /** A solved orbit as a known cycle's id, or a new one (its capture probed once, or taken from its family). */
  private register(
    solution: Extract<OrbitSolution, { ok: true }>,
    center: [number, number],
    direction: 1 | -1,
  ): string {
    const { cycle, rStar } = solution;
    const names = this.model.stateNames;
    const known = this.cycles.find((c) => sameCycle(c, cycle, this.box, names));
    if (known) return known.id;
    const family = this.cycles.find(
      (c) =>
        cycle.stability === "neutral" &&
        c.capture?.kind === "family" &&
        inCapture(c, cycle.around, cycle.section.sense, rStar),
    );
    const probe = cycle.stability === "neutral" ? this.options.families : this.options.captures;
    const capture = family
      ? family.capture
      : probe
        ? findCycleCapture(this.model, this.box, cycle, center, rStar, direction)
        : null;
    const id = `C${this.cycles.length + 1}`;
    this.cycles.push({ id, ...cycle, capture });
    return id;
  }

  /** The section scan around each focus and centre (scan.ts): the cycle search the nominal analysis and every outcome share. */
  scanSections(equilibria: EquilibriumResult[]): void {
    for (const e of equilibria) {
      for (const solution of scanSection(this.model, this.box, e)) {
        if (solution.ok) this.register(solution, this.centerOf(e), 1);
      }
    }
  }

  /** Rule 7's known cycles for a flow context: the attracting captures so far (forward time only). */
  capturesFor(direction: 1 | -1): FlowContext["cycleCaptures"] {
    if (direction !== 1) return [];
    return this.cycles.flatMap((c) =>
      c.capture?.kind === "attracting"
        ? [{ id: c.id, around: c.around, sense: c.section.sense, radii: c.capture.radii }]
        : [],
    );
  }

  /**
   * Confirms a recurrence by shooting, unless it lies in a known stable cycle's capture, or (with
   * `shareFamilies`) in a known family of closed orbits: then it is that family's first cycle.
   */
  resolve(ctx: FlowContext, follow: FollowResult, shareFamilies = false): Resolution | null {
    const rec = follow.recurrence;
    if (!rec) return null;
    const around = ctx.equilibria.find((e) => e.id === rec.around);
    if (!around) return null;
    const center = this.centerOf(around);
    const r = (rec.point[0] - center[0]) / this.box.width[0];
    const sense = (rec.sense * ctx.direction) as 1 | -1;
    const captured = this.cycles.find(
      (c) =>
        ((ctx.direction === 1 && c.capture?.kind === "attracting") ||
          (shareFamilies && c.capture?.kind === "family")) &&
        inCapture(c, rec.around, sense, r),
    );
    if (captured) return { ok: true, id: captured.id };
    const solved = solvePeriodicOrbit(this.model, this.box, rec, center, ctx.direction);
    if (!solved.ok) return solved;
    return { ok: true, id: this.register(solved, center, ctx.direction) };
  }
}

/** Turns a raw follow result into a final fate, confirming a recurrence by shooting (no extension: see followToFate). */
export function settleFate(ctx: FlowContext, follow: FollowResult, registry: CycleRegistry): Fate {
  const resolution = registry.resolve(ctx, follow);
  if (!resolution) return follow.fate;
  if (resolution.ok) return { kind: "cycle", target: resolution.id, t: follow.recurrence!.t };
  return { kind: "undecided", t: follow.recurrence!.t, reason: "no-periodic-orbit" };
}

/** A fate `offset` later. */
function shifted(fate: Fate, offset: number): Fate {
  return { ...fate, t: fate.t + offset };
}

/** One stretch of a trajectory followed on: where it starts (time offset) and what was found. */
interface Stretch {
  offset: number;
  length: number;
  follow: FollowResult;
}

/** The stretches' paths joined in time, thinned to maxPoints. */
function joinPaths(stretches: Stretch[], maxPoints: number): FollowResult["path"] {
  const path: FollowResult["path"] = { t: [], x: [], y: [] };
  stretches.forEach(({ offset, follow }, k) => {
    const p = follow.path;
    for (let i = k === 0 ? 0 : 1; i < p.t.length; i++) {
      path.t.push(offset + p.t[i]);
      path.x.push(p.x[i]);
      path.y.push(p.y[i]);
    }
  });
  return thinPath(path, maxPoints);
}

/**
 * Follows a trajectory to its fate, settling recurrences as cycles, and follows it on where that
 * does not decide it: a candidate that is not a periodic orbit (a slow spiral into a focus) is
 * followed to the end of its stretch without recurrence detection, and a trajectory undecided at
 * the horizon is followed for another stretch, each twice the last, FATE_HORIZON_DOUBLINGS times
 * within FATE_EXTENSION_MAX_STEPS steps. The fate's time counts from the start; the path joins
 * every stretch. With `shareFamilies`, a closed orbit of a known family ends at that family's
 * first cycle rather than being solved as a cycle of its own.
 */
export function followToFate(
  ctx: FlowContext,
  start: readonly [number, number],
  options: FollowOptions,
  registry: CycleRegistry,
  shareFamilies = false,
): FollowResult {
  ctx = { ...ctx, cycleCaptures: registry.capturesFor(ctx.direction) };
  const stretches: Stretch[] = [
    { offset: 0, length: options.horizon, follow: followTrajectory(ctx, start, options) },
  ];
  let rejected = false;
  let doublings = 0;
  let stepsLeft = FATE_EXTENSION_MAX_STEPS;
  let fate: Fate | null = null;
  for (;;) {
    const last = stretches[stretches.length - 1];
    const resolution = registry.resolve(ctx, last.follow, shareFamilies);
    if (resolution?.ok) {
      fate = { kind: "cycle", target: resolution.id, t: last.offset + last.follow.recurrence!.t };
      break;
    }
    if (resolution) rejected = true;
    else if (last.follow.fate.kind !== "undecided" || last.follow.fate.reason !== "horizon") {
      fate = shifted(last.follow.fate, last.offset);
      break;
    }
    const p = last.follow.path;
    const k = p.t.length - 1;
    const tEnd = p.t[k];
    // a rejected candidate short of its stretch's end: finish the stretch; else a longer one
    const finishing = resolution !== null && tEnd < last.length;
    if (!finishing && (doublings >= FATE_HORIZON_DOUBLINGS || stepsLeft <= 0)) break;
    const length = finishing ? last.length - tEnd : options.horizon * 2 ** doublings++;
    const follow = followTrajectory(ctx, [p.x[k], p.y[k]], {
      ...options,
      horizon: length,
      maxStep: options.maxStep,
      maxSteps: stepsLeft,
      detectRecurrence: options.detectRecurrence && !finishing,
    });
    stepsLeft -= follow.steps;
    stretches.push({ offset: last.offset + tEnd, length, follow });
  }
  const last = stretches[stretches.length - 1];
  const tEnd = last.offset + last.follow.path.t[last.follow.path.t.length - 1];
  const exitStretch = stretches.find((s) => s.follow.exit);
  const exit = exitStretch
    ? { ...exitStretch.follow.exit!, t: exitStretch.offset + exitStretch.follow.exit!.t }
    : null;
  const undecided = last.follow.fate.kind === "undecided" ? last.follow.fate.reason : "horizon";
  return {
    fate: fate ?? { kind: "undecided", t: tEnd, reason: rejected ? "no-periodic-orbit" : undecided },
    recurrence: fate?.kind === "cycle" ? last.follow.recurrence : null,
    path: joinPaths(stretches, options.maxPathPoints),
    exit,
    steps: stretches.reduce((n, s) => n + s.follow.steps, 0),
    evaluations: stretches.reduce((n, s) => n + s.follow.evaluations, 0),
  };
}

import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { EquilibriumType } from "../phase/stability.js";
import type { CycleResult } from "../flow/cycles.js";
import { findEquilibria } from "../phase/equilibria.js";
import { buildFlowContext, followTrajectory, type FollowResult, type Fate } from "../flow/follow.js";
import { CycleRegistry, settleFate } from "../flow/trajectories.js";
import { windowOf, type Box } from "../numeric/window.js";
import {
  OUTCOME_EDGE_SAMPLES,
  OUTCOME_GRID_SIZE,
  OUTCOME_PATH_POINTS,
  SLOW_ARRIVAL_DISTANCE,
  SLOW_ARRIVAL_LATE_FRACTION,
} from "../constants.js";

/**
 * A stable equilibrium named by which states it keeps present (away from their lower bound, in
 * state order) and, when several share that pattern, its rank among them by the first state.
 * Node or focus does not matter: the outcome is the same population pattern either way.
 */
export interface EquilibriumAttractor {
  kind: "equilibrium";
  present: string[];
  /** 0-based position by the first state among the stable equilibria of the same pattern. */
  rank: { index: number; of: number };
}

/** A stable periodic orbit. */
export interface CycleAttractor {
  kind: "cycle";
}

export type AttractorResult = EquilibriumAttractor | CycleAttractor;

/** Where one scenario ends, for the purpose of telling outcomes apart. */
export type OutcomeFateResult =
  | { kind: "attractor"; attractor: EquilibriumAttractor }
  /** An equilibrium that is not an attractor (a saddle reached along its stable manifold, say). */
  | { kind: "equilibrium"; type: EquilibriumType; present: string[] }
  | { kind: "cycle"; stability: CycleResult["stability"] | null }
  | { kind: "left-window"; state: string }
  /** exitState: the state whose edge it crossed before blowing up, if it left the window first. */
  | { kind: "blow-up"; exitState: string | null }
  | { kind: "undecided" };

/**
 * The outcome at one parameter point: the attractors (each once, in key order) and every
 * scenario's fate. Two points have the same outcome when their outcome keys are equal.
 */
export interface OutcomeResult {
  attractors: AttractorResult[];
  scenarios: { name: string; fate: OutcomeFateResult }[];
}

/**
 * Where a rank places an attractor. The lowest and the highest of a pattern are the same
 * attractor however many lie between them; only the middle ones carry their position.
 */
export function rankPlace(rank: { index: number; of: number }): "only" | "lowest" | "highest" | "middle" {
  if (rank.of === 1) return "only";
  if (rank.index === 0) return "lowest";
  return rank.index === rank.of - 1 ? "highest" : "middle";
}

export function attractorKey(a: AttractorResult): string {
  if (a.kind === "cycle") return "cycle";
  const place = rankPlace(a.rank);
  return `equilibrium(${a.present.join(",")})${place === "middle" ? `${a.rank.index + 1}/${a.rank.of}` : place}`;
}

function fateKey(f: OutcomeFateResult): string {
  switch (f.kind) {
    case "attractor":
      return `attractor ${attractorKey(f.attractor)}`;
    case "equilibrium":
      return `equilibrium ${f.type}(${f.present.join(",")})`;
    case "cycle":
      return `cycle ${f.stability ?? ""}`;
    case "left-window":
      return `left-window ${f.state}`;
    case "blow-up":
      return `blow-up ${f.exitState ?? ""}`;
    case "undecided":
      return "undecided";
  }
}

/** The canonical identity of an outcome: equal keys, equal outcomes (the attractors as a set, the fates in scenario order). */
export function outcomeKey(o: OutcomeResult): string {
  const attractors = [...new Set(o.attractors.map(attractorKey))].sort();
  return JSON.stringify([attractors, o.scenarios.map((s) => fateKey(s.fate))]);
}

export const sameOutcome = (a: OutcomeResult, b: OutcomeResult) => outcomeKey(a) === outcomeKey(b);

/** The states an equilibrium keeps away from their lower bound, in state order. */
export function presentStates(model: Model, e: EquilibriumResult): string[] {
  return model.spec.states.filter((s) => e.point[s.name] !== s.min).map((s) => s.name);
}

/** Each stable equilibrium as an attractor: its pattern, and its rank by the first state within the pattern. */
function equilibriumAttractors(model: Model, stable: EquilibriumResult[]): Map<string, EquilibriumAttractor> {
  const groups = new Map<string, EquilibriumResult[]>();
  for (const e of stable) {
    const key = presentStates(model, e).join(",");
    groups.set(key, [...(groups.get(key) ?? []), e]);
  }
  const first = model.spec.states[0].name;
  const named = new Map<string, EquilibriumAttractor>();
  for (const list of groups.values()) {
    list.sort((a, b) => a.point[first] - b.point[first]);
    list.forEach((e, index) =>
      named.set(e.id, {
        kind: "equilibrium",
        present: presentStates(model, e),
        rank: { index, of: list.length },
      }),
    );
  }
  return named;
}

interface FateContext {
  model: Model;
  box: Box;
  equilibria: EquilibriumResult[];
  stable: EquilibriumResult[];
  named: Map<string, EquilibriumAttractor>;
  registry: CycleRegistry;
}

/**
 * Near a threshold the approach slows down: an undecided trajectory ending close to a stable
 * equilibrium at the horizon goes there, for the purpose of naming the outcome.
 */
function slowArrival(c: FateContext, follow: FollowResult, fate: Fate): Fate {
  if (fate.kind !== "undecided" || !c.stable.length) return fate;
  const [s0, s1] = c.model.stateNames;
  const k = follow.path.t.length - 1;
  const late = Math.floor(SLOW_ARRIVAL_LATE_FRACTION * k);
  const dist = (e: EquilibriumResult, i: number) =>
    Math.hypot(
      (e.point[s0] - follow.path.x[i]) / c.box.width[0],
      (e.point[s1] - follow.path.y[i]) / c.box.width[1],
    );
  const near = [...c.stable].sort((a, b) => dist(a, k) - dist(b, k))[0];
  if (dist(near, k) < SLOW_ARRIVAL_DISTANCE || dist(near, k) < dist(near, late))
    return { kind: "equilibrium", target: near.id, t: follow.path.t[k], approach: "linear" };
  return fate;
}

function outcomeFate(c: FateContext, follow: FollowResult, fate: Fate): OutcomeFateResult {
  switch (fate.kind) {
    case "equilibrium": {
      const attractor = c.named.get(fate.target);
      if (attractor) return { kind: "attractor", attractor };
      const e = c.equilibria.find((q) => q.id === fate.target)!;
      return { kind: "equilibrium", type: e.type, present: presentStates(c.model, e) };
    }
    case "cycle":
      return {
        kind: "cycle",
        stability: c.registry.cycles.find((q) => q.id === fate.target)?.stability ?? null,
      };
    case "left-window":
      return { kind: "left-window", state: fate.edge.state };
    // a blow-up after an exit (a population driven through 0) is told by where it left, as for manifolds
    case "blow-up":
      return { kind: "blow-up", exitState: follow.exit ? follow.exit.edge.state : null };
    case "undecided":
      return { kind: "undecided" };
  }
}

/** Every attractor once, in key order. */
function distinctAttractors(list: AttractorResult[]): AttractorResult[] {
  const byKey = new Map(list.map((a) => [attractorKey(a), a]));
  return [...byKey.keys()].sort().map((k) => byKey.get(k)!);
}

/**
 * Outcome of `model` (already bound to the parameter values of interest). With scenarios, each
 * scenario is followed to its fate; attractor-only outcomes (for maps) skip that.
 */
export function classifyOutcome(model: Model, withScenarios: boolean): OutcomeResult {
  const equilibria = findEquilibria(model, {
    gridSize: OUTCOME_GRID_SIZE,
    edgeSamples: OUTCOME_EDGE_SAMPLES,
  });
  const stable = equilibria.filter((e) => e.stable === true);
  const named = equilibriumAttractors(model, stable);
  const attractors: AttractorResult[] = stable.map((e) => named.get(e.id)!);
  const scenarios: OutcomeResult["scenarios"] = [];
  if (withScenarios && model.spec.scenarios.length) {
    const box = windowOf(model);
    const context: FateContext = {
      model,
      box,
      equilibria,
      stable,
      named,
      registry: new CycleRegistry(model, box),
    };
    const flow = buildFlowContext(model, equilibria, box, 1);
    for (const sc of model.spec.scenarios) {
      const start: [number, number] = [sc.initial[model.stateNames[0]], sc.initial[model.stateNames[1]]];
      const follow = followTrajectory(flow, start, {
        horizon: sc.horizon,
        maxPathPoints: OUTCOME_PATH_POINTS,
        detectRecurrence: true,
      });
      const fate = slowArrival(context, follow, settleFate(flow, follow, context.registry));
      scenarios.push({ name: sc.name, fate: outcomeFate(context, follow, fate) });
    }
    for (const c of context.registry.cycles) if (c.stability === "stable") attractors.push({ kind: "cycle" });
  }
  return { attractors: distinctAttractors(attractors), scenarios };
}

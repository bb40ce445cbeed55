import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { EquilibriumType } from "../phase/stability.js";
import type { CycleResult } from "../flow/cycles.js";
import { findEquilibriumCandidates } from "../phase/equilibria.js";
import { buildFlowContext, type FollowResult, type Fate, type UndecidedReason } from "../flow/follow.js";
import { CycleRegistry, followToFate } from "../flow/trajectories.js";
import { windowOf, type Box } from "../numeric/window.js";
import { DEFAULT_EQUILIBRIUM_OPTIONS, OUTCOME_PATH_POINTS } from "../constants.js";

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
  /** A blow-up inside the window; one after a window exit is that exit (left-window). */
  | { kind: "blow-up" }
  /** Not decided within the scenario's horizon or step budget, or by the rules: never a break by itself. */
  | { kind: "undecided"; reason: UndecidedReason };

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
      return "blow-up";
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

const attractorSetKey = (o: OutcomeResult) =>
  JSON.stringify([...new Set(o.attractors.map(attractorKey))].sort());

/**
 * How two outcomes differ: not at all; by a break (other attractors, or a scenario decided on
 * both sides with different fates); or only where a fate is undecided on one side, which is a
 * limit of what was decided and never a break.
 */
export function outcomeChange(a: OutcomeResult, b: OutcomeResult): "same" | "break" | "undecided" {
  if (outcomeKey(a) === outcomeKey(b)) return "same";
  if (attractorSetKey(a) !== attractorSetKey(b)) return "break";
  const switched = a.scenarios.some((s, k) => {
    const f = s.fate,
      g = b.scenarios[k].fate;
    return f.kind !== "undecided" && g.kind !== "undecided" && fateKey(f) !== fateKey(g);
  });
  return switched ? "break" : "undecided";
}

/** The undecided fates' scenarios and reasons of either outcome, each once, in scenario order. */
export function undecidedFates(
  ...outcomes: OutcomeResult[]
): { scenario: string; reason: UndecidedReason }[] {
  const out: { scenario: string; reason: UndecidedReason }[] = [];
  for (let k = 0; k < (outcomes[0]?.scenarios.length ?? 0); k++) {
    const fate = outcomes.map((o) => o.scenarios[k].fate).find((f) => f.kind === "undecided");
    if (fate?.kind === "undecided")
      out.push({ scenario: outcomes[0].scenarios[k].name, reason: fate.reason });
  }
  return out;
}

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
    // a blow-up after an exit (a population driven through 0) is told by where it left, as for
    // manifolds: whether it blows up before the horizon or not is the horizon's doing, not a break
    case "blow-up":
      return follow.exit ? { kind: "left-window", state: follow.exit.edge.state } : { kind: "blow-up" };
    case "undecided":
      return { kind: "undecided", reason: fate.reason };
  }
}

/** Every attractor once, in key order. */
function distinctAttractors(list: AttractorResult[]): AttractorResult[] {
  const byKey = new Map(list.map((a) => [attractorKey(a), a]));
  return [...byKey.keys()].sort().map((k) => byKey.get(k)!);
}

/**
 * Outcome of `model` (already bound to the parameter values of interest). With scenarios, each
 * scenario is followed to its fate; attractor-only outcomes (for maps) skip that. Everything is
 * decided as at the nominal values: the same equilibrium search, fate rules, tolerances and
 * horizons, so an outcome anywhere in a range means what the nominal one means.
 */
export function classifyOutcome(model: Model, withScenarios: boolean): OutcomeResult {
  const { equilibria, singular } = findEquilibriumCandidates(model, DEFAULT_EQUILIBRIUM_OPTIONS);
  // the singular points the search met (ids only tell them apart here)
  const singularPoints = singular.map((s, k) => ({ id: `X${k + 1}`, point: s.point }));
  const stable = equilibria.filter((e) => e.stable === true);
  const named = equilibriumAttractors(model, stable);
  const attractors: AttractorResult[] = stable.map((e) => named.get(e.id)!);
  const scenarios: OutcomeResult["scenarios"] = [];
  const box = windowOf(model);
  // the cycle search of the nominal analysis (section scan around every focus), in both modes;
  // the cycles' captures serve only to settle the scenarios' fates
  const registry = new CycleRegistry(model, box, { captures: withScenarios, families: false });
  registry.scanSections(equilibria);
  if (withScenarios && model.spec.scenarios.length) {
    const context: FateContext = { model, box, equilibria, stable, named, registry };
    const flow = buildFlowContext(model, equilibria, box, 1, singularPoints);
    for (const sc of model.spec.scenarios) {
      const start: [number, number] = [sc.initial[model.stateNames[0]], sc.initial[model.stateNames[1]]];
      const follow = followToFate(
        flow,
        start,
        { horizon: sc.horizon, maxPathPoints: OUTCOME_PATH_POINTS, detectRecurrence: true },
        registry,
      );
      scenarios.push({ name: sc.name, fate: outcomeFate(context, follow, follow.fate) });
    }
  }
  for (const c of registry.cycles) if (c.stability === "stable") attractors.push({ kind: "cycle" });
  return { attractors: distinctAttractors(attractors), scenarios };
}

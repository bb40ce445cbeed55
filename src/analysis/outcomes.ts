import type { Model } from "../model/types.js";
import type { EquilibriumResult } from "./equilibria.js";
import { findEquilibria } from "./equilibria.js";
import { buildFlowContext, followTrajectory } from "./flow.js";
import { CycleRegistry, settleFate } from "./trajectories.js";
import { windowOf } from "./window.js";

/**
 * The qualitative outcome at one parameter point: which attractors exist (described by which
 * populations are present) and where each scenario ends. Two points have the same outcome when
 * their signatures are equal.
 */
export interface OutcomeResult {
  signature: string;
  /** One phrase per attractor, e.g. "stable equilibrium with N and S present". */
  attractors: string[];
  /** Per scenario: a short description of its fate. */
  scenarios: { name: string; fate: string }[];
  words: string;
}

/** Faster equilibrium search for outcome sampling: a coarser multistart grid (edges are still searched finely). */
const OUTCOME_GRID = 8;

function presence(model: Model, e: EquilibriumResult): string {
  const states = model.spec.states;
  const present = states.filter((s) => e.point[s.name] !== s.min).map((s) => s.label || s.name);
  const absent = states.filter((s) => e.point[s.name] === s.min).map((s) => s.label || s.name);
  if (absent.length === 0) return `${present.join(" and ")} all present`;
  if (present.length === 0) return `${absent.join(" and ")} all absent`;
  return `${present.join(" and ")} present, ${absent.join(" and ")} absent`;
}

export function describeEquilibrium(model: Model, e: EquilibriumResult): string {
  return `${e.type.replace(/-/g, " ")} with ${presence(model, e)}`;
}

/**
 * Outcome of `model` (already bound to the parameter values of interest). With scenarios, each
 * scenario is followed to its fate; attractor-only outcomes (for maps) skip that.
 */
export function classifyOutcome(model: Model, withScenarios: boolean, fineEquilibria = false): OutcomeResult {
  const equilibria = findEquilibria(model, { gridSize: fineEquilibria ? 16 : OUTCOME_GRID, edgeSamples: 400 });
  const stable = equilibria.filter((e) => e.stable === true);
  const attractors = stable.map((e) => `stable equilibrium (${describeEquilibrium(model, e)})`);
  const scenarios: OutcomeResult["scenarios"] = [];
  if (withScenarios && model.spec.scenarios.length) {
    const box = windowOf(model);
    const ctx = buildFlowContext(model, equilibria, box, 1);
    const registry = new CycleRegistry(model, box);
    for (const sc of model.spec.scenarios) {
      const start: [number, number] = [sc.initial[model.stateNames[0]], sc.initial[model.stateNames[1]]];
      const follow = followTrajectory(ctx, start, { horizon: sc.horizon, maxPathPoints: 2, detectRecurrence: true });
      const fate = settleFate(ctx, follow, registry);
      let words: string;
      if (fate.kind === "equilibrium") {
        const e = equilibria.find((q) => q.id === fate.target)!;
        words = `goes to a ${describeEquilibrium(model, e)}`;
      } else if (fate.kind === "cycle") {
        const c = registry.cycles.find((q) => q.id === fate.target);
        words = `settles on a ${c?.stability ?? ""} periodic orbit`;
      } else if (fate.kind === "left-window") words = `leaves the window through ${fate.edge.split(" = ")[0]}`;
      else if (fate.kind === "blow-up") words = "blows up";
      else words = "is undecided";
      scenarios.push({ name: sc.name, fate: words });
    }
    for (const c of registry.cycles) if (c.stability === "stable") attractors.push("stable periodic orbit");
  }
  const uniqueAttractors = [...new Set(attractors)].sort();
  const signature = JSON.stringify({ a: uniqueAttractors, s: scenarios.map((s) => s.fate) });
  const words = uniqueAttractors.length === 0
    ? "no attractor inside the window"
    : uniqueAttractors.length === 1 ? `one attractor: ${uniqueAttractors[0]}` : `${uniqueAttractors.length} attractors: ${uniqueAttractors.join("; ")}`;
  return { signature, attractors: uniqueAttractors, scenarios, words };
}

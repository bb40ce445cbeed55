import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import { findEquilibria } from "../phase/equilibria.js";
import { buildFlowContext, followTrajectory } from "../flow/follow.js";
import { CycleRegistry, settleFate } from "../flow/trajectories.js";
import { windowOf } from "../numeric/window.js";

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

/**
 * An undecided trajectory ending this close (scaled) to a stable equilibrium, or having halved
 * its distance to it over the last quarter of the horizon, is counted as arriving there: near a
 * threshold the approach slows down, and the outcome is still that equilibrium.
 */
const SLOW_ARRIVAL_DISTANCE = 0.02;

/** Faster equilibrium search for outcome sampling: a coarser multistart grid (edges are still searched finely). */
const OUTCOME_GRID = 8;

/** Which populations an equilibrium keeps: "coexistence", "S only", or "all absent". */
function presence(model: Model, e: EquilibriumResult): string {
  const states = model.spec.states;
  const present = states.filter((s) => e.point[s.name] !== s.min).map((s) => s.name);
  if (present.length === states.length) return "coexistence";
  if (present.length === 0) return "all absent";
  return `${present.join(" and ")} only`;
}

export function describeEquilibrium(model: Model, e: EquilibriumResult): string {
  return `${e.type.replace(/-/g, " ")} with ${presence(model, e)}`;
}

/**
 * Names for the stable equilibria that do not depend on node-versus-focus detail: the pattern
 * of present and absent populations, ranked by the first state where several share a pattern.
 */
function attractorNames(model: Model, stable: EquilibriumResult[]): Map<string, string> {
  const names = new Map<string, string>();
  const groups = new Map<string, EquilibriumResult[]>();
  for (const e of stable) {
    const key = presence(model, e);
    groups.set(key, [...(groups.get(key) ?? []), e]);
  }
  const first = model.spec.states[0];
  for (const [key, list] of groups) {
    list.sort((a, b) => a.point[first.name] - b.point[first.name]);
    list.forEach((e, k) => {
      const rank = list.length === 1 ? "" : k === 0 ? ` at lower ${first.name}` : k === list.length - 1 ? ` at higher ${first.name}` : ` (${k + 1} of ${list.length} by ${first.name})`;
      names.set(e.id, `${key}${rank}`);
    });
  }
  return names;
}

/**
 * Outcome of `model` (already bound to the parameter values of interest). With scenarios, each
 * scenario is followed to its fate; attractor-only outcomes (for maps) skip that.
 */
export function classifyOutcome(model: Model, withScenarios: boolean, fineEquilibria = false): OutcomeResult {
  const equilibria = findEquilibria(model, { gridSize: fineEquilibria ? 16 : OUTCOME_GRID, edgeSamples: 400 });
  const stable = equilibria.filter((e) => e.stable === true);
  const named = attractorNames(model, stable);
  const attractors = stable.map((e) => named.get(e.id)!);
  const scenarios: OutcomeResult["scenarios"] = [];
  if (withScenarios && model.spec.scenarios.length) {
    const box = windowOf(model);
    const ctx = buildFlowContext(model, equilibria, box, 1);
    const registry = new CycleRegistry(model, box);
    for (const sc of model.spec.scenarios) {
      const start: [number, number] = [sc.initial[model.stateNames[0]], sc.initial[model.stateNames[1]]];
      const follow = followTrajectory(ctx, start, { horizon: sc.horizon, maxPathPoints: 16, detectRecurrence: true });
      let fate = settleFate(ctx, follow, registry);
      // near a threshold the approach slows down; a trajectory ending close to a stable
      // equilibrium at the horizon goes there, for the purpose of naming the outcome
      if (fate.kind === "undecided" && stable.length) {
        const k = follow.path.t.length - 1;
        const late = Math.floor(0.75 * k);
        const dist = (e: EquilibriumResult, i: number) => Math.hypot((e.point[model.stateNames[0]] - follow.path.x[i]) / box.width[0], (e.point[model.stateNames[1]] - follow.path.y[i]) / box.width[1]);
        const near = [...stable].sort((a, b) => dist(a, k) - dist(b, k))[0];
        if (dist(near, k) < SLOW_ARRIVAL_DISTANCE || dist(near, k) < dist(near, late)) fate = { kind: "equilibrium", target: near.id, t: follow.path.t[k], approach: "linear" };
      }
      let words: string;
      if (fate.kind === "equilibrium") {
        const target = fate.target;
        const e = equilibria.find((q) => q.id === target)!;
        words = named.has(target) ? `reaches ${named.get(target)}` : `reaches a ${describeEquilibrium(model, e)}`;
      } else if (fate.kind === "cycle") {
        const c = registry.cycles.find((q) => q.id === fate.target);
        words = `settles on a ${c?.stability ?? ""} cycle`;
      } else if (fate.kind === "left-window") words = `leaves the window through ${fate.edge.split(" = ")[0]}`;
      // a blow-up after an exit (a population driven through 0) is told by where it left, as for manifolds
      else if (fate.kind === "blow-up") words = follow.exit ? `leaves the window through ${follow.exit.edge.split(" = ")[0]} and then blows up` : "blows up";
      else words = "is undecided";
      scenarios.push({ name: sc.name, fate: words });
    }
    for (const c of registry.cycles) if (c.stability === "stable") attractors.push("a stable cycle");
  }
  const uniqueAttractors = [...new Set(attractors)].sort();
  const signature = JSON.stringify({ a: uniqueAttractors, s: scenarios.map((s) => s.fate) });
  const head = uniqueAttractors.length === 0
    ? "no attractor inside the window"
    : uniqueAttractors.length === 1 ? `one attractor (${uniqueAttractors[0]})` : `${uniqueAttractors.length} attractors (${uniqueAttractors.join("; ")})`;
  const words = scenarios.length ? `${head}; ${scenarios.map((s) => `${s.name} ${s.fate}`).join(", ")}` : head;
  return { signature, attractors: uniqueAttractors, scenarios, words };
}

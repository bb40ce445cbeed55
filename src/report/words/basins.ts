import type { Results } from "../../analysis/types.js";
import { attractorIdWords } from "./fates.js";

/**
 * The basin map's labels that are no attractor, in words. A trajectory labelled so reached no
 * attractor inside the feasible region (it is followed there, out of the window and back):
 * they are no outcome of their own, and are listed apart.
 */
export const BASIN_OTHER_WORDS: Record<string, string> = {
  "left-window": "leaves the feasible region (no attractor reached inside it)",
  "blow-up": "grows without bound",
  undecided: "undecided (no attractor reached within the step budget)",
};

/**
 * The labels of the basin map the dossier lists as attractors: stable equilibria and stable
 * cycles, and any other equilibrium the map found trajectories converging to (slowly, as at a
 * non-hyperbolic one). One that attracts nothing, such as a center, is not listed.
 */
export function basinAttractors(results: Results): string[] {
  const b = results.basins;
  return b.attractors.filter((id) => {
    const e = results.equilibria.find((q) => q.id === id);
    if (e?.stable === true) return true;
    if (results.cycles.find((c) => c.id === id)?.stability === "stable") return true;
    return (b.fractions[id] ?? 0) > 0;
  });
}

/** A row of the basin table: an attractor, or the neutral family of closed orbits the map labelled. */
export function basinLabelWords(results: Results, id: string): string {
  if (results.singularities.some((s) => s.id === id))
    return `runs into the singular point ${id}, where the field is not defined: no attractor, the fate there is not decided`;
  const c = results.cycles.find((q) => q.id === id);
  if (c?.stability === "neutral")
    return `on a closed orbit of the family around ${c.around} (${id} is one of them): neutral, no attractor`;
  return attractorIdWords(results, id, "periodic orbit");
}

/** An attractor's (or neutral family's) entry in the basin figure's key: short. */
export function basinKeyWords(results: Results, id: string): string {
  if (results.singularities.some((s) => s.id === id)) return `runs into the singular point ${id}`;
  const c = results.cycles.find((q) => q.id === id);
  if (c?.stability === "neutral") return `closed orbits around ${c.around} (neutral, ${id} among them)`;
  return attractorIdWords(results, id, "cycle");
}

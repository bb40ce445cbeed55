import type { Results } from "../../analysis/types.js";

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

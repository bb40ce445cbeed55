import { formatNumber } from "../format.js";
import { BASIN_OTHER_WORDS, basinAttractors, basinLabelWords } from "../words/index.js";
import { gridSize, type ViewInput } from "./common.js";

const percent = (fraction: number) => formatNumber(100 * fraction, 4) + "%";

/** The basin shares of the attractors, what the rest of the window did, how the map was refined, and where each scenario starts. */
export function buildBasinsView({ results, figure }: ViewInput) {
  const b = results.basins;
  const share = formatNumber((100 * b.trajectories) / b.uniformTrajectories, 3);
  const attractors = basinAttractors(results);
  return {
    show: b.attractors.length > 0,
    rows: attractors.map((id) => ({
      outcome: basinLabelWords(results, id),
      fraction: percent(b.fractions[id] ?? 0),
    })),
    // labels that are no attractor, and only where the map found them
    others: Object.entries(b.fractions)
      .filter(([k, v]) => !b.attractors.includes(k) && v > 0)
      .map(([k, v]) => ({ what: BASIN_OTHER_WORDS[k] ?? k, fraction: percent(v) })),
    errorBound: formatNumber(100 * b.errorBound, 3) + "%",
    resolution: gridSize(b.resolution),
    trajectories: `${b.trajectories} trajectories were integrated instead of the ${b.uniformTrajectories} a uniform grid would need (${share}%)`,
    scenarios: results.scenarios.map((s) => ({
      name: s.name,
      reaches:
        s.fate.kind === "equilibrium" || s.fate.kind === "cycle"
          ? s.fate.target
          : (BASIN_OTHER_WORDS[s.fate.kind] ?? s.fate.kind),
    })),
    figure: figure("basins"),
  };
}

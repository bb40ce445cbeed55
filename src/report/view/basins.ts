import { formatNumber } from "../format.js";
import { attractorIdWords } from "../words/index.js";
import { gridSize, type ViewInput } from "./common.js";

/** The basin shares, how the map was refined, and which basin each scenario starts in. */
export function buildBasinsView({ results, figure }: ViewInput) {
  const b = results.basins;
  const share = formatNumber((100 * b.trajectories) / b.uniformTrajectories, 3);
  return {
    show: b.attractors.length > 0,
    rows: Object.entries(b.fractions).map(([k, v]) => ({
      outcome: attractorIdWords(results, k, "periodic orbit"),
      fraction: formatNumber(100 * v, 4) + "%",
    })),
    errorBound: formatNumber(100 * b.errorBound, 3) + "%",
    resolution: gridSize(b.resolution),
    trajectories: `${b.trajectories} trajectories were integrated instead of the ${b.uniformTrajectories} a uniform grid would need (${share}%)`,
    scenarios: results.scenarios.map((s) => ({
      name: s.name,
      reaches: s.fate.kind === "equilibrium" || s.fate.kind === "cycle" ? s.fate.target : s.fate.kind,
    })),
    figure: figure("basins"),
  };
}

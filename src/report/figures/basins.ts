import { decodeRuns } from "../../analysis/basins/refine.js";
import type { BasinResult, Results } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { formatPercent } from "../format.js";
import { basinAttractors, basinKeyWords } from "../words/index.js";
import { markerBox, portraitFrame } from "./geometry.js";
import { buildKey, type KeyEntry } from "./key.js";
import { keyedFigure, labelLayers, pathLayer, symbolLayer, type VegaLiteSpec } from "./layers.js";
import {
  cycleLayers,
  equilibriaInWindow,
  equilibriumKey,
  equilibriumRows,
  placeEquilibriumLabels,
  stateWindowEncoding,
} from "./marks.js";
import { LINE_STYLES, REGION_FILLS, SPECIAL_REGION_FILLS } from "./palette.js";
import { cellLayer, regionCellRows, swatch } from "./cells.js";

/**
 * The basin map: the labelled grid of results.basins as filled cells, with the saddles' stable
 * manifolds (the separatrices between basins), the periodic orbits and the equilibria over it.
 *
 * Size: a drawn cell is a rectangle in the SVG, so the grid is reduced to at most
 * BASIN_DRAW_MAX cells a side (each drawn cell takes the majority label of the block of computed
 * cells it covers), and each row's run of equal cells is drawn as one rectangle.
 */
export const BASIN_DRAW_MAX = 256;

/** The grid as drawn: legend indices, row-major from the lowest row of the second state. */
export interface DrawnBasinGrid {
  nx: number;
  ny: number;
  /** Computed cells per drawn cell, along each side. */
  factor: number;
  cells: Int32Array;
}

/** Decodes the grid and, when a side exceeds maxSide, takes the majority label of each factor × factor block (ties: the first in the legend). */
export function downsampleBasinGrid(grid: BasinResult["grid"], maxSide = BASIN_DRAW_MAX): DrawnBasinGrid {
  const full = decodeRuns(grid.runs, grid.nx * grid.ny);
  const factor = Math.max(1, Math.ceil(Math.max(grid.nx, grid.ny) / maxSide));
  if (factor === 1) return { nx: grid.nx, ny: grid.ny, factor, cells: full };
  const nx = Math.ceil(grid.nx / factor),
    ny = Math.ceil(grid.ny / factor);
  const cells = new Int32Array(nx * ny);
  const counts = new Int32Array(grid.legend.length);
  for (let J = 0; J < ny; J++) {
    for (let I = 0; I < nx; I++) {
      counts.fill(0);
      for (let j = J * factor; j < Math.min(grid.ny, (J + 1) * factor); j++) {
        for (let i = I * factor; i < Math.min(grid.nx, (I + 1) * factor); i++)
          counts[full[j * grid.nx + i]]++;
      }
      let best = 0;
      for (let k = 1; k < counts.length; k++) if (counts[k] > counts[best]) best = k;
      cells[J * nx + I] = best;
    }
  }
  return { nx, ny, factor, cells };
}

/** Fill of each legend entry: attractors in order from REGION_FILLS, the other outcomes in their greys. */
export function basinFills(basins: BasinResult): string[] {
  return basins.grid.legend.map((name, k) =>
    k < basins.attractors.length
      ? REGION_FILLS[k % REGION_FILLS.length]
      : (SPECIAL_REGION_FILLS[name] ?? SPECIAL_REGION_FILLS.undecided),
  );
}

const SPECIAL_WORDS: Record<string, string> = {
  "left-window": "leaves the feasible region",
  "blow-up": "grows without bound",
  undecided: "undecided",
};

export function buildBasinFigure(results: Results, spec: NormalizedSpec): VegaLiteSpec {
  const basins = results.basins;
  const frame = portraitFrame(results);
  const states = results.model.states.map((n) => spec.states.find((s) => s.name === n)!);
  const enc = stateWindowEncoding(frame, states);
  const fills = basinFills(basins);
  const drawn = downsampleBasinGrid(basins.grid);
  const layers: Record<string, unknown>[] = [
    cellLayer("cells", regionCellRows(frame, drawn, basins.grid.legend, fills), enc),
  ];
  // only attractors (a center the map could label but nothing reaches is none), and other labels where found
  const listed = basinAttractors(results);
  const key: KeyEntry[] = basins.grid.legend
    .map((name, k) => ({ name, k, fraction: basins.fractions[name] ?? 0 }))
    .filter(({ name, k, fraction }) => (k < basins.attractors.length ? listed.includes(name) : fraction > 0))
    .map(({ name, k, fraction }): KeyEntry => {
      const what =
        k < basins.attractors.length ? basinKeyWords(results, name) : (SPECIAL_WORDS[name] ?? name);
      return { kind: "symbol", marker: swatch(fills[k], `${what}: ${formatPercent(fraction)}`) };
    });

  const stable = pathLayer(
    "stable_manifolds",
    frame,
    results.separatrices
      .filter((s) => s.manifold === "stable")
      .map((s) => ({ key: `${s.saddle}${s.side}`, line: s.path })),
    LINE_STYLES.stableManifold,
    enc,
    "catmull-rom",
  );
  if (stable) {
    layers.push(stable);
    key.push({ kind: "line", style: LINE_STYLES.stableManifold });
  }
  const cycles = cycleLayers(frame, results.cycles, enc);
  layers.push(...cycles.layers);
  key.push(...cycles.key);

  const inside = equilibriaInWindow(frame, results.equilibria, results.model.states);
  const eqRows = equilibriumRows(inside, results.model.states);
  if (eqRows.length) layers.push(symbolLayer("equilibria", eqRows, enc));
  const occupied = eqRows.map((r) => markerBox(frame, r.x, r.y));
  const labels = placeEquilibriumLabels(
    frame,
    eqRows.map((r) => ({ x: r.x, y: r.y, text: r.what })),
    occupied,
  );
  layers.push(...labelLayers("equilibrium_labels", labels, enc, { fontWeight: "bold" }));
  key.push(...equilibriumKey(inside));
  return keyedFigure(
    { width: frame.width, height: frame.height, layer: layers },
    buildKey(key, frame.height),
  );
}

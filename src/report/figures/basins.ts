import { decodeRuns } from "../../analysis/basins/refine.js";
import type { BasinResult, Results } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { formatPercent } from "../format.js";
import { TYPE_WORDS } from "../words.js";
import { textWidthPx } from "../render/textWidth.js";
import { markerBox, placeLabels, roundData, type PlotFrame } from "./geometry.js";
import { buildKey, type KeyEntry } from "./key.js";
import { labelLayers, lineLayer, pathRows, positionEncoding, stateAxisTitle, symbolLayer, symbolRow, type VegaLiteSpec } from "./layers.js";
import {
  classifyForDrawing, EQUILIBRIUM_CLASSES, EQUILIBRIUM_MARKERS, figureConfig, FONT_SIZE, FRAME, LINE_STYLES, REGION_FILLS,
  SPECIAL_REGION_FILLS, SWATCH_PATH, SWATCH_SIZE, type MarkerStyle,
} from "./palette.js";
import { portraitFrame } from "./portrait.js";

/**
 * The basin map: the labelled grid of results.basins as filled cells, with the saddles' stable
 * manifolds (the separatrices between basins), the periodic orbits and the equilibria over it.
 *
 * Size: a drawn cell is a rectangle in the SVG, so the grid is reduced to at most
 * BASIN_DRAW_MAX cells a side (each drawn cell takes the majority label of the block of computed
 * cells it covers), and each row's run of equal cells is drawn as one rectangle.
 */
export const BASIN_DRAW_MAX = 256;
/**
 * Drawn rectangles reach this far (px) into the next row and run, which are drawn later and
 * cover the overlap: abutting edges at fractional pixels otherwise leave anti-aliased hairlines
 * of paper between cells. A whole pixel, so the pixel under every shared edge is fully covered.
 */
const SEAM_OVERLAP_PX = 1;

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
  const nx = Math.ceil(grid.nx / factor), ny = Math.ceil(grid.ny / factor);
  const cells = new Int32Array(nx * ny);
  const counts = new Int32Array(grid.legend.length);
  for (let J = 0; J < ny; J++) {
    for (let I = 0; I < nx; I++) {
      counts.fill(0);
      for (let j = J * factor; j < Math.min(grid.ny, (J + 1) * factor); j++) {
        for (let i = I * factor; i < Math.min(grid.nx, (I + 1) * factor); i++) counts[full[j * grid.nx + i]]++;
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
    k < basins.attractors.length ? REGION_FILLS[k % REGION_FILLS.length] : SPECIAL_REGION_FILLS[name] ?? SPECIAL_REGION_FILLS.undecided);
}

const SPECIAL_WORDS: Record<string, string> = { "left-window": "leaves the window", "blow-up": "grows without bound", undecided: "undecided" };

/** What an attractor is, for the key: "E4 (stable node)", "C1 (stable cycle)". */
export function attractorWords(results: Results, id: string): string {
  const e = results.equilibria.find((q) => q.id === id);
  if (e) return `${id} (${TYPE_WORDS[e.type]})`;
  const c = results.cycles.find((q) => q.id === id);
  return c ? `${id} (${c.stability} cycle)` : id;
}

export interface CellRow { x: number; x2: number; y: number; y2: number; fill: string; what: string; cells: number }

/**
 * Rectangles for a labelled grid over the frame (row-major from the lowest row): one per run of
 * equal cells in a row, or with mergeRuns false one per cell.
 */
export function regionCellRows(
  frame: PlotFrame, grid: { nx: number; ny: number; cells: ArrayLike<number> }, legend: string[], fills: string[], mergeRuns = true,
): CellRow[] {
  const dx = (frame.hi[0] - frame.lo[0]) / grid.nx, dy = (frame.hi[1] - frame.lo[1]) / grid.ny;
  const ox = (SEAM_OVERLAP_PX / frame.width) * (frame.hi[0] - frame.lo[0]);
  const oy = (SEAM_OVERLAP_PX / frame.height) * (frame.hi[1] - frame.lo[1]);
  const rows: CellRow[] = [];
  for (let j = 0; j < grid.ny; j++) {
    let i0 = 0;
    for (let i = 1; i <= grid.nx; i++) {
      const v = grid.cells[j * grid.nx + i0];
      if (mergeRuns && i < grid.nx && grid.cells[j * grid.nx + i] === v) continue;
      rows.push({
        x: roundData(frame.lo[0] + i0 * dx),
        x2: roundData(i === grid.nx ? frame.hi[0] : frame.lo[0] + i * dx + ox),
        y: roundData(frame.lo[1] + j * dy),
        y2: roundData(j === grid.ny - 1 ? frame.hi[1] : frame.lo[1] + (j + 1) * dy + oy),
        fill: fills[v],
        what: legend[v],
        cells: i - i0,
      });
      i0 = i;
    }
  }
  return rows;
}

/** The layer that draws regionCellRows: fills read from the rows, no stroke. */
export function cellLayer(name: string, rows: CellRow[], encoding: Record<string, unknown>) {
  return {
    name,
    data: { values: rows },
    mark: { type: "rect", strokeWidth: 0 },
    encoding: { ...encoding, x2: { field: "x2" }, y2: { field: "y2" }, fill: { field: "fill", type: "nominal", scale: null } },
  };
}

/** A fill's sample for the key. */
export const swatch = (fill: string, label: string): MarkerStyle => ({ shape: SWATCH_PATH, angle: 0, fill, stroke: FRAME, strokeWidth: 0.8, size: SWATCH_SIZE, label });

export function buildBasinFigure(results: Results, spec: NormalizedSpec): VegaLiteSpec {
  const basins = results.basins;
  const frame = portraitFrame(results);
  const [sa, sb] = results.model.states.map((n) => spec.states.find((s) => s.name === n)!);
  const enc = {
    x: positionEncoding("x", [frame.lo[0], frame.hi[0]], stateAxisTitle(sa), { tickCount: 4 }),
    y: positionEncoding("y", [frame.lo[1], frame.hi[1]], stateAxisTitle(sb), { tickCount: 6 }),
  };
  const fills = basinFills(basins);
  const drawn = downsampleBasinGrid(basins.grid);
  const layers: Record<string, unknown>[] = [cellLayer("cells", regionCellRows(frame, drawn, basins.grid.legend, fills), enc)];
  const key: KeyEntry[] = basins.grid.legend
    .map((name, k) => ({ name, k, fraction: basins.fractions[name] ?? 0 }))
    .filter(({ k, fraction }) => k < basins.attractors.length || fraction > 0)
    .map(({ name, k, fraction }): KeyEntry => {
      const what = k < basins.attractors.length ? attractorWords(results, name) : SPECIAL_WORDS[name] ?? name;
      return { kind: "symbol", marker: swatch(fills[k], `${what}: ${formatPercent(fraction)}`) };
    });

  const stable = pathRows(frame, results.separatrices.filter((s) => s.manifold === "stable").map((s) => ({ key: `${s.saddle}${s.branch}`, line: s.path })));
  if (stable.length) {
    layers.push(lineLayer("stable_manifolds", stable, LINE_STYLES.stableManifold, enc, "catmull-rom"));
    key.push({ kind: "line", style: LINE_STYLES.stableManifold });
  }
  for (const attracting of [true, false]) {
    const style = attracting ? LINE_STYLES.cycleStable : LINE_STYLES.cycleOther;
    const rows = pathRows(frame, results.cycles.filter((c) => (c.stability === "stable") === attracting).map((c) => ({ key: c.id, line: c.orbit })));
    if (rows.length) { layers.push(lineLayer(attracting ? "cycles_attracting" : "cycles_other", rows, style, enc)); key.push({ kind: "line", style }); }
  }

  const inside = results.equilibria.filter((e) => {
    const x = e.point[sa.name], y = e.point[sb.name];
    return x >= frame.lo[0] && x <= frame.hi[0] && y >= frame.lo[1] && y <= frame.hi[1];
  });
  const eqRows = inside.map((e) => symbolRow(e.point[sa.name], e.point[sb.name], EQUILIBRIUM_MARKERS[classifyForDrawing(e)], e.id));
  if (eqRows.length) layers.push(symbolLayer("equilibria", eqRows, enc));
  const occupied = eqRows.map((r) => markerBox(frame, r.x, r.y));
  const labels = placeLabels(frame, eqRows.map((r) => ({ x: r.x, y: r.y, text: r.what })), (t) => textWidthPx(t, FONT_SIZE.annotation, true), occupied);
  layers.push(...labelLayers("equilibrium_labels", labels, enc, { fontWeight: "bold" }));
  const classes = new Set(inside.map(classifyForDrawing));
  for (const c of EQUILIBRIUM_CLASSES) if (classes.has(c)) key.push({ kind: "symbol", marker: EQUILIBRIUM_MARKERS[c] });

  return {
    config: figureConfig(),
    padding: 6,
    hconcat: [{ width: frame.width, height: frame.height, layer: layers }, buildKey(key, frame.height)],
  };
}

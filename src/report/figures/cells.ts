import { roundData, type PlotFrame } from "./geometry.js";
import { FRAME, SWATCH_PATH, SWATCH_SIZE, type MarkerStyle } from "./palette.js";

/** Filled cells of a labelled grid over a plot frame, shared by the basin map and the outcome map. */

/**
 * Drawn rectangles reach this far (px) into the next row and run, which are drawn later and
 * cover the overlap: abutting edges at fractional pixels otherwise leave anti-aliased hairlines
 * of paper between cells. A whole pixel, so the pixel under every shared edge is fully covered.
 */
const SEAM_OVERLAP_PX = 1;

export interface CellRow {
  x: number;
  x2: number;
  y: number;
  y2: number;
  fill: string;
  what: string;
  cells: number;
}

/**
 * Rectangles for a labelled grid over the frame (row-major from the lowest row): one per run of
 * equal cells in a row, or with mergeRuns false one per cell.
 */
export function regionCellRows(
  frame: PlotFrame,
  grid: { nx: number; ny: number; cells: ArrayLike<number> },
  legend: string[],
  fills: string[],
  mergeRuns = true,
): CellRow[] {
  const dx = (frame.hi[0] - frame.lo[0]) / grid.nx,
    dy = (frame.hi[1] - frame.lo[1]) / grid.ny;
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
    encoding: {
      ...encoding,
      x2: { field: "x2" },
      y2: { field: "y2" },
      fill: { field: "fill", type: "nominal", scale: null },
    },
  };
}

/** A fill's sample for the key. */
export const swatch = (fill: string, label: string): MarkerStyle => ({
  shape: SWATCH_PATH,
  angle: 0,
  fill,
  stroke: FRAME,
  strokeWidth: 0.8,
  size: SWATCH_SIZE,
  label,
});

import type { Box } from "./window.js";

export interface LabelGridOptions {
  /** Effective resolution: cells per side of the finest grid. */
  resolution: number;
  /** Cells per side of the first, uniform pass; resolution / coarse must be a power of two. */
  coarse: number;
}

export interface LabelGrid {
  resolution: number;
  /** Row-major from the lowest row of the second coordinate. */
  labels: Int32Array;
  /** Points labelled (cell centres at all levels). */
  evaluations: number;
  /** Finest-level cells next to a differently labelled cell: each could belong to either side. */
  boundaryCells: number;
  /** Finest-level cells whose label is uncertain: boundary cells, cells a known curve crosses, and cells with the undecided label. */
  uncertainCells: number;
}

/** A known boundary between labels (a separatrix in the plane, a threshold curve in a parameter map), as a polyline. */
export interface BoundaryCurve {
  x: readonly number[];
  y: readonly number[];
}

/**
 * Adaptive refinement of a labelled grid over a box (the state window for basins, two parameter
 * ranges for outcome maps): label a coarse uniform grid by its cell centres, then split into four
 * only the cells that touch a differently labelled cell, level by level, down to the effective
 * resolution. Cost grows with the length of the boundaries rather than the area. Cells that a
 * known boundary curve crosses are split too, and count as uncertain at the finest level.
 * Otherwise a feature narrower than a coarse cell that no coarse centre samples can be missed:
 * the coarse grid sets the smallest such region guaranteed to be seen.
 *
 * A generator, so one implementation serves every driver: it yields each level's points and
 * receives their labels (computed in this thread, or on a worker pool).
 */
export function* refineLabelGrid(
  box: Box,
  options: LabelGridOptions,
  boundaries: readonly BoundaryCurve[] = [],
  undecidedLabel: number | null = null,
): Generator<Float64Array, LabelGrid, Int32Array> {
  const n = options.resolution;
  const levels = Math.round(Math.log2(n / options.coarse));
  if (options.coarse * 2 ** levels !== n)
    throw new Error(`grid resolution ${n} is not coarse ${options.coarse} times a power of two`);
  const labels = new Int32Array(n * n);
  const onBoundary = rasterizeCurves(box, n, boundaries);
  let evaluations = 0;
  // cells of the current level, as (i, j) of their lower-left fine cell, and their size in fine cells
  let cells: number[] = [];
  let size = n / options.coarse;
  for (let j = 0; j < options.coarse; j++)
    for (let i = 0; i < options.coarse; i++) cells.push(i * size, j * size);

  for (let level = 0; level <= levels; level++) {
    const count = cells.length / 2;
    const points = new Float64Array(2 * count);
    for (let k = 0; k < count; k++) {
      points[2 * k] = box.lo[0] + ((cells[2 * k] + size / 2) / n) * box.width[0];
      points[2 * k + 1] = box.lo[1] + ((cells[2 * k + 1] + size / 2) / n) * box.width[1];
    }
    const found: Int32Array = yield points;
    evaluations += count;
    for (let k = 0; k < count; k++) {
      const i0 = cells[2 * k],
        j0 = cells[2 * k + 1];
      for (let j = j0; j < j0 + size; j++) labels.fill(found[k], j * n + i0, j * n + i0 + size);
    }
    if (level === levels) break;
    const next: number[] = [];
    const half = size / 2;
    for (let k = 0; k < count; k++) {
      const i0 = cells[2 * k],
        j0 = cells[2 * k + 1];
      if (!touchesOtherLabel(labels, n, i0, j0, size) && !blockTouches(onBoundary, n, i0, j0, size)) continue;
      next.push(i0, j0, i0 + half, j0, i0, j0 + half, i0 + half, j0 + half);
    }
    cells = next;
    size = half;
    if (cells.length === 0) break;
  }
  let boundaryCells = 0,
    uncertainCells = 0;
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      const boundary = touchesOtherLabel(labels, n, i, j, 1);
      if (boundary) boundaryCells++;
      // a known boundary curve through a cell leaves its label open even where no neighbour differs
      if (boundary || onBoundary[j * n + i] === 1 || labels[j * n + i] === undecidedLabel) uncertainCells++;
    }
  return { resolution: n, labels, evaluations, boundaryCells, uncertainCells };
}

/**
 * The fine cells the curves pass through (1) as a mask. Each chord is walked in steps of a
 * quarter cell, so no cell it crosses is skipped; a region thinner than a coarse cell that hugs
 * such a curve (as a basin along an invariant axis, bounded by a separatrix) is then refined too.
 */
function rasterizeCurves(box: Box, n: number, curves: readonly BoundaryCurve[]): Uint8Array {
  const mask = new Uint8Array(n * n);
  for (const c of curves)
    for (let p = 0; p + 1 < c.x.length; p++) {
      const u0 = ((c.x[p] - box.lo[0]) / box.width[0]) * n,
        v0 = ((c.y[p] - box.lo[1]) / box.width[1]) * n;
      const u1 = ((c.x[p + 1] - box.lo[0]) / box.width[0]) * n,
        v1 = ((c.y[p + 1] - box.lo[1]) / box.width[1]) * n;
      const steps = Math.min(4 * n, Math.ceil(4 * Math.max(Math.abs(u1 - u0), Math.abs(v1 - v0))) + 1);
      for (let s = 0; s <= steps; s++) {
        const i = Math.floor(u0 + ((u1 - u0) * s) / steps),
          j = Math.floor(v0 + ((v1 - v0) * s) / steps);
        if (i >= 0 && i < n && j >= 0 && j < n) mask[j * n + i] = 1;
      }
    }
  return mask;
}

/** Whether a boundary curve passes through the block [i0, i0+size) × [j0, j0+size) or its 8-neighbourhood ring. */
function blockTouches(mask: Uint8Array, n: number, i0: number, j0: number, size: number): boolean {
  const iLo = Math.max(0, i0 - 1),
    iHi = Math.min(n - 1, i0 + size);
  const jLo = Math.max(0, j0 - 1),
    jHi = Math.min(n - 1, j0 + size);
  for (let j = jLo; j <= jHi; j++) for (let i = iLo; i <= iHi; i++) if (mask[j * n + i] === 1) return true;
  return false;
}

/** Whether the block [i0, i0+size) × [j0, j0+size) borders (8-neighbourhood) a cell with another label. */
function touchesOtherLabel(labels: Int32Array, n: number, i0: number, j0: number, size: number): boolean {
  const own = labels[j0 * n + i0];
  const iLo = Math.max(0, i0 - 1),
    iHi = Math.min(n - 1, i0 + size);
  const jLo = Math.max(0, j0 - 1),
    jHi = Math.min(n - 1, j0 + size);
  for (let j = jLo; j <= jHi; j++) {
    const inside = j >= j0 && j < j0 + size;
    for (let i = iLo; i <= iHi; i++) {
      if (inside && i >= i0 && i < i0 + size) continue;
      if (labels[j * n + i] !== own) return true;
    }
  }
  return false;
}

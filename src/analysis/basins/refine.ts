import type { Box } from "../numeric/window.js";
import { labelName, LABEL_UNDECIDED } from "./labels.js";

/** Labels a batch of starts (x0, y0, x1, y1, ...). Implementations may fan out to workers; labels depend only on each start. */
export type BatchEvaluator = (starts: Float64Array) => Promise<Int32Array>;
export type SyncBatchEvaluator = (starts: Float64Array) => Int32Array;

export interface BasinGridOptions {
  /** Effective resolution: cells per side of the finest grid. */
  resolution: number;
  /** Cells per side of the first, uniform pass; resolution / coarse must be a power of two. */
  coarse: number;
}

export interface BasinGrid {
  resolution: number;
  labels: Int32Array;
  /** Trajectories integrated. */
  trajectories: number;
  /** Finest-level cells next to a differently labelled cell: each could belong to either side. */
  boundaryCells: number;
  /** Finest-level cells whose label is uncertain: boundary cells and undecided cells (each could belong to any label). */
  uncertainCells: number;
}

/**
 * Adaptive refinement: label a coarse uniform grid by its cell centres, then split into four
 * only the cells that touch a differently labelled cell, level by level, down to the effective
 * resolution. Cost grows with the length of the basin boundaries rather than the area. Cells
 * that a known boundary curve (a saddle's stable manifold) crosses are split too, and count as
 * uncertain at the finest level. Otherwise a feature narrower than a coarse cell that no coarse
 * centre samples can be missed: the coarse grid sets the smallest such basin guaranteed to be seen.
 *
 * A generator, so one implementation serves both drivers: it yields each level's starts and
 * receives their labels (from the kernel in this thread, or from a worker pool).
 */
export function* basinRefinement(
  box: Box,
  options: BasinGridOptions,
  boundaries: readonly BoundaryCurve[] = [],
): Generator<Float64Array, BasinGrid, Int32Array> {
  const n = options.resolution;
  const levels = Math.round(Math.log2(n / options.coarse));
  if (options.coarse * 2 ** levels !== n)
    throw new Error(`basin resolution ${n} is not coarse ${options.coarse} times a power of two`);
  const labels = new Int32Array(n * n);
  const onBoundary = rasterizeCurves(box, n, boundaries);
  let trajectories = 0;
  // cells of the current level, as (i, j) of their lower-left fine cell, and their size in fine cells
  let cells: number[] = [];
  let size = n / options.coarse;
  for (let j = 0; j < options.coarse; j++)
    for (let i = 0; i < options.coarse; i++) cells.push(i * size, j * size);

  for (let level = 0; level <= levels; level++) {
    const count = cells.length / 2;
    const starts = new Float64Array(2 * count);
    for (let k = 0; k < count; k++) {
      starts[2 * k] = box.lo[0] + ((cells[2 * k] + size / 2) / n) * box.width[0];
      starts[2 * k + 1] = box.lo[1] + ((cells[2 * k + 1] + size / 2) / n) * box.width[1];
    }
    const found: Int32Array = yield starts;
    trajectories += count;
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
      if (boundary || onBoundary[j * n + i] === 1 || labels[j * n + i] === LABEL_UNDECIDED) uncertainCells++;
    }
  return { resolution: n, labels, trajectories, boundaryCells, uncertainCells };
}

/** A known basin boundary (a saddle's stable manifold), as a polyline in state coordinates. */
export interface BoundaryCurve {
  x: readonly number[];
  y: readonly number[];
}

/**
 * The fine cells the curves pass through (1) as a mask. Each chord is walked in steps of a
 * quarter cell, so no cell it crosses is skipped; a basin thinner than a coarse cell that hugs
 * such a curve (as one along an invariant axis, bounded by a separatrix) is then refined too.
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

/** Run-length encoding of the label grid, row by row from the lowest second-state row: [value, count, value, count, ...]. */
export function encodeRuns(labels: Int32Array, legendIndex: (label: number) => number): number[] {
  const runs: number[] = [];
  let current = legendIndex(labels[0]);
  let count = 0;
  for (let k = 0; k < labels.length; k++) {
    const v = legendIndex(labels[k]);
    if (v === current) count++;
    else {
      runs.push(current, count);
      current = v;
      count = 1;
    }
  }
  runs.push(current, count);
  return runs;
}

export function decodeRuns(runs: number[], length: number): Int32Array {
  const out = new Int32Array(length);
  let at = 0;
  for (let k = 0; k < runs.length; k += 2) {
    out.fill(runs[k], at, at + runs[k + 1]);
    at += runs[k + 1];
  }
  if (at !== length) throw new Error(`run-length data covers ${at} cells, expected ${length}`);
  return out;
}

/** Area fraction of each label, in the order of `legend`. */
export function labelFractions(labels: Int32Array, attractors: string[]): Record<string, number> {
  const counts = new Map<number, number>();
  for (const v of labels) counts.set(v, (counts.get(v) ?? 0) + 1);
  const keys = [...counts.keys()].sort((a, b) => (a < 0 && b < 0 ? b - a : a < 0 ? 1 : b < 0 ? -1 : a - b));
  return Object.fromEntries(keys.map((k) => [labelName(k, attractors), counts.get(k)! / labels.length]));
}

export function runRefinementSync(
  gen: Generator<Float64Array, BasinGrid, Int32Array>,
  evaluate: SyncBatchEvaluator,
): BasinGrid {
  let step = gen.next(undefined as unknown as Int32Array);
  while (!step.done) step = gen.next(evaluate(step.value));
  return step.value;
}

export async function runRefinementAsync(
  gen: Generator<Float64Array, BasinGrid, Int32Array>,
  evaluate: BatchEvaluator,
): Promise<BasinGrid> {
  let step = gen.next(undefined as unknown as Int32Array);
  while (!step.done) step = gen.next(await evaluate(step.value));
  return step.value;
}

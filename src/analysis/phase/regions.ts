import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { windowOf, type Box } from "../numeric/window.js";
import { DEFAULT_REGION_OPTIONS, MIN_REGION_FRACTION, REGION_ZERO_TOL } from "../constants.js";
import type { NullclineResult } from "./nullclines.js";
import { segmentDistance } from "../numeric/distance.js";

/**
 * The regions the nullclines cut out of the window, each with the sign of every component there
 * and a sample point well inside it, so a reader can check each arrow of the portrait.
 *
 * Method: label the centre of every cell of a grid by its sign pattern; take 4-neighbour
 * connected components of equal label; drop slivers; pick in each component the cell farthest
 * (Euclidean distance transform, window-scaled) from every other label and from the window border.
 */
export interface RegionOptions {
  /** Cells across the window in the first state. Default 160. */
  nx: number;
  /** Cells across the window in the second state. Default 160. */
  ny: number;
}

export type Sign = "+" | "-";

export interface RegionResult {
  id: string;
  /** Sign of each state's derivative throughout the region, keyed by state name. */
  signs: Record<string, Sign>;
  /** A point well inside the region: the centre of its cell farthest from other labels and the border. */
  point: Record<string, number>;
  /** Share of the window's area, counted in cells. */
  areaFraction: number;
  /** Window-scaled distance from the point to the nearest nullcline vertex or segment (null when there are none). */
  clearance: number | null;
}

const UNLABELLED = -1;

/** Lower envelope of parabolas (Felzenszwalb & Huttenlocher, Theory of Computing 8, 2012): d[q] = min_r f[r] + ((q - r) h)². */
function envelope(f: Float64Array, h: number): Float64Array {
  const n = f.length;
  const d = new Float64Array(n);
  const v = new Int32Array(n);
  const z = new Float64Array(n + 1);
  const key = (q: number) => f[q] / (h * h) + q * q;
  let k = 0;
  z[0] = -Infinity;
  z[1] = Infinity;
  for (let q = 1; q < n; q++) {
    let s = (key(q) - key(v[k])) / (2 * (q - v[k]));
    while (s <= z[k]) {
      k--;
      s = (key(q) - key(v[k])) / (2 * (q - v[k]));
    }
    k++;
    v[k] = q;
    z[k] = s;
    z[k + 1] = Infinity;
  }
  k = 0;
  for (let q = 0; q < n; q++) {
    while (z[k + 1] < q) k++;
    d[q] = f[v[k]] + ((q - v[k]) * h) ** 2;
  }
  return d;
}

/** Squared window-scaled distance from each cell to the nearest cell not `inside`, beyond the border counting as not inside. */
function distanceToOutside(inside: (cell: number) => boolean, nx: number, ny: number): Float64Array {
  // one padding cell on each side stands for the outside of the window, so every column has an outside cell
  const px = nx + 2,
    py = ny + 2;
  const isIn = (a: number, b: number) =>
    a >= 1 && a <= nx && b >= 1 && b <= ny && inside((b - 1) * nx + a - 1);
  const grid = new Float64Array(px * py);
  for (let a = 0; a < px; a++) {
    let last = -Infinity;
    for (let b = 0; b < py; b++) {
      if (!isIn(a, b)) last = b;
      grid[b * px + a] = b - last;
    }
    last = Infinity;
    for (let b = py - 1; b >= 0; b--) {
      if (!isIn(a, b)) last = b;
      grid[b * px + a] = (Math.min(grid[b * px + a], last - b) / ny) ** 2;
    }
  }
  const row = new Float64Array(px);
  const out = new Float64Array(nx * ny);
  for (let b = 1; b <= ny; b++) {
    for (let a = 0; a < px; a++) row[a] = grid[b * px + a];
    const d = envelope(row, 1 / nx);
    for (let a = 1; a <= nx; a++) out[(b - 1) * nx + a - 1] = d[a];
  }
  return out;
}

function clearanceOf(p: [number, number], nullclines: NullclineResult[], box: Box): number | null {
  let best = Infinity;
  for (const n of nullclines)
    for (const piece of n.pieces) {
      const pts = piece.points;
      if (pts.length === 1) best = Math.min(best, segmentDistance(p, pts[0], pts[0], box.width).d);
      for (let k = 0; k + 1 < pts.length; k++)
        best = Math.min(best, segmentDistance(p, pts[k], pts[k + 1], box.width).d);
    }
  return best === Infinity ? null : best;
}

/** Label every cell centre by its sign pattern (bit i set when f_i > 0), or UNLABELLED. */
function labelCells(model: Model, box: Box, nx: number, ny: number): Int8Array {
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  const values = new Float64Array(2 * nx * ny);
  const scale = [0, 0];
  for (let b = 0; b < ny; b++)
    for (let a = 0; a < nx; a++) {
      y[0] = box.lo[0] + (box.width[0] * (a + 0.5)) / nx;
      y[1] = box.lo[1] + (box.width[1] * (b + 0.5)) / ny;
      model.rhs(y, f);
      for (let i = 0; i < 2; i++) {
        values[2 * (b * nx + a) + i] = f[i];
        if (Number.isFinite(f[i])) scale[i] = Math.max(scale[i], Math.abs(f[i]));
      }
    }
  const labels = new Int8Array(nx * ny);
  for (let c = 0; c < nx * ny; c++) {
    let label = 0;
    for (let i = 0; i < 2; i++) {
      const v = values[2 * c + i];
      if (!Number.isFinite(v) || Math.abs(v) <= REGION_ZERO_TOL * scale[i]) {
        label = UNLABELLED;
        break;
      }
      if (v > 0) label |= 1 << i;
    }
    labels[c] = label;
  }
  return labels;
}

/** 4-neighbour components of equal label, numbered in row-major order of their first cell. */
function components(labels: Int8Array, nx: number, ny: number): { id: Int32Array; sizes: number[] } {
  const id = new Int32Array(nx * ny).fill(-1);
  const sizes: number[] = [];
  const stack: number[] = [];
  for (let start = 0; start < nx * ny; start++) {
    if (labels[start] === UNLABELLED || id[start] >= 0) continue;
    const c = sizes.length;
    let size = 0;
    id[start] = c;
    stack.push(start);
    while (stack.length) {
      const cell = stack.pop()!;
      size++;
      const a = cell % nx,
        b = (cell - a) / nx;
      for (const [da, db] of [
        [1, 0],
        [-1, 0],
        [0, 1],
        [0, -1],
      ]) {
        const qa = a + da,
          qb = b + db;
        if (qa < 0 || qb < 0 || qa >= nx || qb >= ny) continue;
        const q = qb * nx + qa;
        if (id[q] < 0 && labels[q] === labels[start]) {
          id[q] = c;
          stack.push(q);
        }
      }
    }
    sizes.push(size);
  }
  return { id, sizes };
}

/**
 * Every region of constant sign pattern in the window, ordered by sample point (first state,
 * then second) and numbered R1, R2, ... in that order. `nullclines` only serve the clearance.
 */
export function findRegions(
  model: Model,
  nullclines: NullclineResult[],
  options: RegionOptions = DEFAULT_REGION_OPTIONS,
  diagnostics: Diagnostic[] = [],
): RegionResult[] {
  const { nx, ny } = options;
  if (!(Number.isInteger(nx) && Number.isInteger(ny) && nx >= 2 && ny >= 2))
    throw new Error(`invalid region grid ${nx} × ${ny}`);
  const box = windowOf(model);
  const names = model.stateNames;
  const labels = labelCells(model, box, nx, ny);
  const { id, sizes } = components(labels, nx, ny);
  const total = nx * ny;
  const regions: Omit<RegionResult, "id">[] = [];
  let dropped = 0,
    droppedArea = 0;
  sizes.forEach((size, c) => {
    if (size / total < MIN_REGION_FRACTION) {
      dropped++;
      droppedArea += size;
      return;
    }
    const distance = distanceToOutside((cell) => id[cell] === c, nx, ny);
    let best = -1;
    for (let cell = 0; cell < total; cell++)
      if (id[cell] === c && (best < 0 || distance[cell] > distance[best])) best = cell;
    const a = best % nx,
      b = (best - a) / nx;
    const p: [number, number] = [
      box.lo[0] + (box.width[0] * (a + 0.5)) / nx,
      box.lo[1] + (box.width[1] * (b + 0.5)) / ny,
    ];
    const label = labels[best];
    regions.push({
      signs: Object.fromEntries(names.map((n, i) => [n, label & (1 << i) ? "+" : "-"])) as Record<
        string,
        Sign
      >,
      point: { [names[0]]: p[0], [names[1]]: p[1] },
      areaFraction: size / total,
      clearance: clearanceOf(p, nullclines, box),
    });
  });
  if (dropped > 0) {
    diagnostics.push({
      severity: "info",
      stage: "regions",
      code: "small-regions-omitted",
      data: { count: dropped, minFraction: MIN_REGION_FRACTION, fraction: droppedArea / total },
    });
  }
  regions.sort((p, q) => p.point[names[0]] - q.point[names[0]] || p.point[names[1]] - q.point[names[1]]);
  return regions.map((r, k) => ({ id: `R${k + 1}`, ...r }));
}

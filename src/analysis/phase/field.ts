import type { Model } from "../../model/types.js";
import { windowOf } from "../numeric/window.js";
import { DEFAULT_DIRECTION_FIELD_OPTIONS } from "../constants.js";

/**
 * The direction field: at the centre of every cell of a grid over the window, the direction of
 * (f_0, f_1) as a unit vector in window-scaled coordinates (each state divided by its window
 * width), so an arrow drawn on the plotted window points where the flow goes; and the speed.
 * Cell centres keep every arrow inside the frame.
 */
export interface DirectionFieldOptions {
  /** Arrows across the window in the first state. Default 21. */
  nx: number;
  /** Arrows across the window in the second state. Default 21. */
  ny: number;
}

export interface DirectionFieldResult {
  nx: number;
  ny: number;
  /** Arrow positions in the first state (cell centres), ascending. */
  x: number[];
  /** Arrow positions in the second state, ascending. */
  y: number[];
  /**
   * Unit direction in window-scaled coordinates, row-major: entry j * nx + i sits at (x[i], y[j]).
   * (u, v) ∝ (f_0 / width_0, f_1 / width_1); null where there is no direction (see `missing`).
   */
  u: (number | null)[];
  v: (number | null)[];
  /** |(f_0, f_1)| in state units per time unit; null where f is non-finite, 0 at a rest point. */
  magnitude: (number | null)[];
  /** Entries without a direction: "non-finite" (f is NaN or infinite there) or "rest" (f = 0 there). */
  missing: { index: number; reason: "non-finite" | "rest" }[];
}

export function computeDirectionField(
  model: Model,
  options: DirectionFieldOptions = DEFAULT_DIRECTION_FIELD_OPTIONS,
): DirectionFieldResult {
  const { nx, ny } = options;
  if (!(Number.isInteger(nx) && Number.isInteger(ny) && nx >= 1 && ny >= 1))
    throw new Error(`invalid direction field grid ${nx} × ${ny}`);
  const box = windowOf(model);
  const x = Array.from({ length: nx }, (_, i) => box.lo[0] + (box.width[0] * (i + 0.5)) / nx);
  const y = Array.from({ length: ny }, (_, j) => box.lo[1] + (box.width[1] * (j + 0.5)) / ny);
  const u: (number | null)[] = [];
  const v: (number | null)[] = [];
  const magnitude: (number | null)[] = [];
  const missing: DirectionFieldResult["missing"] = [];
  const state = new Float64Array(2);
  const f = new Float64Array(2);
  for (let j = 0; j < ny; j++)
    for (let i = 0; i < nx; i++) {
      state[0] = x[i];
      state[1] = y[j];
      model.rhs(state, f);
      const index = j * nx + i;
      if (!Number.isFinite(f[0]) || !Number.isFinite(f[1])) {
        u.push(null);
        v.push(null);
        magnitude.push(null);
        missing.push({ index, reason: "non-finite" });
        continue;
      }
      const s0 = f[0] / box.width[0],
        s1 = f[1] / box.width[1];
      // hypot does not overflow or underflow where squaring would
      const norm = Math.hypot(s0, s1);
      magnitude.push(Math.hypot(f[0], f[1]));
      if (norm === 0) {
        u.push(null);
        v.push(null);
        missing.push({ index, reason: "rest" });
        continue;
      }
      u.push(s0 / norm + 0);
      v.push(s1 / norm + 0);
    }
  return { nx, ny, x, y, u, v, magnitude, missing };
}

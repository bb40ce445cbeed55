import type { Model } from "../../model/types.js";
import { COMPONENT_SCALE_INTERVALS } from "../constants.js";

/** The analysis window as arrays in state order. */
export interface Box {
  lo: number[];
  hi: number[];
  width: number[];
}

export function windowOf(model: Model): Box {
  const lo = model.stateNames.map((n) => model.spec.window[n][0]);
  const hi = model.stateNames.map((n) => model.spec.window[n][1]);
  return { lo, hi, width: lo.map((l, k) => hi[k] - l) };
}

/** The feasible region (the states' min/max) as arrays in state order: trajectories are followed inside it. */
export function boundsOf(model: Model): Box {
  const lo = model.stateNames.map((n) => model.spec.states.find((s) => s.name === n)!.min);
  const hi = model.stateNames.map((n) => model.spec.states.find((s) => s.name === n)!.max);
  return { lo, hi, width: lo.map((l, k) => hi[k] - l) };
}

/** A side of a box (the window, or the feasible region a fate's exit crosses): where state `state` equals `value`. */
export interface WindowEdge {
  state: string;
  value: number;
}

/** The side of the window that x lies farthest beyond (scaled); the lower side first on a tie. */
export function edgeBeyond(stateNames: readonly string[], box: Box, x: ArrayLike<number>): WindowEdge {
  let edge: WindowEdge = { state: stateNames[0], value: box.lo[0] };
  let worst = -Infinity;
  for (let k = 0; k < box.lo.length; k++) {
    const below = (box.lo[k] - x[k]) / box.width[k];
    const above = (x[k] - box.hi[k]) / box.width[k];
    if (below > worst) {
      worst = below;
      edge = { state: stateNames[k], value: box.lo[k] };
    }
    if (above > worst) {
      worst = above;
      edge = { state: stateNames[k], value: box.hi[k] };
    }
  }
  return edge;
}

/** max |f_i| over a 25 × 25 grid of the window: the scale residuals are measured against; 1 where f_i vanishes there. */
export function componentScales(model: Model, box: Box): number[] {
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  const scale = [0, 0];
  const n = COMPONENT_SCALE_INTERVALS;
  for (let a = 0; a <= n; a++)
    for (let b = 0; b <= n; b++) {
      y[0] = box.lo[0] + (box.width[0] * a) / n;
      y[1] = box.lo[1] + (box.width[1] * b) / n;
      model.rhs(y, f);
      for (let k = 0; k < 2; k++) if (Number.isFinite(f[k])) scale[k] = Math.max(scale[k], Math.abs(f[k]));
    }
  return scale.map((s) => (s > 0 ? s : 1));
}

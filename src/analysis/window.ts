import type { Model } from "../model/types.js";

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

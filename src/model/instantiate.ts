import { PRELUDE } from "./codegen.js";
import type { ParametricRhsFunction, RhsFunction } from "./types.js";

/** Builds a function from generated source. Source comes only from whitelisted trees, never user text. */
export function instantiate<F>(params: string[], source: string): F {
  // eslint-disable-next-line no-new-func -- the source is generated from whitelisted trees (codegen.ts)
  return new Function(`${PRELUDE}\nreturn function (${params.join(", ")}) {\n${source}\n};`)() as F;
}

export function instantiateRhs(source: string): RhsFunction {
  return instantiate<RhsFunction>(["y", "out"], source);
}

export function instantiateParametric(source: string): ParametricRhsFunction {
  return instantiate<ParametricRhsFunction>(["y", "p", "out"], source);
}

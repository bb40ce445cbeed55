import { emitBody, type CodegenOptions } from "./codegen.js";
import type { Model } from "./types.js";

/**
 * The model at other parameter values, without recompiling: rhs and jacobianAt are the model's
 * parametric functions bound to a private copy of `values`; the bound source text is regenerated
 * (strings only) so code built from model.source agrees. The spec, trees and conditions are
 * shared with `model`; parameterValues is the truth, spec.parameters keeps the nominal values.
 */
export function withParameters(model: Model, values: ArrayLike<number>): Model {
  if (values.length !== model.parameterNames.length) {
    throw new Error(`withParameters: expected ${model.parameterNames.length} values, got ${values.length}`);
  }
  const p = Float64Array.from(values);
  p.forEach((v, j) => {
    if (!Number.isFinite(v))
      throw new Error(`withParameters: ${model.parameterNames[j]} = ${v} is not finite`);
  });
  const rhsParametric = model.rhsParametric;
  const jacobianParametric = model.jacobianParametric;
  const bound: CodegenOptions = { parameterValues: Array.from(p) };
  const n = model.dimension;
  return {
    ...model,
    parameterValues: p,
    rhs: (y, out) => rhsParametric(y, p, out),
    jacobianAt: (y, out) => jacobianParametric(y, p, out),
    source: {
      ...model.source,
      rhs: emitBody(
        model.equations.map((e) => e.node),
        n,
        bound,
      ),
      jacobian: emitBody(
        model.jacobian.flat().map((e) => e.node),
        n,
        bound,
      ),
    },
  };
}

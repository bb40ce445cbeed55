import type { MathNode } from "mathjs";
import { differentiate } from "./derivatives.js";
import { emitBody, type CodegenOptions } from "./codegen.js";
import { instantiateParametric } from "./compile.js";
import type { Model, ParametricRhsFunction } from "./types.js";

/**
 * Derivatives beyond the Jacobian, for continuation: the parameter derivative ∂f/∂p (the extra
 * column of the continuation Jacobian) and the second and third state derivatives (the quadratic
 * and cubic terms the first Lyapunov coefficient needs). All symbolic (mathjs, simplified), then
 * compiled with parameters read from p[], so one compilation serves every parameter value.
 */

/** Symbolic trees and their compiled parametric evaluator, which writes one entry per tree. */
export interface CompiledDerivatives {
  /** Internal-symbol trees, in the order the evaluator writes them. */
  nodes: MathNode[];
  evaluate: ParametricRhsFunction;
}

export interface HigherDerivatives {
  /** out[(i·n + j)·n + k] = ∂²f_i / ∂x_j ∂x_k. */
  second: CompiledDerivatives;
  /** out[((i·n + j)·n + k)·n + l] = ∂³f_i / ∂x_j ∂x_k ∂x_l. */
  third: CompiledDerivatives;
}

function body(nodes: MathNode[], dimension: number, options: CodegenOptions): string {
  return emitBody(nodes, dimension, options);
}

function compileTrees(nodes: MathNode[], dimension: number): CompiledDerivatives {
  return { nodes, evaluate: instantiateParametric(body(nodes, dimension, {})) };
}

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
    if (!Number.isFinite(v)) throw new Error(`withParameters: ${model.parameterNames[j]} = ${v} is not finite`);
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
      rhs: body(model.equations.map((e) => e.node), n, bound),
      jacobian: body(model.jacobian.flat().map((e) => e.node), n, bound),
    },
  };
}

/** ∂f_i/∂p_j for every state i, with parameter j given by its index in model.parameterNames. */
export function compileParameterDerivative(model: Model, parameterIndex: number): CompiledDerivatives {
  if (!Number.isInteger(parameterIndex) || parameterIndex < 0 || parameterIndex >= model.parameterNames.length) {
    throw new Error(`compileParameterDerivative: no parameter with index ${parameterIndex}`);
  }
  const nodes = model.equations.map((e) => differentiate(e.node, `P${parameterIndex}`));
  return compileTrees(nodes, model.dimension);
}

/** Sorted multi-index key, so each symmetric derivative is differentiated once. */
const keyOf = (i: number, indices: number[]) => `${i}:${[...indices].sort((a, b) => a - b).join(",")}`;

/**
 * Every second and third partial derivative of f with respect to the states, differentiated from
 * the model's (already simplified) Jacobian trees; mixed partials are computed once and shared,
 * since the trees are smooth wherever they are evaluated (the non-smooth functions have their
 * own piecewise rules in derivatives.ts).
 */
export function compileHigherDerivatives(model: Model): HigherDerivatives {
  const n = model.dimension;
  const cache = new Map<string, MathNode>();
  const second: MathNode[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) {
    const key = keyOf(i, [j, k]);
    if (!cache.has(key)) cache.set(key, differentiate(model.jacobian[i][j].node, `S${k}`));
    second.push(cache.get(key)!);
  }
  const third: MathNode[] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) for (let l = 0; l < n; l++) {
    const key = keyOf(i, [j, k, l]);
    if (!cache.has(key)) {
      const [a, b, c] = [j, k, l].sort((x, y) => x - y);
      cache.set(key, differentiate(cache.get(keyOf(i, [a, b]))!, `S${c}`));
    }
    third.push(cache.get(key)!);
  }
  return { second: compileTrees(second, n), third: compileTrees(third, n) };
}

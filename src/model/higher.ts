import type { MathNode } from "mathjs";
import { differentiate } from "./derivatives.js";
import { emitBody } from "./codegen.js";
import { instantiateParametric } from "./compile.js";
import type { Model, ParametricRhsFunction } from "./types.js";

/**
 * Derivatives beyond the Jacobian, for continuation: the parameter derivatives ∂f/∂p (the extra
 * column of the continuation Jacobian) and ∂J/∂p, and the second and third state derivatives (the quadratic
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

function compileTrees(nodes: MathNode[], dimension: number): CompiledDerivatives {
  return { nodes, evaluate: instantiateParametric(emitBody(nodes, dimension, {})) };
}

/** ∂f_i/∂p_j for every state i, with parameter j given by its index in model.parameterNames. */
export function compileParameterDerivative(model: Model, parameterIndex: number): CompiledDerivatives {
  if (
    !Number.isInteger(parameterIndex) ||
    parameterIndex < 0 ||
    parameterIndex >= model.parameterNames.length
  ) {
    throw new Error(`compileParameterDerivative: no parameter with index ${parameterIndex}`);
  }
  const nodes = model.equations.map((e) => differentiate(e.node, `P${parameterIndex}`));
  return compileTrees(nodes, model.dimension);
}

/**
 * ∂J_ij/∂p for the parameter with index parameterIndex, row-major (out[i·n + j]): how the
 * Jacobian moves with the parameter, for Newton on systems that hold a test function of J.
 */
export function compileParameterJacobian(model: Model, parameterIndex: number): CompiledDerivatives {
  if (
    !Number.isInteger(parameterIndex) ||
    parameterIndex < 0 ||
    parameterIndex >= model.parameterNames.length
  ) {
    throw new Error(`compileParameterJacobian: no parameter with index ${parameterIndex}`);
  }
  const nodes = model.jacobian.flat().map((e) => differentiate(e.node, `P${parameterIndex}`));
  return compileTrees(nodes, model.dimension);
}

/** Sorted multi-index key, so each symmetric derivative is differentiated once. */
const keyOf = (i: number, indices: number[]) => `${i}:${[...indices].sort((a, b) => a - b).join(",")}`;

/** Second derivatives, in the order of HigherDerivatives.second; shared entries are differentiated once (cached in `cache`). */
function secondTrees(model: Model, cache: Map<string, MathNode>): MathNode[] {
  const n = model.dimension;
  const second: MathNode[] = [];
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      for (let k = 0; k < n; k++) {
        const key = keyOf(i, [j, k]);
        if (!cache.has(key)) cache.set(key, differentiate(model.jacobian[i][j].node, `S${k}`));
        second.push(cache.get(key)!);
      }
  return second;
}

/** out[(i·n + j)·n + k] = ∂²f_i / ∂x_j ∂x_k, without the third derivatives. */
export function compileSecondDerivatives(model: Model): CompiledDerivatives {
  return compileTrees(secondTrees(model, new Map()), model.dimension);
}

/**
 * Every second and third partial derivative of f with respect to the states, differentiated from
 * the model's (already simplified) Jacobian trees; mixed partials are computed once and shared,
 * since the trees are smooth wherever they are evaluated (the non-smooth functions have their
 * own piecewise rules in derivatives.ts).
 */
export function compileHigherDerivatives(model: Model): HigherDerivatives {
  const n = model.dimension;
  const cache = new Map<string, MathNode>();
  const second = secondTrees(model, cache);
  const third: MathNode[] = [];
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++)
      for (let k = 0; k < n; k++)
        for (let l = 0; l < n; l++) {
          const key = keyOf(i, [j, k, l]);
          if (!cache.has(key)) {
            const [a, b, c] = [j, k, l].sort((x, y) => x - y);
            cache.set(key, differentiate(cache.get(keyOf(i, [a, b]))!, `S${c}`));
          }
          third.push(cache.get(key)!);
        }
  return { second: compileTrees(second, n), third: compileTrees(third, n) };
}

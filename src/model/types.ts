import type { MathNode } from "mathjs";
import type { NormalizedSpec } from "../spec/types.js";
import type { Comparison } from "./expressions.js";
import type { SingularFactor } from "./factors.js";

/** Right-hand side with parameters bound: writes f(y) into out. No allocation. */
export type RhsFunction = (y: ArrayLike<number>, out: Float64Array) => void;
/** Parametric right-hand side: parameters read from p (in the order of model.parameterNames). */
export type ParametricRhsFunction = (y: ArrayLike<number>, p: ArrayLike<number>, out: Float64Array) => void;

export interface CompiledExpression {
  /** Internal-symbol tree (S0, S1 for states; P0... for parameters). */
  node: MathNode;
  /** Readable text with the user's names. */
  text: string;
  tex: string;
}

export interface CompiledCondition {
  /** Index into spec.assumptions (or spec.claims, for claimConditions). */
  assumption: number;
  text: string;
  lhs: CompiledExpression;
  rhs: CompiledExpression;
  op: Comparison;
  tex: string;
  /** Evaluates lhs and rhs at the given parameter values. */
  evaluate: (p: ArrayLike<number>) => { lhs: number; rhs: number; holds: boolean };
}

export interface GeneratedSource {
  /** Body of `(y, out) => void` with parameters inlined. */
  rhs: string;
  /** Body of `(y, out) => void` writing the Jacobian row-major. */
  jacobian: string;
  /** Body of `(y, p, out) => void`. */
  rhsParametric: string;
  /** Body of `(y, p, out) => void`. */
  jacobianParametric: string;
}

export interface Model {
  spec: NormalizedSpec;
  dimension: number;
  stateNames: string[];
  parameterNames: string[];
  /** Nominal parameter values, in the order of parameterNames. */
  parameterValues: Float64Array;
  equations: CompiledExpression[];
  /** jacobian[i][j] = ∂f_i/∂x_j. */
  jacobian: CompiledExpression[][];
  /** Machine-checkable conditions of the spec's assumptions, indexed by assumption. */
  assumptionConditions: CompiledCondition[];
  /** Conditions of condition-decides claims, indexed by claim. */
  claimConditions: CompiledCondition[];
  rhs: RhsFunction;
  /** Row-major: out[i * n + j] = ∂f_i/∂x_j. */
  jacobianAt: RhsFunction;
  rhsParametric: ParametricRhsFunction;
  jacobianParametric: ParametricRhsFunction;
  /** Where the field or its Jacobian may be undefined: denominators, log/sqrt/power arguments, kinks (factors.ts). */
  singularFactors: SingularFactor[];
  source: GeneratedSource;
}

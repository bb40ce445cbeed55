import {
  ConstantNode,
  derivative,
  isConstantNode,
  isOperatorNode,
  isSymbolNode,
  rationalize,
  type MathNode,
} from "mathjs";
import type { Model } from "../../model/types.js";
import { simplifyBounded, withinSimplifyBudget, withOpaqueParts } from "../../model/simplify.js";
import { differentiate } from "../../model/derivatives.js";
import { emitExpression, PRELUDE } from "../../model/codegen.js";
import { expressionToTex, expressionToText } from "../../model/tex.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import {
  FORM_SCREEN_FACTORS,
  FORM_SCREEN_REL_TOL,
  MAX_POLYNOMIAL_DEGREE,
  ROOT_MATCH_REL_TOL,
  THRESHOLD_CHECK_REL_TOL,
} from "../constants.js";

/**
 * Symbolic invasion conditions. Where f_i = x_i g_i (the axis x_i = 0 is invariant: population
 * i absent), the eigenvalue across the axis at a boundary equilibrium is ∂f_i/∂x_i there, which
 * is i's per-capita growth rate g_i: i invades when it is positive. The resident state is put in
 * closed form where its one-dimensional problem is linear or quadratic.
 */
export interface ParameterThreshold {
  parameter: string;
  /** The rate is linear in this parameter: it changes sign at this expression. */
  text: string;
  tex: string;
  value: number;
  /** The rate is positive (invasion) when the parameter is below ("<") or above (">") the threshold, other parameters at their nominal values. */
  invadesWhen: "<" | ">";
}

export interface InvasionConditionResult {
  /** Boundary equilibrium (at the nominal values). */
  equilibrium: string;
  /** The absent state whose invasion is tested. */
  absent: string;
  /** Resident state's value in closed form, when there is one. */
  resident: { state: string; text: string; tex: string; closedForm: boolean } | null;
  rate: { text: string; tex: string };
  /** The rate at the nominal values, and the same eigenvalue as computed numerically at the equilibrium. */
  value: number;
  numericEigenvalue: number;
  invades: boolean;
  thresholds: ParameterThreshold[];
}

const symbol = (k: number) => `S${k}`;

function substitute(node: MathNode, name: string, by: MathNode): MathNode {
  return node.transform((n) => (isSymbolNode(n) && n.name === name ? by.cloneDeep() : n));
}

function isZero(node: MathNode): boolean {
  try {
    const s = simplifyBounded(node).node;
    return isConstantNode(s) && s.value === 0;
  } catch {
    return false;
  }
}

type CompiledNode = (p: ArrayLike<number>, s0: number, s1: number) => number;

function compileNode(node: MathNode): CompiledNode {
  // eslint-disable-next-line no-new-func -- the source is generated from a whitelisted tree (model/codegen.ts)
  return new Function("p", "s0", "s1", `${PRELUDE}\nreturn ${emitExpression(node, {})};`) as CompiledNode;
}

function evaluateAt(node: MathNode, p: ArrayLike<number>, state: [number, number] = [0, 0]): number {
  return compileNode(node)(p, state[0], state[1]);
}

const FACTORIALS = [1, 1, 2, 6];

/** Part of what rationalize(expr, scope, true) returns that mathjs's declaration leaves out. */
interface RationalParts {
  numerator: MathNode;
}

/**
 * Whether a power's exponent is a constant beyond the degrees solved here, or not a constant:
 * rationalize would expand u^1e308 term by term (and exhaust the heap), and nothing above
 * MAX_POLYNOMIAL_DEGREE has roots in closed form here anyway.
 */
function hasHighPower(node: MathNode): boolean {
  return (
    node.filter((n) => {
      if (!isOperatorNode(n) || n.fn !== "pow") return false;
      const exponent = n.args[1];
      return !isConstantNode(exponent) || Math.abs(Number(exponent.value)) > MAX_POLYNOMIAL_DEGREE;
    }).length > 0
  );
}

/** Roots in closed form of a numerator that is a polynomial in `variable` of degree ≤ 2 once roots at 0 are factored out; null otherwise. */
function polynomialRoots(expr: MathNode, variable: string): MathNode[] | null {
  let numerator: MathNode | null = null;
  try {
    // rationalize expands products as it goes: every part free of `variable` is held opaque, and
    // what remains is bounded as simplify is
    numerator = withOpaqueParts(
      expr,
      (name) => name === variable,
      (tree) => {
        if (!withinSimplifyBudget(tree) || hasHighPower(tree)) throw new Error("too large to rationalize");
        const detailed = rationalize(tree, {}, true);
        return (detailed as typeof detailed & RationalParts).numerator;
      },
    );
  } catch {
    return null;
  }
  const zero = new ConstantNode(0);
  // coefficients c_k = (d^k numerator / d variable^k at 0) / k!, lowest degree first
  const coefficients: MathNode[] = [];
  let d = numerator;
  for (let k = 0; k <= MAX_POLYNOMIAL_DEGREE; k++) {
    coefficients.push(
      simplifyBounded(`(${substitute(d, variable, zero).toString()}) / ${FACTORIALS[k]}`).node,
    );
    d = simplifyBounded(derivative(d, variable, { simplify: false })).node;
  }
  if (!isZero(d)) return null;
  while (coefficients.length && isZero(coefficients[coefficients.length - 1])) coefficients.pop();
  if (!coefficients.length) return null; // identically zero: every value is a root
  const roots: MathNode[] = [];
  if (isZero(coefficients[0])) roots.push(new ConstantNode(0));
  while (isZero(coefficients[0])) coefficients.shift();
  if (coefficients.length > 3) return null;
  const [c0, c1, c2] = coefficients.map((c) => c.toString());
  if (coefficients.length === 1) return roots.length ? roots : null;
  if (coefficients.length === 2) return [...roots, simplifyBounded(`-(${c0}) / (${c1})`).node];
  const disc = `(${c1})^2 - 4 * (${c2}) * (${c0})`;
  return [
    ...roots,
    simplifyBounded(`(-(${c1}) + sqrt(${disc})) / (2 * (${c2}))`).node,
    simplifyBounded(`(-(${c1}) - sqrt(${disc})) / (2 * (${c2}))`).node,
  ];
}

/** Whether the line x_i = value is invariant: f_i vanishes identically on it (population i absent, at value 0). */
export function isInvariantBound(model: Model, i: number, value: number): boolean {
  return isZero(substitute(model.equations[i].node, symbol(i), new ConstantNode(value)));
}

export function findInvasionConditions(
  model: Model,
  equilibria: EquilibriumResult[],
): InvasionConditionResult[] {
  const out: InvasionConditionResult[] = [];
  const names = model.stateNames;
  const p = model.parameterValues;
  const zero = new ConstantNode(0);
  for (let i = 0; i < 2; i++) {
    const spec = model.spec.states[i];
    if (!isInvariantBound(model, i, spec.min)) continue;
    const j = 1 - i;
    const jii = differentiate(model.equations[i].node, symbol(i));
    for (const e of equilibria) {
      if (e.point[names[i]] !== spec.min) continue;
      const onAxis = substitute(jii, symbol(i), new ConstantNode(spec.min));
      const residentValue = e.point[names[j]];
      let rateNode = onAxis;
      let resident: InvasionConditionResult["resident"] = null;
      const width = model.spec.window[names[j]][1] - model.spec.window[names[j]][0];
      if (residentValue === 0) {
        rateNode = substitute(onAxis, symbol(j), zero);
        resident = { state: names[j], text: "0", tex: "0", closedForm: true };
      } else {
        const restricted = substitute(model.equations[j].node, symbol(i), new ConstantNode(spec.min));
        const roots = polynomialRoots(restricted, symbol(j)) ?? [];
        const match = roots.find(
          (r) => Math.abs(evaluateAt(r, p) - residentValue) <= ROOT_MATCH_REL_TOL * width,
        );
        if (match) {
          rateNode = substitute(onAxis, symbol(j), match);
          resident = {
            state: names[j],
            text: expressionToText(match, userNames(model)),
            tex: expressionToTex(match, userNames(model)),
            closedForm: true,
          };
        } else {
          resident = {
            state: names[j],
            text: String(residentValue),
            tex: String(residentValue),
            closedForm: false,
          };
        }
      }
      let simplified: MathNode;
      try {
        simplified = simplifyBounded(rateNode).node;
      } catch {
        simplified = rateNode;
      }
      const value = evaluateAt(simplified, p, [e.point[names[0]], e.point[names[1]]]);
      const numericEigenvalue = e.jacobian[i][i];
      out.push({
        equilibrium: e.id,
        absent: names[i],
        resident,
        rate: {
          text: expressionToText(simplified, userNames(model)),
          tex: expressionToTex(simplified, userNames(model)),
        },
        value,
        numericEigenvalue,
        invades: value > 0,
        thresholds: resident?.closedForm ? linearThresholds(model, simplified) : [],
      });
    }
  }
  return out;
}

function userNames(model: Model): Map<string, string> {
  const m = new Map<string, string>();
  model.stateNames.forEach((n, k) => m.set(`S${k}`, n));
  model.parameterNames.forEach((n, k) => m.set(`P${k}`, n));
  return m;
}

const mentions = (node: MathNode, sym: string) =>
  node.filter((n) => isSymbolNode(n) && n.name === sym).length > 0;

/** Whether the rate, as a function of parameter k alone, is affine in u(p): equal difference quotients at the screen's values. */
function affineIn(rateAt: CompiledNode, p: ArrayLike<number>, k: number, u: (v: number) => number): boolean {
  const base = p[k] === 0 ? 1 : p[k];
  const q = Float64Array.from(p);
  const [first, ...rest] = FORM_SCREEN_FACTORS.map((f) => {
    q[k] = base * f;
    return { w: u(q[k]), g: rateAt(q, 0, 0) };
  });
  const slopes = rest.map((pt) => (pt.g - first.g) / (pt.w - first.w));
  if (!slopes.every(Number.isFinite)) return false;
  const size = Math.max(...slopes.map(Math.abs), Math.abs(first.g), Number.MIN_VALUE);
  return slopes.every((sl) => Math.abs(sl - slopes[0]) <= FORM_SCREEN_REL_TOL * size);
}

/**
 * For each parameter p in which the rate is linear (rate = A + B p: threshold −A/B) or linear in
 * 1/p (rate = A + B/p, as a carrying capacity dividing a competition term: threshold −B/A, with
 * A = rate + p rate' and −B = p² rate'). The form is screened numerically and the threshold checked
 * numerically: symbolic simplification is slow on closed forms with square roots, so it runs once.
 */
function linearThresholds(model: Model, rate: MathNode): ParameterThreshold[] {
  const out: ParameterThreshold[] = [];
  const p = model.parameterValues;
  const rateAt = compileNode(rate);
  const nominalRate = rateAt(p, 0, 0);
  model.parameterNames.forEach((name, k) => {
    const sym = `P${k}`;
    if (!mentions(rate, sym)) return;
    const linear = affineIn(rateAt, p, k, (v) => v);
    if (!linear && !affineIn(rateAt, p, k, (v) => 1 / v)) return;
    let slope: MathNode, threshold: MathNode;
    try {
      slope = simplifyBounded(derivative(rate, sym, { simplify: false })).node;
      threshold = linear
        ? simplifyBounded(
            `-(${substitute(rate, sym, new ConstantNode(0)).toString()}) / (${slope.toString()})`,
          ).node
        : simplifyBounded(
            `(${sym})^2 * (${slope.toString()}) / (${rate.toString()} + ${sym} * (${slope.toString()}))`,
          ).node;
    } catch {
      return;
    }
    if (mentions(threshold, sym)) return;
    // d rate / dp has one sign: B, or −B/p²
    const rising = evaluateAt(slope, p);
    const value = evaluateAt(threshold, p);
    if (!Number.isFinite(value) || !(rising !== 0)) return;
    const q = Float64Array.from(p);
    q[k] = value;
    if (
      !(
        Math.abs(rateAt(q, 0, 0)) <=
        THRESHOLD_CHECK_REL_TOL * Math.max(Math.abs(nominalRate), Math.abs(rising * (value - p[k])))
      )
    )
      return;
    out.push({
      parameter: name,
      text: expressionToText(threshold, userNames(model)),
      tex: expressionToTex(threshold, userNames(model)),
      value,
      invadesWhen: rising > 0 ? ">" : "<",
    });
  });
  return out;
}

import { isConstantNode, isOperatorNode, isSymbolNode, type MathNode } from "mathjs";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages, type ConstantFaultReason } from "../diagnostics/messages.js";
import { isVariable, mentionsIndex } from "./simplify.js";

/**
 * Terms of an equation that cannot be evaluated whatever the state: a constant part that is not a
 * finite number once folded (1e308 * 10, (-8)^0.5, log(0)), or a division by a constant zero.
 * Such a model has no finite right-hand side anywhere, so it is bad input (exit 2), named by the
 * term, rather than a fault met mid-analysis. Trouble that depends on the state (a pole, a root of
 * a negative state) is the analysis's to report where it occurs.
 */
/** The value of a constant subtree, folded by mathjs (only the whitelisted grammar reaches here). */
function foldConstant(node: MathNode): number {
  try {
    const value: unknown = node.evaluate();
    return typeof value === "number" ? value : Number.NaN;
  } catch {
    return Number.NaN;
  }
}

/** The first term that cannot be evaluated, in pre-order (outermost first), with its text. */
export function findConstantFault(
  root: MathNode,
  textOf: (node: MathNode) => string,
): { term: string; reason: ConstantFaultReason } | null {
  let found: { term: string; reason: ConstantFaultReason } | null = null;
  const reasonOf = (value: number): ConstantFaultReason => (Number.isNaN(value) ? "not-real" : "overflow");
  // whether a subtree mentions a state or parameter (a call's function name is no variable)
  const hasSymbol = mentionsIndex(root, isVariable);
  root.traverse((node) => {
    if (found || isSymbolNode(node)) return;
    if (isOperatorNode(node) && node.fn === "divide" && !hasSymbol(node.args[1])) {
      const divisor = foldConstant(node.args[1]);
      if (divisor === 0) {
        found = { term: textOf(node), reason: "divide-by-zero" };
        return;
      }
    }
    if (isConstantNode(node) || hasSymbol(node)) {
      if (isConstantNode(node) && !Number.isFinite(node.value))
        found = { term: textOf(node), reason: reasonOf(node.value as number) };
      return;
    }
    const value = foldConstant(node);
    if (!Number.isFinite(value)) found = { term: textOf(node), reason: reasonOf(value) };
  });
  return found;
}

/** The issue for an equation (or, with `withRespectTo`, its derivative) holding such a term. */
export function constantFaultIssue(
  state: string,
  fault: NonNullable<ReturnType<typeof findConstantFault>>,
  withRespectTo: string | null,
): SpecIssue {
  return {
    code: "constant_not_finite",
    path: ["equations", state],
    message:
      withRespectTo === null
        ? messages.constantTermFault(fault.term, fault.reason)
        : messages.derivativeTermFault(withRespectTo, fault.term, fault.reason),
  };
}

/** Points per side of the grid of cell centres an equation is tried at: it must be finite at one. */
export const FINITE_PROBE_POINTS = 8;

/**
 * Where an equation is finite and real nowhere in the window ((-u)^(1/3) over u ≥ 0, sqrt(-1 - u)),
 * the first grid point tried and its value; null when it is finite at some point.
 */
export function findNowhereFinite(
  rate: (y: ArrayLike<number>) => number,
  window: [number, number][],
): { at: [number, number]; value: number } | null {
  let first: { at: [number, number]; value: number } | null = null;
  for (let j = 0; j < FINITE_PROBE_POINTS; j++)
    for (let i = 0; i < FINITE_PROBE_POINTS; i++) {
      const at: [number, number] = [
        window[0][0] + ((i + 0.5) / FINITE_PROBE_POINTS) * (window[0][1] - window[0][0]),
        window[1][0] + ((j + 0.5) / FINITE_PROBE_POINTS) * (window[1][1] - window[1][0]),
      ];
      const value = rate(at);
      if (Number.isFinite(value)) return null;
      first ??= { at, value };
    }
  return first;
}

/** Every equation's constant faults, then (when there are none) every equation that is finite nowhere in the window. */
export function findEquationFaults(
  trees: MathNode[],
  stateNames: string[],
  window: Record<string, [number, number]>,
  rhs: (y: ArrayLike<number>, out: Float64Array) => void,
  textOf: (node: MathNode) => string,
): SpecIssue[] {
  const issues: SpecIssue[] = [];
  trees.forEach((tree, i) => {
    const fault = findConstantFault(tree, textOf);
    if (fault) issues.push(constantFaultIssue(stateNames[i], fault, null));
  });
  if (issues.length) return issues;
  const box = stateNames.map((n) => window[n]);
  const out = new Float64Array(stateNames.length);
  stateNames.forEach((state, i) => {
    const nowhere = findNowhereFinite((y) => (rhs(y, out), out[i]), box);
    if (nowhere)
      issues.push({
        code: "nowhere_finite",
        path: ["equations", state],
        message: messages.nowhereFinite(
          FINITE_PROBE_POINTS ** 2,
          stateNames.map((n, k) => `${n} = ${nowhere.at[k]}`).join(", "),
          String(nowhere.value),
        ),
      });
  });
  return issues;
}

/** The constant faults of every Jacobian entry (a coefficient that overflows once differentiated). */
export function findJacobianFaults(
  jacobian: MathNode[][],
  stateNames: string[],
  textOf: (node: MathNode) => string,
): SpecIssue[] {
  const issues: SpecIssue[] = [];
  jacobian.forEach((row, i) =>
    row.forEach((entry, j) => {
      const fault = findConstantFault(entry, textOf);
      if (fault) issues.push(constantFaultIssue(stateNames[i], fault, stateNames[j]));
    }),
  );
  return issues;
}

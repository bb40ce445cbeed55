import {
  ConstantNode,
  FunctionNode,
  OperatorNode,
  SymbolNode,
  isConstantNode,
  isFunctionNode,
  isOperatorNode,
  isParenthesisNode,
  isSymbolNode,
  type MathNode,
} from "mathjs";
import { emitBody } from "./codegen.js";
import { instantiateParametric } from "./instantiate.js";
import { differentiate } from "./derivatives.js";
import type { CompiledExpression, ParametricRhsFunction } from "./types.js";

/**
 * The subexpressions whose zeros can make the field or its Jacobian undefined, read from the
 * equation trees: denominators, arguments of log and sqrt, bases of non-integer or negative
 * powers, and the arguments of abs and the ties of min/max (kinks). Denominators are split into
 * their factors (x·y, (x + y)², −u), so each zero set is one simple curve where the sign changes.
 */
export type FactorRole = "denominator" | "log-argument" | "root-argument" | "power-base" | "kink";

export interface SingularFactor {
  /** Indices of the equations (state order) it occurs in. */
  equations: number[];
  role: FactorRole;
  /** g: the field is singular only where g = 0 (or, for log, root and power arguments, g < 0). */
  expression: CompiledExpression;
  /** For a denominator: the numerator over it (where both vanish the field is 0/0). */
  numerator: CompiledExpression | null;
  /** For a power base: the exponent when it is a number, else null. */
  exponent: number | null;
  /** out = [g, ∂g/∂s0, ∂g/∂s1, numerator (1 when none)] at state y, parameters p. */
  evaluate: ParametricRhsFunction;
}

type Describe = (node: MathNode) => CompiledExpression;

interface RawFactor {
  equation: number;
  role: FactorRole;
  node: MathNode;
  numerator: MathNode | null;
  exponent: number | null;
}

const dependsOnState = (node: MathNode): boolean => {
  let found = false;
  node.traverse((n) => {
    if (isSymbolNode(n) && /^S\d+$/.test(n.name)) found = true;
  });
  return found;
};

const strip = (node: MathNode): MathNode => (isParenthesisNode(node) ? strip(node.content) : node);

function constantOf(node: MathNode): number | null {
  const n = strip(node);
  if (isConstantNode(n)) return n.value;
  if (isOperatorNode(n) && n.fn === "unaryMinus") {
    const v = constantOf(n.args[0]);
    return v === null ? null : -v;
  }
  if (isOperatorNode(n) && n.fn === "divide") {
    const [a, b] = n.args.map(constantOf);
    return a === null || b === null ? null : a / b;
  }
  return null;
}

/** The factors of a denominator whose zeros are its zeros: products, signs and positive integer powers split. */
function denominatorFactors(node: MathNode): MathNode[] {
  const n = strip(node);
  if (!dependsOnState(n)) return [];
  if (isOperatorNode(n) && n.fn === "multiply") return n.args.flatMap(denominatorFactors);
  if (isOperatorNode(n) && (n.fn === "unaryMinus" || n.fn === "unaryPlus"))
    return denominatorFactors(n.args[0]);
  if (isOperatorNode(n) && n.fn === "divide") return denominatorFactors(n.args[0]);
  const k = isOperatorNode(n) && n.fn === "pow" ? constantOf(n.args[1]) : null;
  if (isOperatorNode(n) && k !== null && Number.isInteger(k) && k > 0) return denominatorFactors(n.args[0]);
  return [n];
}

function powerFactors(equation: number, base: MathNode, exponent: MathNode): RawFactor[] {
  const k = dependsOnState(exponent) ? null : constantOf(exponent);
  if (k !== null && Number.isInteger(k) && k >= 0) return []; // a polynomial power is smooth everywhere
  if (k !== null && Number.isInteger(k))
    return denominatorFactors(base).map((node) => ({
      equation,
      role: "denominator",
      node,
      numerator: new ConstantNode(1),
      exponent: null,
    }));
  return dependsOnState(base)
    ? [{ equation, role: "power-base", node: strip(base), numerator: null, exponent: k }]
    : [];
}

/** Kinks of min/max, folded pairwise as derivatives.ts folds them: min(a, b, c) = min(min(a, b), c). */
function tieFactors(equation: number, node: FunctionNode): RawFactor[] {
  const out: RawFactor[] = [];
  let acc = node.args[0];
  for (const next of node.args.slice(1)) {
    // acc − next vanishes where the selection may switch
    const g = new OperatorNode("-", "subtract", [acc, next]);
    if (dependsOnState(g)) out.push({ equation, role: "kink", node: g, numerator: null, exponent: null });
    acc = new FunctionNode(new SymbolNode(node.fn.name), [acc, next]);
  }
  return out;
}

function factorsAt(equation: number, node: MathNode): RawFactor[] {
  if (isOperatorNode(node) && node.fn === "divide")
    return denominatorFactors(node.args[1]).map((g) => ({
      equation,
      role: "denominator" as const,
      node: g,
      numerator: strip(node.args[0]),
      exponent: null,
    }));
  if (isOperatorNode(node) && node.fn === "pow") return powerFactors(equation, node.args[0], node.args[1]);
  if (!isFunctionNode(node) || !node.args.some(dependsOnState)) return [];
  const name = node.fn.name;
  const arg = strip(node.args[0]);
  if (name === "pow") return powerFactors(equation, node.args[0], node.args[1]);
  if (name === "log") return [{ equation, role: "log-argument", node: arg, numerator: null, exponent: null }];
  if (name === "sqrt")
    return [{ equation, role: "root-argument", node: arg, numerator: null, exponent: null }];
  if (name === "abs") return [{ equation, role: "kink", node: arg, numerator: null, exponent: null }];
  if (name === "min" || name === "max") return tieFactors(equation, node);
  if (name === "tan")
    return [
      {
        equation,
        role: "denominator",
        node: new FunctionNode(new SymbolNode("cos"), [arg]),
        numerator: new FunctionNode(new SymbolNode("sin"), [arg]),
        exponent: null,
      },
    ];
  return [];
}

/**
 * Every singular factor of the equation trees, in tree order (equation by equation, pre-order),
 * one per distinct role and expression, with the equations it occurs in.
 */
export function findSingularFactors(trees: MathNode[], describe: Describe): SingularFactor[] {
  const byKey = new Map<string, { raw: RawFactor; equations: number[] }>();
  trees.forEach((tree, equation) =>
    tree.traverse((node) => {
      for (const raw of factorsAt(equation, node)) {
        const key = `${raw.role}|${raw.node.toString()}|${raw.numerator?.toString() ?? ""}|${raw.exponent}`;
        const seen = byKey.get(key);
        if (!seen) byKey.set(key, { raw, equations: [equation] });
        else if (!seen.equations.includes(equation)) seen.equations.push(equation);
      }
    }),
  );
  return [...byKey.values()].map(({ raw, equations }) => {
    const gradient = [0, 1].map((j) => differentiate(raw.node, `S${j}`));
    const body = emitBody([raw.node, ...gradient, raw.numerator ?? new ConstantNode(1)], 2, {});
    return {
      equations,
      role: raw.role,
      expression: describe(raw.node),
      numerator: raw.numerator ? describe(raw.numerator) : null,
      exponent: raw.exponent,
      evaluate: instantiateParametric(body),
    };
  });
}

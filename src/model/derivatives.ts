import {
  derivative,
  ConstantNode,
  FunctionNode,
  OperatorNode,
  SymbolNode,
  isFunctionNode,
  isOperatorNode,
  isParenthesisNode,
  isSymbolNode,
  type MathNode,
  type OperatorNodeFn,
  type OperatorNodeMap,
  type OperatorNodeOp,
} from "mathjs";
import { simplifyInStates } from "./simplify.js";

/**
 * Symbolic partial derivatives by mathjs. mathjs cannot differentiate min and max and gives
 * abs(u)/u (undefined at u = 0) for abs, so those three get their rules here, as internal
 * functions `sign(u)` and `ifle(a, b, da, db)` (da where a <= b, else db); every other subtree
 * goes to mathjs unchanged.
 */
const NON_SMOOTH = new Set(["abs", "min", "max"]);

const num = (v: number) => new ConstantNode(v);
const op = <F extends OperatorNodeFn>(o: OperatorNodeMap[F], fn: F, args: MathNode[]) =>
  new OperatorNode(o, fn, args);
const call = (name: string, args: MathNode[]) => new FunctionNode(new SymbolNode(name), args);

function hasNonSmooth(node: MathNode): boolean {
  let found = false;
  node.traverse((n) => {
    if (isFunctionNode(n) && NON_SMOOTH.has(n.fn.name)) found = true;
  });
  return found;
}

function dependsOn(node: MathNode, variable: string): boolean {
  let found = false;
  node.traverse((n) => {
    if (isSymbolNode(n) && n.name === variable) found = true;
  });
  return found;
}

function raw(node: MathNode, variable: string): MathNode {
  if (!dependsOn(node, variable)) return num(0);
  if (!hasNonSmooth(node)) return derivative(node, variable, { simplify: false });
  if (isParenthesisNode(node)) return raw(node.content, variable);
  if (isOperatorNode(node)) return rawOperator(node, variable);
  if (isFunctionNode(node)) return rawFunction(node, variable);
  throw new Error(`no derivative rule for node ${node.type}`);
}

function rawOperator(node: OperatorNode<OperatorNodeOp, OperatorNodeFn>, variable: string): MathNode {
  const [a, b] = node.args;
  switch (node.fn) {
    case "unaryPlus":
      return raw(a, variable);
    case "unaryMinus":
      return op("-", "unaryMinus", [raw(a, variable)]);
    case "add":
      return op("+", "add", [raw(a, variable), raw(b, variable)]);
    case "subtract":
      return op("-", "subtract", [raw(a, variable), raw(b, variable)]);
    case "multiply":
      return op("+", "add", [
        op("*", "multiply", [raw(a, variable), b]),
        op("*", "multiply", [a, raw(b, variable)]),
      ]);
    case "divide":
      return op("/", "divide", [
        op("-", "subtract", [
          op("*", "multiply", [raw(a, variable), b]),
          op("*", "multiply", [a, raw(b, variable)]),
        ]),
        op("^", "pow", [b, num(2)]),
      ]);
    case "pow":
      return powRule(a, b, variable);
  }
  throw new Error(`no derivative rule for operator ${node.fn}`);
}

function rawFunction(node: FunctionNode, variable: string): MathNode {
  const name = node.fn.name;
  const args = node.args;
  if (name === "pow") return powRule(args[0], args[1], variable);
  if (name === "abs") return op("*", "multiply", [call("sign", [args[0]]), raw(args[0], variable)]);
  if (name === "min" || name === "max") {
    // min(a, b, c) = min(min(a, b), c): fold pairwise so each selection has two branches
    let acc = args[0];
    let dacc = raw(args[0], variable);
    for (const next of args.slice(1)) {
      const dnext = raw(next, variable);
      dacc = name === "min" ? call("ifle", [acc, next, dacc, dnext]) : call("ifle", [acc, next, dnext, dacc]);
      acc = call(name, [acc, next]);
    }
    return dacc;
  }
  // smooth outer function of a non-smooth argument: chain rule through a placeholder
  const placeholder = "U__";
  const outer = derivative(call(name, [new SymbolNode(placeholder)]), placeholder, { simplify: false });
  const inner = args[0];
  const outerAt = outer.transform((m) => (isSymbolNode(m) && m.name === placeholder ? inner : m));
  return op("*", "multiply", [outerAt, raw(inner, variable)]);
}

function powRule(base: MathNode, exponent: MathNode, variable: string): MathNode {
  if (!dependsOn(exponent, variable)) {
    return op("*", "multiply", [
      op("*", "multiply", [exponent, op("^", "pow", [base, op("-", "subtract", [exponent, num(1)])])]),
      raw(base, variable),
    ]);
  }
  // d(u^w) = u^w (w' log u + w u'/u)
  return op("*", "multiply", [
    op("^", "pow", [base, exponent]),
    op("+", "add", [
      op("*", "multiply", [raw(exponent, variable), call("log", [base])]),
      op("/", "divide", [op("*", "multiply", [exponent, raw(base, variable)]), base]),
    ]),
  ]);
}

/**
 * Partial derivative of `node` with respect to the internal symbol `variable`, simplified in the
 * states within SIMPLIFY_MAX_NODES (model/simplify.ts); larger, it stays as differentiated.
 */
export function differentiate(node: MathNode, variable: string): MathNode {
  return simplifyInStates(raw(node, variable)).node;
}

import {
  isSymbolNode,
  parse,
  simplify,
  SymbolNode,
  type MathNode,
  type OperatorNode,
  type ParenthesisNode,
} from "mathjs";

/**
 * Nodes of a tree beyond which mathjs's simplify is not run: its rule matching grows faster than
 * exponentially with the terms of a sum (measured 2026-12-03 on a sum of terms P_k·S0^m·S1: 12
 * terms, 96 nodes, 0.3 s; 15 terms 0.7 s; 20 terms, 160 nodes, 7.5 s). An unsimplified tree is
 * exact, only longer to read and to evaluate.
 */
export const SIMPLIFY_MAX_NODES = 100;
/**
 * Terms of the widest sum (or factors of the widest product) simplify is run on: the matching
 * tries the terms' orderings, so width costs more than size (a sum of 20 parameters alone, 40
 * nodes, took 0.5 s; 12 terms take about 0.3 s at most in the same measurement).
 */
export const SIMPLIFY_MAX_TERMS = 12;

const SUM = new Set(["add", "subtract"]);
const PRODUCT = new Set(["multiply", "divide"]);

/** The most operands one chain of + and − (or of × and ÷) joins, anywhere in the tree. */
export function widestChain(node: MathNode): number {
  let widest = 1;
  const operands = (n: MathNode, kinds: Set<string>): number =>
    n.type === "OperatorNode" && kinds.has((n as OperatorNode).fn) && (n as OperatorNode).args.length === 2
      ? operands((n as OperatorNode).args[0], kinds) + operands((n as OperatorNode).args[1], kinds)
      : n.type === "ParenthesisNode"
        ? operands((n as ParenthesisNode).content, kinds)
        : 1;
  node.traverse((n) => {
    if (n.type !== "OperatorNode") return;
    const fn = (n as OperatorNode).fn;
    if (SUM.has(fn)) widest = Math.max(widest, operands(n, SUM));
    else if (PRODUCT.has(fn)) widest = Math.max(widest, operands(n, PRODUCT));
  });
  return widest;
}

/** Whether simplify (or rationalize) may run on the tree at a bounded cost. */
export const withinSimplifyBudget = (node: MathNode) =>
  nodeCount(node) <= SIMPLIFY_MAX_NODES && widestChain(node) <= SIMPLIFY_MAX_TERMS;

export function nodeCount(node: MathNode): number {
  let count = 0;
  node.traverse(() => count++);
  return count;
}

/** The tree simplified by mathjs, or as it stands when it is larger than SIMPLIFY_MAX_NODES or simplify fails. */
export function simplifyBounded(expr: MathNode | string): { node: MathNode; simplified: boolean } {
  const node = typeof expr === "string" ? parse(expr) : expr;
  if (!withinSimplifyBudget(node)) return { node, simplified: false };
  try {
    return { node: simplify(node), simplified: true };
  } catch {
    return { node, simplified: false }; // simplify gives up on some internal functions
  }
}

const isState = (name: string) => /^S\d+$/.test(name);
const isHeld = (name: string) => /^H\d+$/.test(name);
/** The internal symbols of states and parameters (a call's function name is none). */
export const isVariable = (name: string) => /^[SP]\d+$/.test(name);

/** Whether the tree holds a symbol whose name passes `test`. */
export const mentions = (node: MathNode, test: (name: string) => boolean) =>
  node.filter((m) => isSymbolNode(m) && test(m.name)).length > 0;

/**
 * `mentions` for every subtree of `root`, found in one post-order pass: asking each node in turn
 * costs the tree's size times its depth (a derivative of a power tower of 400: 30 s). Iterative,
 * so a deep tree does not recurse; subtrees shared by several parents are visited once.
 */
export function mentionsIndex(root: MathNode, test: (name: string) => boolean): (node: MathNode) => boolean {
  const memo = new Map<MathNode, boolean>();
  const stack: { node: MathNode; expanded: boolean }[] = [{ node: root, expanded: false }];
  while (stack.length > 0) {
    const top = stack.pop()!;
    if (memo.has(top.node)) continue;
    if (!top.expanded) {
      stack.push({ node: top.node, expanded: true });
      top.node.forEach((child: MathNode) => {
        if (!memo.has(child)) stack.push({ node: child, expanded: false });
      });
      continue;
    }
    let found = isSymbolNode(top.node) && test(top.node.name);
    top.node.forEach((child: MathNode) => {
      found ||= memo.get(child)!;
    });
    memo.set(top.node, found);
  }
  return (node) => memo.get(node) ?? mentions(node, test);
}

/**
 * Runs `transform` on the tree with each maximal subtree that mentions no kept symbol held as one
 * opaque symbol (H0, H1, …), then puts the subtrees back: the cost of simplifying or rationalizing
 * then grows with the tree's structure in the kept symbols, not with how many other names a
 * coefficient combines. The result is exact whenever `transform` is.
 */
export function withOpaqueParts(
  node: MathNode,
  kept: (name: string) => boolean,
  transform: (tree: MathNode) => MathNode,
): MathNode {
  const held: MathNode[] = [];
  const mentionsKept = mentionsIndex(node, kept);
  const mentionsVariable = mentionsIndex(node, isVariable);
  // only parts that name a variable are held: the simplifier must still fold plain numbers (2 − 1)
  const opaque = node.transform((m: MathNode) => {
    if (isSymbolNode(m) || m.type === "ConstantNode" || mentionsKept(m) || !mentionsVariable(m)) return m;
    held.push(m);
    return new SymbolNode(`H${held.length - 1}`);
  });
  return transform(opaque).transform((m: MathNode) =>
    isSymbolNode(m) && isHeld(m.name) ? held[Number(m.name.slice(1))].cloneDeep() : m,
  );
}

/** Simplifies a tree in the states, every subtree free of states held opaque meanwhile (withOpaqueParts). */
export function simplifyInStates(node: MathNode): { node: MathNode; simplified: boolean } {
  let simplified = false;
  const out = withOpaqueParts(node, isState, (tree) => {
    const result = simplifyBounded(tree);
    simplified = result.simplified;
    return result.node;
  });
  return { node: out, simplified };
}

import fc from "fast-check";
import { parse, type MathNode } from "mathjs";
import { describe, expect, it } from "vitest";
import { isVariable, mentions, mentionsIndex } from "../../src/model/simplify.js";

/**
 * The one-pass index must answer exactly as the direct query does, for every subtree (an
 * invariant, common practice for a memoised traversal), and must not recurse on a deep tree.
 */
const leaf = fc.constantFrom("S0", "S1", "P0", "P3", "2", "0.5", "pi");
const tree = fc.letrec<{ expr: string }>((tie) => ({
  expr: fc.oneof(
    { depthSize: "small", withCrossShrink: true },
    leaf,
    fc
      .tuple(tie("expr"), fc.constantFrom("+", "-", "*", "/", "^"), tie("expr"))
      .map(([a, op, b]) => `(${a} ${op} ${b})`),
    fc.tuple(fc.constantFrom("exp", "sin", "sqrt"), tie("expr")).map(([f, a]) => `${f}(${a})`),
  ),
})).expr;

function subtrees(root: MathNode): MathNode[] {
  const all: MathNode[] = [];
  root.traverse((n) => all.push(n));
  return all;
}

describe("mentionsIndex", () => {
  it("mentionsIndex(tree, test)(subtree) equals mentions(subtree, test) on every subtree of generated trees", () => {
    fc.assert(
      fc.property(tree, (text) => {
        const root = parse(text);
        const tests = [isVariable, (name: string) => name === "S0", (name: string) => name.startsWith("P")];
        for (const test of tests) {
          const index = mentionsIndex(root, test);
          for (const node of subtrees(root)) expect(index(node)).toBe(mentions(node, test));
        }
      }),
      { numRuns: 200, seed: 20261205 },
    );
  });

  it("mentionsIndex answers for a tree 20 000 levels deep without recursing", () => {
    // built by hand: the parser itself would recurse on such nesting
    let node: MathNode = parse("S0");
    for (let k = 0; k < 20_000; k++)
      node = parse("P0 + 1").transform((m) => (m.type === "ConstantNode" ? node : m));
    const index = mentionsIndex(node, (name) => name === "S0");
    expect(index(node)).toBe(true);
    expect(mentionsIndex(node, (name) => name === "S1")(node)).toBe(false);
  });
});

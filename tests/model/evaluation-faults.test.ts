/**
 * Equations that cannot be evaluated, refused at compile time (exit 2 in the CLI), and the bounds
 * that keep compilation cheap on large equations. The arithmetic facts are IEEE 754 binary64's
 * (largest finite double ≈ 1.7976931348623157e308; 1/0 and 0/0 have no finite value) and real
 * analysis's (no real square root of a negative number); common practice, no source needed.
 */
import { describe, expect, it } from "vitest";
import { parse } from "mathjs";
import { compileModel } from "../../src/model/compile.js";
import { EXPRESSION_MAX_NESTING, EXPRESSION_MAX_TOKENS } from "../../src/model/expressions.js";
import { SIMPLIFY_MAX_TERMS, widestChain, simplifyInStates } from "../../src/model/simplify.js";
import { buildModel, buildSpec, jacobianAt, type ModelFixture } from "../fixtures/models.js";

const window: Record<string, [number, number]> = { u: [0, 4], v: [0, 4] };
const fixture = (u: string, parameters: Record<string, number> = {}): ModelFixture => ({
  equations: { u, v: "v*(u - 1 - v)" },
  window,
  parameters,
});

function issuesFor(u: string, parameters: Record<string, number> = {}) {
  const compiled = compileModel(buildSpec(fixture(u, parameters)));
  if (compiled.ok) throw new Error(`expected ${u} to be refused`);
  return compiled.issues;
}

describe("compileModel refuses equations that are nowhere a finite real number", () => {
  it.each([
    ["u/0 + u", "divides by zero"],
    ["1e308*10*u", "beyond double precision"],
    ["(-8)^0.5*u", "not a real number"],
    ["log(0)*u", "beyond double precision"],
  ])("compileModel(du/dt = %s) names the term: %s", (u, words) => {
    const issues = issuesFor(u);
    expect(issues).toHaveLength(1);
    expect(issues[0].path).toEqual(["equations", "u"]);
    expect(issues[0].message).toContain(words);
  });

  it("compileModel(du/dt = (-u)^(1/3) on u ≥ 0) says the rate is real nowhere in the window", () => {
    const issues = issuesFor("(-u)^(1/3) - u*v");
    expect(issues.map((i) => i.code)).toEqual(["nowhere_finite"]);
  });

  it("compileModel(du/dt = 1e308*u*u) refuses the derivative's overflowing coefficient 2e308", () => {
    const issues = issuesFor("1e308*u*u");
    expect(issues.map((i) => [i.code, i.path])).toEqual([["constant_not_finite", ["equations", "u"]]]);
    expect(issues[0].message).toContain("derivative with respect to u");
  });

  it.each(["sqrt(u) - u*v", "u^(1/3) - u*v", "log(u + 1) - v", "u^1e308 - u"])(
    "compileModel(du/dt = %s) accepts a rate that is finite somewhere in the window",
    (u) => expect(compileModel(buildSpec(fixture(u))).ok).toBe(true),
  );
});

describe("expression size limits", () => {
  it("compileModel(an equation of EXPRESSION_MAX_TOKENS + 1 tokens) puts the caret on the token past the limit", () => {
    // "u + u + … + u": 2k − 1 tokens for k terms; k = 501 gives 1001
    const u = Array.from({ length: (EXPRESSION_MAX_TOKENS + 2) / 2 }, () => "u").join(" + ");
    const [issue] = issuesFor(u);
    expect(issue.code).toBe("limit_expression");
    // token 1001 (index 1000) is the 501st "u", at column 1 + 4 · 500
    expect(issue.source?.column).toBe(1 + 4 * (EXPRESSION_MAX_TOKENS / 2));
  });

  it("compileModel(parentheses nested EXPRESSION_MAX_NESTING + 1 deep) refuses, at the first '(' too many", () => {
    const u = `${"(".repeat(EXPRESSION_MAX_NESTING + 1)}u${")".repeat(EXPRESSION_MAX_NESTING + 1)}`;
    const [issue] = issuesFor(u);
    expect(issue.code).toBe("limit_expression");
    expect(issue.source?.column).toBe(EXPRESSION_MAX_NESTING + 1);
    const within = `${"(".repeat(EXPRESSION_MAX_NESTING)}u${")".repeat(EXPRESSION_MAX_NESTING)} - u*v`;
    expect(compileModel(buildSpec(fixture(within))).ok).toBe(true);
  });
});

describe("bounded simplification", () => {
  it("widestChain counts the operands of the widest sum or product", () => {
    expect(widestChain(parse("a + b - c + d*e"))).toBe(4);
    expect(widestChain(parse("a*b/c*(d + e)"))).toBe(4);
    expect(widestChain(parse("(a + b) * (c + d + e)"))).toBe(3);
  });

  it("compileModel(a rate with a sum of 30 parameters) differentiates it exactly (central differences agree)", () => {
    const names = Array.from({ length: 30 }, (_, k) => `p${k}`);
    const parameters = Object.fromEntries(names.map((n, k) => [n, 0.01 * (k + 1)]));
    const model = buildModel(fixture(`u*(1 - u/3) - (${names.join(" + ")})*u*v`, parameters));
    const sum = names.reduce((s, _, k) => s + 0.01 * (k + 1), 0);
    for (const [u, v] of [
      [0.5, 1],
      [2, 0.25],
    ]) {
      const [[duu, duv]] = jacobianAt(model, [u, v]);
      // f = u − u²/3 − S u v: ∂f/∂u = 1 − 2u/3 − S v, ∂f/∂v = −S u, by hand
      expect(duu).toBeCloseTo(1 - (2 * u) / 3 - sum * v, 12);
      expect(duv).toBeCloseTo(-sum * u, 12);
    }
  });

  it("simplifyInStates holds state-free parts opaque and leaves over-wide sums as they are", () => {
    const wide = parse(Array.from({ length: SIMPLIFY_MAX_TERMS + 1 }, (_, k) => `S0^${k + 1}`).join(" + "));
    expect(simplifyInStates(wide).simplified).toBe(false);
    const held = simplifyInStates(
      parse("(P0 + P1 + P2 + P3 + P4 + P5 + P6 + P7 + P8 + P9 + P10 + P11 + P12) * S0 + 0 * S1"),
    );
    expect(held.simplified).toBe(true);
    expect(held.node.toString()).not.toContain("S1");
  });
});

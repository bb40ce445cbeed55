/**
 * Trajectories and attractors live in the feasible region (the states' min/max), not in the
 * drawing window: an attractor that leaves the window but stays feasible is no break, and one that
 * leaves the feasible region is, at the parameter value where it reaches the bound.
 *
 * The model (invented values): an obligate plant–pollinator mutualism,
 *   P' = P (bP A / (1 + A) − dP − cP P),   A' = A (bA P / (1 + P) − dA − cA A),
 * with P, A in [0, 20] and a window of P ≤ 8, A ≤ 10. Closed forms (worked by hand here, and
 * checked against the harness's scipy reference, tests/reference/crosscheck.py): the coexistence
 * equilibrium has A = 10 (leaves the window) where bA = (dA + 10 cA)(1 + P)/P with
 * P = (10 bP/11 − dP)/cP, and A = 20 (leaves the feasible region) where
 * bA = (dA + 20 cA)(1 + P)/P with P = (20 bP/21 − dP)/cP.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline } from "../../../src/pipeline.js";
import type { Results } from "../../../src/analysis/types.js";
import { MUTUALISM_PARAMETERS, mutualismSpec } from "../../fixtures/mutualism.js";

const P = MUTUALISM_PARAMETERS;

function spec(studied: string[], values: Partial<typeof P> = {}) {
  return mutualismSpec({
    values,
    ranges: { bA: [0.4, 1.6], dA: [0.1, 0.7] },
    scenarios: [
      { name: "established", initial: { P: 3, A: 4 }, horizon: 200 },
      { name: "sparse", initial: { P: 0.6, A: 0.5 }, horizon: 200 },
    ],
    analysis: { basins: { resolution: 16, coarse: 8 }, parameters: studied },
  });
}

/** bA where the coexistence equilibrium has A = a (closed form above). */
function bAWhereAIs(a: number): number {
  const plants = ((a * P.bP) / (1 + a) - P.dP) / P.cP;
  return ((P.dA + P.cA * a) * (1 + plants)) / plants;
}

/** dA where the coexistence equilibrium has A = a. */
function dAWhereAIs(a: number): number {
  const plants = ((a * P.bP) / (1 + a) - P.dP) / P.cP;
  return (P.bA * plants) / (1 + plants) - P.cA * a;
}

function run(studied: string[]): Results {
  const out = runPipeline(spec(studied));
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return out.value.results;
}

const breaksOf = (r: Results, parameter: string) =>
  r.conditions.studies
    .find((s) => s.parameter === parameter)!
    .intervals.map((i) => i.to)
    .filter((b) => b.kind === "sampled-break" || b.kind === "threshold")
    .map((b) => b.value);

describe("outcome studies in the feasible region, not the window", () => {
  let results: Results;
  beforeAll(() => {
    results = run(["bA", "dA"]);
  }, 120_000);

  it("analyze(mutualism) finds the coexistence equilibrium even where it lies outside the window", () => {
    const outside = runPipeline(spec([], { bA: 1.2 }));
    if (!outside.ok) throw new Error("refused");
    const coexistence = outside.value.results.equilibria.filter((e) => e.point.P > 5);
    expect(coexistence).toHaveLength(1);
    // A = 15.136 at bA = 1.2 (scipy's fsolve on the same equations), beyond the window's A ≤ 10
    expect(coexistence[0].point.A).toBeCloseTo(15.136131, 5);
    expect(coexistence[0].type).toBe("stable-node");
    const established = outside.value.results.scenarios.find((s) => s.name === "established")!;
    expect(established.fate).toMatchObject({ kind: "equilibrium", target: coexistence[0].id });
  });

  it("studyParameter(bA) has no break where coexistence leaves the window (A = 10) and one where it leaves the feasible region (A = 20)", () => {
    const breaks = breaksOf(results, "bA");
    const windowExit = bAWhereAIs(10);
    const boundExit = bAWhereAIs(20);
    expect(windowExit).toBeGreaterThan(0.4);
    expect(boundExit).toBeLessThan(1.6);
    expect(breaks.some((b) => Math.abs(b - windowExit) < 1e-2 * windowExit)).toBe(false);
    const nearest = breaks.reduce((a, b) => (Math.abs(b - boundExit) < Math.abs(a - boundExit) ? b : a));
    expect(Math.abs(nearest - boundExit) / boundExit).toBeLessThan(1e-5);
  });

  it("studyParameter(dA) has no break where coexistence leaves the window (A = 10)", () => {
    const windowExit = dAWhereAIs(10);
    expect(windowExit).toBeGreaterThan(0.1);
    expect(windowExit).toBeLessThan(0.7);
    expect(breaksOf(results, "dA").some((b) => Math.abs(b - windowExit) < 1e-2 * windowExit)).toBe(false);
  });
});

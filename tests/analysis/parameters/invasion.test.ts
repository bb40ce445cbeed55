import { evaluate } from "mathjs";
import { describe, expect, it } from "vitest";
import {
  findInvasionConditions,
  type InvasionConditionResult,
} from "../../../src/analysis/parameters/invasion.js";
import { findEquilibria, type EquilibriumResult } from "../../../src/analysis/phase/equilibria.js";
import type { Model } from "../../../src/model/types.js";
import { prepareModel, runPipeline } from "../../../src/pipeline.js";
import { seededUniform } from "../../fixtures/random.js";

/** Required accuracy: symbolic conditions equal the numerical thresholds to 1e-9 relative. */
const SYMBOLIC_REL_TOL = 1e-9;
/** A flip found by bisection to machine precision lies on its closed form to this, relatively. */
const FLIP_REL_TOL = 1e-9;

const relative = (value: number, reference: number) => Math.abs(value - reference) / Math.abs(reference);

type Values = Record<string, number>;

// Two-species Lotka–Volterra competition (Murray, Mathematical Biology I, 3rd ed., section 3.5;
// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4; from memory):
// N' = r1 N (1 − (N + a12 S)/K1), S' = r2 S (1 − (S + a21 N)/K2). At (0, K2) the eigenvalue across the
// axis N = 0 is N's per-capita rate r1 (1 − a12 K2/K1); at (K1, 0), S's is r2 (1 − a21 K1/K2).
// Values are invented for the tests.
const COMPETITION_VALUES: Values = { r1: 1.1, r2: 0.7, K1: 100, K2: 80, a12: 0.6, a21: 0.5 };

function competitionSpec(
  values: Values,
  more: Record<string, unknown> = {},
  ranges: Record<string, [number, number]> = {},
  size = 120,
): string {
  return JSON.stringify({
    keel: 1,
    id: "competition-conditions",
    title: "Lotka–Volterra competition (invented values)",
    time: { unit: "year" },
    states: [
      { name: "N", min: 0, max: size },
      { name: "S", min: 0, max: size },
    ],
    parameters: Object.entries(values).map(([name, value]) => ({
      name,
      value,
      ...(ranges[name] ? { range: ranges[name] } : {}),
    })),
    equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
    window: { N: [0, size], S: [0, size] },
    ...more,
  });
}

function modelOf(specText: string): Model {
  const prepared = prepareModel(specText);
  if (!prepared.ok) throw new Error(JSON.stringify(prepared.issues));
  return prepared.value.model;
}

function pipeline(specText: string) {
  const out = runPipeline(specText);
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return out.value.results;
}

/**
 * The one invasion condition of `absent` at the boundary equilibrium where the other state is
 * `residentValue`.
 */
function invasionOf(
  conditions: InvasionConditionResult[],
  equilibria: EquilibriumResult[],
  absent: string,
  residentValue: number,
): InvasionConditionResult {
  const found = conditions.filter((c) => {
    const e = equilibria.find((q) => q.id === c.equilibrium)!;
    const resident = Object.keys(e.point).find((n) => n !== absent)!;
    return (
      c.absent === absent && Math.abs(e.point[resident] - residentValue) <= 1e-9 * Math.max(1, residentValue)
    );
  });
  expect(
    found,
    `invasion of ${absent} at resident ${residentValue}: ${JSON.stringify(conditions.map((c) => [c.equilibrium, c.absent]))}`,
  ).toHaveLength(1);
  return found[0];
}

describe("findInvasionConditions(competition)", () => {
  const draws = seededUniform(20240611);
  const between = (lo: number, hi: number) => lo + (hi - lo) * draws();
  const sets: Values[] = Array.from({ length: 4 }, () => ({
    r1: between(0.2, 2),
    r2: between(0.2, 2),
    K1: between(40, 110),
    K2: between(40, 110),
    a12: between(0.2, 1.8),
    a21: between(0.2, 1.8),
  }));

  sets.forEach((v, k) => {
    it(`findInvasionConditions(competition, random set ${k + 1}) gives N's rate at (0, K2) as r1 (1 − a12 K2/K1), with thresholds a12 = K1/K2, K2 = K1/a12, K1 = a12 K2`, () => {
      const model = modelOf(competitionSpec(v));
      const equilibria = findEquilibria(model);
      const c = invasionOf(findInvasionConditions(model, equilibria), equilibria, "N", v.K2);
      const closedForm = v.r1 * (1 - (v.a12 * v.K2) / v.K1);
      // the rate scale is r1: a rate near zero is compared against it, not against itself
      const tol = SYMBOLIC_REL_TOL * v.r1;
      expect(c.resident).toMatchObject({ state: "S", closedForm: true });
      expect(Math.abs(evaluate(c.resident!.text, v) - v.K2)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL * v.K2);
      expect(Math.abs(c.value - closedForm)).toBeLessThanOrEqual(tol);
      expect(Math.abs(c.numericEigenvalue - closedForm)).toBeLessThanOrEqual(tol);
      // the eigenvalue across the axis, J_NN at (0, K2), straight from the numerical equilibrium
      const e = equilibria.find((q) => q.id === c.equilibrium)!;
      expect(Math.abs(e.jacobian[0][0] - closedForm)).toBeLessThanOrEqual(tol);
      // the printed expression is the closed form at other values too
      const elsewhere: Values = { ...v, a12: v.a12 * 1.3, K1: v.K1 * 0.7 };
      expect(
        Math.abs(
          evaluate(c.rate.text, elsewhere) -
            elsewhere.r1 * (1 - (elsewhere.a12 * elsewhere.K2) / elsewhere.K1),
        ),
      ).toBeLessThanOrEqual(tol);
      expect(c.invades).toBe(closedForm > 0);

      const threshold = (name: string) => c.thresholds.find((t) => t.parameter === name);
      expect(relative(threshold("a12")!.value, v.K1 / v.K2)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
      expect(threshold("a12")!.invadesWhen).toBe("<");
      expect(relative(evaluate(threshold("a12")!.text, v), v.K1 / v.K2)).toBeLessThanOrEqual(
        SYMBOLIC_REL_TOL,
      );
      expect(relative(threshold("K2")!.value, v.K1 / v.a12)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
      expect(threshold("K2")!.invadesWhen).toBe("<");
      // K1 enters as 1/K1: N invades when K1 > a12 K2
      expect(relative(threshold("K1")!.value, v.a12 * v.K2)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
      expect(threshold("K1")!.invadesWhen).toBe(">");
    });
  });

  it("findInvasionConditions(competition) gives S's rate at (K1, 0) as r2 (1 − a21 K1/K2), with thresholds a21 = K2/K1 and K1 = K2/a21", () => {
    const v = COMPETITION_VALUES;
    const model = modelOf(competitionSpec(v));
    const equilibria = findEquilibria(model);
    const c = invasionOf(findInvasionConditions(model, equilibria), equilibria, "S", v.K1);
    const closedForm = v.r2 * (1 - (v.a21 * v.K1) / v.K2);
    expect(relative(c.value, closedForm)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
    expect(relative(c.numericEigenvalue, closedForm)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
    expect(relative(c.thresholds.find((t) => t.parameter === "a21")!.value, v.K2 / v.K1)).toBeLessThanOrEqual(
      SYMBOLIC_REL_TOL,
    );
    expect(relative(c.thresholds.find((t) => t.parameter === "K1")!.value, v.K2 / v.a21)).toBeLessThanOrEqual(
      SYMBOLIC_REL_TOL,
    );
    expect(c.thresholds.find((t) => t.parameter === "K1")!.invadesWhen).toBe("<");
  });
});

// A predator N on a prey S with a strong Allee effect (invented values; the cubic growth law with an
// Allee threshold A below the carrying capacity K is common practice): S' = r S (S/A − 1)(1 − S/K) − c N S,
// N' = N (b S − m).
// Without N, S's per-capita rate r (S/A − 1)(1 − S/K) is a quadratic with roots A and K, so the
// boundary equilibria (0, A) and (0, K) have closed forms; N's invasion rate there is b S − m.
const ALLEE_VALUES: Values = { r: 1, A: 20, K: 100, c: 0.01, b: 0.01, m: 0.5 };
function alleeSpec(values: Values): string {
  return JSON.stringify({
    keel: 1,
    id: "allee-predator",
    title: "A predator on a prey with an Allee effect (invented values)",
    time: { unit: "year" },
    states: [
      { name: "N", min: 0, max: 100 },
      { name: "S", min: 0, max: 120 },
    ],
    parameters: Object.entries(values).map(([name, value]) => ({ name, value })),
    equations: { N: "N*(b*S - m)", S: "r*S*(S/A - 1)*(1 - S/K) - c*N*S" },
    window: { N: [0, 100], S: [0, 120] },
  });
}

describe("findInvasionConditions(prey with an Allee effect)", () => {
  for (const values of [ALLEE_VALUES, { ...ALLEE_VALUES, A: 35, K: 90, b: 0.02, m: 1.1 }]) {
    it(`findInvasionConditions(Allee, A = ${values.A}, K = ${values.K}) puts (0, A) and (0, K) in closed form with N's rates b A − m and b K − m`, () => {
      const model = modelOf(alleeSpec(values));
      const equilibria = findEquilibria(model);
      const conditions = findInvasionConditions(model, equilibria);
      for (const resident of [values.A, values.K]) {
        const c = invasionOf(conditions, equilibria, "N", resident);
        expect(c.resident?.closedForm).toBe(true);
        expect(relative(evaluate(c.resident!.text, values), resident)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        const rate = values.b * resident - values.m;
        expect(relative(c.value, rate)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        expect(relative(c.numericEigenvalue, rate)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        expect(relative(evaluate(c.rate.text, values), rate)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        // linear in b and in m: N invades when b > m/S* and when m < b S*
        const inB = c.thresholds.find((t) => t.parameter === "b")!;
        expect(relative(inB.value, values.m / resident)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        expect(inB.invadesWhen).toBe(">");
        const inM = c.thresholds.find((t) => t.parameter === "m")!;
        expect(relative(inM.value, values.b * resident)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        expect(inM.invadesWhen).toBe("<");
      }
    });
  }
});

describe("assumptions against the located thresholds", () => {
  // a12 < K1/K2 is N's invasion condition at (0, K2) (Murray, 3rd ed., section 3.5, from memory):
  // its flip is the transcritical. 0.9 K1/K2 is deliberately wrong: it flips 10% early, and the
  // relative difference to the threshold, measured from the flip, is (1 − 0.9)/0.9 = 1/9.
  // The range [0.5, 2] puts a flip sample (every 1.5/400) exactly on K1/K2 = 1.25, where the
  // condition's two sides are equal: the flip must still be found.
  const results = () =>
    pipeline(
      competitionSpec(
        COMPETITION_VALUES,
        {
          assumptions: [
            { text: "N can invade the resident S.", condition: "a12 < K1/K2" },
            { text: "A wrongly stated threshold.", condition: "a12 < 0.9*K1/K2" },
            { text: "The stocks are well mixed." },
          ],
          analysis: { basins: { resolution: 64, coarse: 16 }, parameters: ["a12"] },
        },
        { a12: [0.5, 2] },
      ),
    );
  const v = COMPETITION_VALUES;

  it("evaluateAssumptions and findAssumptionFlips(competition, a12 < K1/K2) hold at the nominal values and flip on the transcritical", () => {
    const r = results();
    const transcritical = r.conditions.studies[0].thresholds.find((t) => t.kind === "transcritical")!;
    expect(relative(transcritical.value, v.K1 / v.K2)).toBeLessThanOrEqual(1e-10);

    const [right, wrong, plain] = r.assumptions;
    expect(right).toMatchObject({ holds: true, lhs: v.a12, rhs: v.K1 / v.K2 });
    expect(right.flips).toHaveLength(1);
    expect(relative(right.flips[0].value, v.K1 / v.K2)).toBeLessThanOrEqual(FLIP_REL_TOL);
    expect(right.flips[0]).toMatchObject({
      parameter: "a12",
      coincides: true,
      nearestThreshold: { kind: "transcritical", decisive: true },
    });
    expect(right.flips[0].relativeDifference!).toBeLessThanOrEqual(FLIP_REL_TOL);

    expect(wrong.holds).toBe(true);
    expect(wrong.flips).toHaveLength(1);
    expect(relative(wrong.flips[0].value, (0.9 * v.K1) / v.K2)).toBeLessThanOrEqual(FLIP_REL_TOL);
    expect(wrong.flips[0].coincides).toBe(false);
    expect(wrong.flips[0].nearestThreshold?.value).toBe(transcritical.value);
    expect(relative(wrong.flips[0].relativeDifference!, 1 / 9)).toBeLessThanOrEqual(FLIP_REL_TOL);

    expect(plain).toMatchObject({ condition: null, holds: null, flips: [] });
  });
});

describe("determinism", () => {
  // Seeded and sorted passes only (common practice): the same spec, the same block.
  it("analyze(competition with a study pair) gives a deep-equal conditions block on two runs", () => {
    const text = competitionSpec(
      COMPETITION_VALUES,
      {
        analysis: {
          basins: { resolution: 64, coarse: 16 },
          parameters: ["a12", "a21"],
          parameterPairs: [["a12", "a21"]],
        },
      },
      { a12: [0.5, 2], a21: [0.4, 1.3] },
    );
    const first = pipeline(text).conditions;
    const second = pipeline(text).conditions;
    expect(first.studies).toHaveLength(2);
    expect(first.maps).toHaveLength(1);
    expect(second).toEqual(first);
    expect(JSON.stringify(second)).toBe(JSON.stringify(first));
  });
});

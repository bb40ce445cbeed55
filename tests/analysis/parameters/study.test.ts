import { evaluate } from "mathjs";
import { describe, expect, it } from "vitest";
import type { ParameterStudyResult, Results } from "../../../src/analysis/types.js";
import type { EquilibriumAttractor, OutcomeFateResult } from "../../../src/analysis/parameters/outcomes.js";
import { runPipeline } from "../../../src/pipeline.js";
import { runReference } from "../../fixtures/scipy.js";

/** Required accuracy: thresholds located to 1e-10 relative in the parameter. */
const THRESHOLD_REL_TOL = 1e-10;
/** ... and symbolic conditions equal to the numerical thresholds to 1e-9 relative. */
const SYMBOLIC_REL_TOL = 1e-9;
/** Equilibria against closed forms, relative to the window: Newton converges to ~1e-14. */
const POINT_REL_TOL = 1e-9;

const relative = (value: number, reference: number) => Math.abs(value - reference) / Math.abs(reference);

function pipeline(specText: string): Results {
  const out = runPipeline(specText);
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return out.value.results;
}

function study(results: Results, parameter: string): ParameterStudyResult {
  const s = results.conditions.studies.find((q) => q.parameter === parameter);
  expect(s, `study of ${parameter}`).toBeDefined();
  return s!;
}

const decisive = (s: ParameterStudyResult) => s.thresholds.filter((t) => t.decisive);

/** The one stable equilibrium that keeps exactly these states present. */
const alone = (...present: string[]): EquilibriumAttractor => ({
  kind: "equilibrium",
  present,
  rank: { index: 0, of: 1 },
});
const reaches = (...present: string[]): OutcomeFateResult => ({
  kind: "attractor",
  attractor: alone(...present),
});

// ---------------------------------------------------------------- competition

// Two-species Lotka–Volterra competition (Murray, Mathematical Biology I, 3rd ed., section 3.5;
// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4; from memory):
// N' = r1 N (1 − (N + a12 S)/K1), S' = r2 S (1 − (S + a21 N)/K2). The four cases:
//  a12 < K1/K2 and a21 < K2/K1: the coexistence point ((K1 − a12 K2)/(1 − a12 a21), (K2 − a21 K1)/(1 − a12 a21))
//    is the one stable equilibrium;
//  a12 < K1/K2, a21 > K2/K1: N wins, (K1, 0);  a12 > K1/K2, a21 < K2/K1: S wins, (0, K2);
//  both above: (K1, 0) and (0, K2) are both stable, and the coexistence point is a saddle between them.
// Values are invented for the tests: K1/K2 = 1.25, K2/K1 = 0.8.
const BASE = { r1: 1.1, r2: 0.7, K1: 100, K2: 80 };
const A12_THRESHOLD = BASE.K1 / BASE.K2;
const A21_THRESHOLD = BASE.K2 / BASE.K1;
const SIZE = 120;
/**
 * Of the study's 25 outcome samples lo + (hi − lo)k/24, the tenth is 0.5 + 2 · 9/24 = 1.25 = K1/K2
 * exactly: there (0, K2) is non-hyperbolic and nothing is stable, a degenerate point that must not
 * become an outcome interval of its own.
 */
const A12_RANGE: [number, number] = [0.5, 2.5];
/** Long enough that s-heavy's fate is decided next to the separatrix crossing (its approach to (0, K2) is slow there). */
const HORIZON = 2000;
/** A break located by the study against the reference bisection, relatively (the study bisects to 1e-6 of the range). */
const BREAK_REL_TOL = 1e-5;

function competitionSpec(a12: number, a21: number): string {
  return JSON.stringify({
    keel: 1,
    id: "competition-thresholds",
    title: "Lotka–Volterra competition (invented values)",
    time: { unit: "year" },
    states: [
      { name: "N", min: 0, max: SIZE },
      { name: "S", min: 0, max: SIZE },
    ],
    parameters: [
      ...Object.entries(BASE).map(([name, value]) => ({ name, value })),
      { name: "a12", value: a12, range: A12_RANGE },
      { name: "a21", value: a21, range: [0.4, 1.3] },
    ],
    equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
    window: { N: [0, SIZE], S: [0, SIZE] },
    scenarios: [
      { name: "n-heavy", initial: { N: 110, S: 5 }, horizon: HORIZON },
      { name: "s-heavy", initial: { N: 5, S: 110 }, horizon: HORIZON },
    ],
    analysis: { basins: { resolution: 64, coarse: 16 }, parameters: ["a12"] },
  });
}

interface CompetitionCase {
  name: string;
  a12: number;
  a21: number;
  /** The textbook's stable equilibria at these values. */
  stable: (a12: number, a21: number) => [number, number][];
  /** Outcome of the a12 study below and above K1/K2 (a21 fixed): attractors, and the two scenarios' fates. */
  below: { attractors: EquilibriumAttractor[]; fates: [OutcomeFateResult, OutcomeFateResult] };
  above: { attractors: EquilibriumAttractor[]; fates: [OutcomeFateResult, OutcomeFateResult] };
}

const coexistencePoint = (a12: number, a21: number): [number, number] => [
  (BASE.K1 - a12 * BASE.K2) / (1 - a12 * a21),
  (BASE.K2 - a21 * BASE.K1) / (1 - a12 * a21),
];

// a21 below K2/K1: coexistence turns into "S wins" as a12 passes K1/K2; above it, "N wins" turns into bistability
const WEAK_A21: Pick<CompetitionCase, "below" | "above"> = {
  below: { attractors: [alone("N", "S")], fates: [reaches("N", "S"), reaches("N", "S")] },
  above: { attractors: [alone("S")], fates: [reaches("S"), reaches("S")] },
};
// n-heavy starts next to (K1, 0) and s-heavy next to (0, K2): in the bistable case each stays with its
// own, but only once the saddle's stable manifold, sweeping away from the N = 0 axis as a12 grows past
// K1/K2, has passed s-heavy's start: a separatrix crossing at a12* a little above the transcritical
const STRONG_A21: Pick<CompetitionCase, "below" | "above"> = {
  below: { attractors: [alone("N")], fates: [reaches("N"), reaches("N")] },
  above: { attractors: [alone("N"), alone("S")], fates: [reaches("N"), reaches("S")] },
};

const CASES: CompetitionCase[] = [
  { name: "coexistence", a12: 0.6, a21: 0.5, stable: (u, v) => [coexistencePoint(u, v)], ...WEAK_A21 },
  { name: "N wins", a12: 0.6, a21: 1.2, stable: () => [[BASE.K1, 0]], ...STRONG_A21 },
  { name: "S wins", a12: 1.6, a21: 0.5, stable: () => [[0, BASE.K2]], ...WEAK_A21 },
  {
    name: "bistable",
    a12: 1.6,
    a21: 1.2,
    stable: () => [
      [0, BASE.K2],
      [BASE.K1, 0],
    ],
    ...STRONG_A21,
  },
];

/**
 * a12*, where s-heavy's fate switches from (K1, 0) to (0, K2) at a21 = 1.2: scipy's DOP853 (rtol 1e-10)
 * with bisection on the fate (tests/reference/fate_bisection.py). Arrival within 0.01 of a stable node
 * decides a fate: the saddle stays more than 1 away from either node near a12*.
 */
function separatrixCrossing(a21: number): number {
  return runReference<{ value: number }>("fate_bisection.py", {
    states: ["N", "S"],
    rhs: ["r1*N*(1 - (N + a12*S)/K1)", "r2*S*(1 - (S + a21*N)/K2)"],
    parameters: { ...BASE, a21 },
    parameter: "a12",
    start: [5, 110],
    horizon: 20_000,
    attractors: [
      { name: "N", point: [BASE.K1, 0] },
      { name: "S", point: [0, BASE.K2] },
    ],
    arrival: 0.01,
    mode: "bisect",
    bracket: [1.26, 1.3],
    tol: 1e-10,
  }).value;
}

/** Each fate the textbook's, or undecided at the horizon (slow approach next to the transcritical). */
function expectFates(got: OutcomeFateResult[], textbook: OutcomeFateResult[], where: string) {
  got.forEach((f, k) =>
    expect(f.kind === "undecided" ? f : textbook[k], where).toEqual(
      f.kind === "undecided" ? { kind: "undecided", reason: "horizon" } : f,
    ),
  );
}

describe("studyParameter(competition, a12): the four textbook outcomes", () => {
  for (const c of CASES) {
    const side = c.a12 < A12_THRESHOLD ? "below" : "above";
    const strong = c.a21 > A21_THRESHOLD;
    it(`analyze(competition, ${c.name}: a12 = ${c.a12}, a21 = ${c.a21}) has the textbook's stable equilibria, the transcritical at a12 = K1/K2 and the outcome on each side`, () => {
      expect(c.a12 < A12_THRESHOLD).toBe(c.name === "coexistence" || c.name === "N wins");
      expect(c.a21 < A21_THRESHOLD).toBe(c.name === "coexistence" || c.name === "S wins");
      const results = pipeline(competitionSpec(c.a12, c.a21));

      // stable equilibria: exactly the textbook's, in (N, S) order
      const stable = results.equilibria.filter((e) => e.stable === true).map((e) => [e.point.N, e.point.S]);
      const expected = c.stable(c.a12, c.a21);
      expect(stable, JSON.stringify(stable)).toHaveLength(expected.length);
      for (const [N, S] of expected) {
        expect(
          stable.some(
            ([n, s]) => Math.abs(n - N) / SIZE <= POINT_REL_TOL && Math.abs(s - S) / SIZE <= POINT_REL_TOL,
          ),
          `stable (${N}, ${S})`,
        ).toBe(true);
      }
      if (c.name === "bistable") {
        const [N, S] = coexistencePoint(c.a12, c.a21);
        const interior = results.equilibria.filter((e) => e.point.N > 0 && e.point.S > 0);
        expect(interior).toHaveLength(1);
        expect(interior[0].type).toBe("saddle");
        expect(Math.abs(interior[0].point.N - N) / SIZE).toBeLessThanOrEqual(POINT_REL_TOL);
        expect(Math.abs(interior[0].point.S - S) / SIZE).toBeLessThanOrEqual(POINT_REL_TOL);
      }

      // the a12 study: one decisive transcritical, at K1/K2, where N's invasion rate at (0, K2) vanishes
      const s = study(results, "a12");
      expect(decisive(s).map((t) => t.kind)).toEqual(["transcritical"]);
      const t = decisive(s)[0];
      expect(relative(t.value, A12_THRESHOLD)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
      expect(t.bound).toEqual({ state: "N", value: 0 });
      expect(Math.abs(t.point.S - BASE.K2) / SIZE).toBeLessThanOrEqual(POINT_REL_TOL);
      // the break carries its closed form, K1 / K2, which the report prints beside it
      expect(evaluate(t.symbolic!.text, BASE)).toBeCloseTo(A12_THRESHOLD, 12);

      // the attractors on each side of the threshold are the textbook's, the fates too where decided
      const breaks = s.intervals.slice(1).map((iv) => iv.from);
      const at = breaks.findIndex((b) => b.kind === "threshold");
      expect(breaks[at]).toEqual({ value: t.value, kind: "threshold", threshold: "transcritical" });
      s.intervals.forEach((iv, k) => {
        const where = `interval ${k}: ${JSON.stringify(iv.outcome)}`;
        expect(iv.outcome.attractors, where).toEqual(k <= at ? c.below.attractors : c.above.attractors);
      });
      expect(s.intervals[0].outcome.scenarios.map((q) => q.fate)).toEqual(c.below.fates);
      expect(s.intervals[s.intervals.length - 1].outcome.scenarios.map((q) => q.fate)).toEqual(c.above.fates);
      expect(s.intervals.filter((iv) => iv.containsNominal)).toHaveLength(1);

      if (strong) {
        // N wins / bistable: the separatrix crossing at a12* is the one other break, where scipy puts it
        const crossing = separatrixCrossing(c.a21);
        expect(crossing).toBeGreaterThan(A12_THRESHOLD);
        expect(breaks.map((b) => b.kind)).toEqual(["threshold", "sampled-break"]);
        expect(
          relative(breaks[1].value, crossing),
          `keel ${breaks[1].value}, scipy ${crossing}`,
        ).toBeLessThanOrEqual(BREAK_REL_TOL);
        // between the two, s-heavy still goes to (K1, 0) though (0, K2) is stable
        expect(s.intervals[1].outcome.scenarios.map((q) => q.fate)).toEqual(c.below.fates);
      } else {
        // coexistence / S wins: next to the threshold the approach is too slow to decide by the horizon;
        // those are limits of what was decided, never breaks
        for (const b of breaks.filter((q) => q.kind !== "threshold")) {
          expect(b.kind).toBe("decision-limit");
          if (b.kind === "decision-limit") for (const u of b.undecided) expect(u.reason).toBe("horizon");
        }
        s.intervals.forEach((iv, k) =>
          expectFates(
            iv.outcome.scenarios.map((q) => q.fate),
            k <= at ? c.below.fates : c.above.fates,
            `interval ${k}`,
          ),
        );
      }

      // the margin: (break − value)/|break|, worked by hand: 52% below K1/K2 from 0.6, 28% above it from
      // 1.6; in the bistable case the nearer break from 1.6 is the separatrix crossing
      const margin = s.margin!;
      expect(margin.side).toBe(side);
      expect(margin.form).toBe("relative");
      if (c.name === "bistable") {
        expect(margin.to).toEqual(breaks[1]);
        expect(relative(margin.relative!, (breaks[1].value - c.a12) / breaks[1].value)).toBeLessThanOrEqual(
          SYMBOLIC_REL_TOL,
        );
      } else {
        expect(margin.to).toEqual(breaks[at]);
        expect(relative(margin.relative!, (A12_THRESHOLD - c.a12) / A12_THRESHOLD)).toBeLessThanOrEqual(
          SYMBOLIC_REL_TOL,
        );
        expect(Math.abs(100 * margin.relative!)).toBeCloseTo(side === "below" ? 52 : 28, 9);
      }
    });
  }
});

describe("studyParameter: symbolic conditions beside the located thresholds", () => {
  // The same model with the carrying capacities studied too, in a window wide enough for (0, K1/a12).
  // Each transcritical is where one invasion rate vanishes (Murray, 3rd ed., section 3.5, from memory):
  // N's r1 (1 − a12 K2/K1) at (0, K2), S's r2 (1 − a21 K1/K2) at (K1, 0).
  const values = { ...BASE, a12: 0.6, a21: 0.5 };
  const size = 250;
  const text = JSON.stringify({
    keel: 1,
    id: "competition-symbolic",
    title: "Lotka–Volterra competition (invented values)",
    time: { unit: "year" },
    states: [
      { name: "N", min: 0, max: size },
      { name: "S", min: 0, max: size },
    ],
    parameters: [
      { name: "r1", value: values.r1 },
      { name: "r2", value: values.r2 },
      { name: "K1", value: values.K1, range: [30, 200] },
      { name: "K2", value: values.K2, range: [40, 200] },
      { name: "a12", value: values.a12, range: [0.5, 2] },
      { name: "a21", value: values.a21, range: [0.4, 1.3] },
    ],
    equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
    window: { N: [0, size], S: [0, size] },
    analysis: { basins: { resolution: 64, coarse: 16 } },
  });
  const references: Record<string, { value: number; absent: string }[]> = {
    a12: [{ value: values.K1 / values.K2, absent: "N" }],
    a21: [{ value: values.K2 / values.K1, absent: "S" }],
    K1: [
      { value: values.a12 * values.K2, absent: "N" },
      { value: values.K2 / values.a21, absent: "S" },
    ],
    K2: [
      { value: values.a21 * values.K1, absent: "S" },
      { value: values.K1 / values.a12, absent: "N" },
    ],
  };

  it("analyze(competition, a12, a21, K1, K2) locates each decisive threshold at its closed form, each with a symbolic condition equal to it", () => {
    const results = pipeline(text);
    for (const [parameter, expected] of Object.entries(references)) {
      const found = decisive(study(results, parameter));
      expect(
        found.map((t) => t.kind),
        parameter,
      ).toEqual(expected.map(() => "transcritical"));
      found.forEach((t, k) => {
        const where = `${parameter} threshold ${k + 1}`;
        expect(relative(t.value, expected[k].value), where).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
        expect(t.symbolic, where).not.toBeNull();
        expect(t.symbolic!.relativeDifference, where).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
        expect(t.symbolic!.absent, where).toBe(expected[k].absent);
        expect(relative(evaluate(t.symbolic!.text, values), expected[k].value), where).toBeLessThanOrEqual(
          SYMBOLIC_REL_TOL,
        );
      });
    }
  });

  it("studyParameter(competition, K2) finds three intervals, bounded by a21 K1 and K1/a12", () => {
    // one outcome sample, 40 + 160 · 9.5/12, lies within rounding of K1/a12 = 166.67: no sliver there either
    const s = study(pipeline(text), "K2");
    expect(s.intervals.map((iv) => [iv.from.kind, iv.to.kind])).toEqual([
      ["range-end", "threshold"],
      ["threshold", "threshold"],
      ["threshold", "range-end"],
    ]);
    expect(s.intervals.map((iv) => iv.outcome.attractors)).toEqual([
      [alone("N")],
      [alone("N", "S")],
      [alone("S")],
    ]);
    // the middle interval's ends carry the closed forms a21 K1 = 50 and K1/a12 = 166.67
    const closedForm = (v: number) =>
      evaluate(s.thresholds.find((t) => t.value === v)!.symbolic!.text, values);
    expect(closedForm(s.intervals[1].from.value)).toBeCloseTo(values.a21 * values.K1, 9);
    expect(closedForm(s.intervals[1].to.value)).toBeCloseTo(values.K1 / values.a12, 9);
  });
});

// ---------------------------------------------------------------- harvesting

// Logistic growth with constant harvesting, x' = r x (1 − x/K) − H, and y' = −y to make it planar.
// Equilibria x± = (K/2)(1 ± √(1 − 4H/(rK))) meet in a saddle-node at H = rK/4; x+ is stable, x− a
// saddle; above rK/4 every population is harvested to extinction (common textbook fact; e.g.
// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 3.7, from memory). Invented values.
describe("studyParameter(harvesting, H)", () => {
  const [r, K] = [1.5, 40];
  const nominal = 0.2 * r * K;
  const text = JSON.stringify({
    keel: 1,
    id: "harvesting",
    title: "Logistic growth with constant harvesting (invented values)",
    time: { unit: "year" },
    states: [
      { name: "x", min: 0, max: 50 },
      { name: "y", min: 0, max: 1 },
    ],
    parameters: [
      { name: "r", value: r },
      { name: "K", value: K },
      { name: "H", value: nominal, range: [0, (r * K) / 2] },
    ],
    equations: { x: "r*x*(1 - x/K) - H", y: "-y" },
    window: { x: [0, 50], y: [0, 1] },
    scenarios: [{ name: "stocked", initial: { x: 30, y: 0.5 }, horizon: 100 }],
    analysis: { basins: { resolution: 64, coarse: 16 } },
  });
  const upperRoot = (h: number) => (K / 2) * (1 + Math.sqrt(1 - (4 * h) / (r * K)));

  it("studyParameter(harvesting, H) splits [0, rK/2] at the fold H = rK/4: a stable x+ below, collapse above, and a 20% margin", () => {
    const results = pipeline(text);
    const s = study(results, "H");
    expect(decisive(s).map((t) => t.kind)).toEqual(["saddle-node"]);
    const fold = decisive(s)[0];
    expect(relative(fold.value, (r * K) / 4)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(Math.abs(fold.point.x - K / 2) / 50).toBeLessThanOrEqual(POINT_REL_TOL);

    expect(s.intervals).toHaveLength(2);
    const [below, above] = s.intervals;
    expect([below.from.value, below.to.value, above.from.value, above.to.value]).toEqual([
      0,
      fold.value,
      fold.value,
      (r * K) / 2,
    ]);
    expect(below.to).toEqual({ value: fold.value, kind: "threshold", threshold: "saddle-node" });
    // y decays to its bound 0, so the stable x+ keeps x alone present
    expect(below.outcome.attractors).toEqual([alone("x")]);
    expect(below.outcome.scenarios).toEqual([{ name: "stocked", fate: reaches("x") }]);
    expect(above.outcome.attractors).toEqual([]);
    // above the fold x' < 0 everywhere: x is driven through its bound 0
    const fate = above.outcome.scenarios[0].fate;
    // (a blow-up after the exit is that exit: whether it comes before the horizon is the horizon's doing)
    expect(fate, JSON.stringify(fate)).toEqual({ kind: "left-window", state: "x" });

    // the stable equilibrium below the fold is the larger root, along every branch and at the nominal value
    let checked = 0;
    for (const b of s.continuation.branches) {
      for (const pt of b.points) {
        if (pt.value >= fold.value * (1 - 1e-6) || pt.stable !== true) continue;
        expect(
          Math.abs(pt.point.x - upperRoot(pt.value)) / 50,
          `stable point at H = ${pt.value}`,
        ).toBeLessThanOrEqual(POINT_REL_TOL);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(5);
    const stableNow = results.equilibria.filter((e) => e.stable === true);
    expect(stableNow).toHaveLength(1);
    expect(Math.abs(stableNow[0].point.x - upperRoot(nominal)) / 50).toBeLessThanOrEqual(POINT_REL_TOL);

    // margin: (rK/4 − 0.2 rK)/(rK/4) = 1 − 0.8 = 0.2, below
    expect(s.margin).toMatchObject({
      to: { kind: "threshold", threshold: "saddle-node", value: fold.value },
      side: "below",
    });
    expect(s.margin!.form).toBe("relative");
    expect(Math.abs(s.margin!.relative! - 0.2)).toBeLessThanOrEqual(SYMBOLIC_REL_TOL);
  });
});

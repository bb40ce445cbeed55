import { describe, expect, it } from "vitest";
import {
  continueEquilibria,
  type ContinuationResult,
  type SpecialPointResult,
} from "../../../src/analysis/parameters/continuation/index.js";
import { findEquilibria } from "../../../src/analysis/phase/equilibria.js";
import { ROOT_RESIDUAL_TOL } from "../../../src/analysis/constants.js";
import { compileHigherDerivatives, compileParameterDerivative } from "../../../src/model/higher.js";
import { withParameters } from "../../../src/model/parameters.js";
import type { Diagnostic } from "../../../src/diagnostics/issue.js";
import type { Model } from "../../../src/model/types.js";
import * as jet from "../../fixtures/jets.js";
import type { JetField } from "../../fixtures/jets.js";
import { buildModel, type ModelFixture } from "../../fixtures/models.js";
import { buildSystem } from "../../../src/analysis/parameters/continuation/system.js";
import { continueBranch } from "../../../src/analysis/parameters/continuation/branch.js";
import { buildSpecialPoints } from "../../../src/analysis/parameters/continuation/special.js";
import type { LocatedEvent } from "../../../src/analysis/parameters/continuation/detect.js";
import { DEFAULT_STEP_OPTIONS } from "../../../src/analysis/constants.js";

/** Required accuracy: thresholds located to 1e-10 relative in the parameter. */
const THRESHOLD_REL_TOL = 1e-10;
/** Where the reference value is 0, relative accuracy has no meaning: 1e-12 of the range width. */
const THRESHOLD_ABS_TOL = 1e-12;
/** Located points against closed forms, relative to the window: the corrector converges to ~1e-14. */
const POINT_REL_TOL = 1e-9;
/**
 * l1 by two formulas in double precision (keel's symbolic derivatives, the test's exact jets): agreement to
 * 1e-9 relative.
 */
const LYAPUNOV_AGREEMENT_TOL = 1e-9;

function relative(value: number, reference: number): number {
  return Math.abs(value - reference) / Math.abs(reference);
}

function only(result: ContinuationResult, kind: SpecialPointResult["kind"]): SpecialPointResult {
  const found = result.points.filter((p) => p.kind === kind);
  expect(
    found,
    `${kind} points: ${JSON.stringify(result.points.map((p) => [p.kind, p.value]))}`,
  ).toHaveLength(1);
  return found[0];
}

function withValue(model: Model, name: string, value: number): Float64Array {
  const p = Float64Array.from(model.parameterValues);
  p[model.parameterNames.indexOf(name)] = value;
  return p;
}

/** Every recorded branch point is an equilibrium at its own parameter value. */
function expectOnCurve(model: Model, result: ContinuationResult) {
  const f = new Float64Array(2);
  for (const branch of result.branches) {
    for (const pt of branch.points) {
      const x = model.stateNames.map((n) => pt.point[n]);
      model.rhsParametric(x, withValue(model, result.parameter, pt.value), f);
      const scale = Math.max(1, ...x.map(Math.abs));
      expect(
        Math.max(Math.abs(f[0]), Math.abs(f[1])) / scale,
        `branch ${branch.index} at ${pt.value}`,
      ).toBeLessThan(1e-9);
    }
  }
}

// Logistic growth with constant harvesting, x' = r x (1 − x/K) − h; a second state y' = −y makes it planar.
// Equilibria x± = (K/2)(1 ± √(1 − 4h/(rK))), which meet in a fold at h = rK/4, x = K/2
// (common textbook fact; e.g. Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 3.7).
const harvesting: ModelFixture = {
  equations: { x: "r*x*(1 - x/K) - h", y: "-y" },
  window: { x: [0, 3], y: [0, 1] },
  parameters: { r: 0.8, K: 2, h: 0.2 },
};

// Brusselator, x' = a − (b + 1) x + x² y, y' = b x − x² y: equilibrium (a, b/a), J = [[b − 1, a²], [−b,
// −a²]],
// trace b − 1 − a², det a² > 0 (worked by hand), so a Hopf point at b = 1 + a², supercritical (the
// model: Prigogine and Lefever, "Symmetry breaking instabilities in dissipative systems. II",
// J. Chem. Phys. 48 (1968) 1695–1700, from memory).
const brusselator = (a: number): ModelFixture => ({
  equations: { x: "a - (b + 1)*x + x^2*y", y: "b*x - x^2*y" },
  window: { x: [0, 2 * a + 1], y: [0, 8] },
  parameters: { a, b: 1.5 },
});

// Logistic prey and a Holling type II predator (Rosenzweig, "Paradox of enrichment: destabilization
// of exploitation ecosystems in ecological time", Science 171 (1971) 385–387, from memory):
// x' = r x (1 − x/K) − a x y/(1 + a h x), y' = c a x y/(1 + a h x) − m y.
// The predator's per-capita rate vanishes at x* = m/(a (c − m h)); there J22 = 0, so trace J = J11
// and det J = −J12 J21 > 0. J11 = x* ∂/∂x [r (1 − x/K) − a y*/(1 + a h x)] with
// a y* = r (1 − x*/K)(1 + a h x*), so J11 = 0 ⇔ −r/K + r (1 − x*/K) a h/(1 + a h x*) = 0
// ⇔ 1 + a h x* = a h (K − x*) ⇔ K_H = 2 x* + 1/(a h): the equilibrium sits at the hump of the
// prey nullcline. For K > K_H it loses stability to a stable cycle (supercritical).
const rosenzweig: ModelFixture = {
  equations: { x: "r*x*(1 - x/K) - a*x*y/(1 + a*h*x)", y: "c*a*x*y/(1 + a*h*x) - m*y" },
  window: { x: [0, 5], y: [0, 3] },
  parameters: { r: 1, K: 2, a: 1, h: 1, c: 0.5, m: 0.2 },
};

// Two-species Lotka–Volterra competition (Murray, Mathematical Biology I, 3rd ed., section 3.5):
// N' = r1 N (1 − (N + a12 S)/K1), S' = r2 S (1 − (S + a21 N)/K2). The invasion rate of N at
// (0, K2) is r1 (1 − a12 K2/K1) and that of S at (K1, 0) is r2 (1 − a21 K1/K2): transcritical
// thresholds at a12 = K1/K2 and a21 = K2/K1, where the coexistence equilibrium
// ((K1 − a12 K2)/(1 − a12 a21), (K2 − a21 K1)/(1 − a12 a21)) crosses the axis and the two exchange stability.
const competition = (a12: number, a21: number): ModelFixture => ({
  equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
  window: { N: [0, 160], S: [0, 160] },
  parameters: { r1: 0.8, r2: 0.5, K1: 130, K2: 90, a12, a21 },
});

// Hopf normal form in Cartesian coordinates (Kuznetsov, Elements of Applied Bifurcation Theory,
// 3rd ed., section 3.4): x' = mu x − w y + s x (x² + y²), y' = w x + mu y + s y (x² + y²). Hopf at mu = 0;
// in complex form z' = (mu + i w) z + s z|z|², so with the eigenvector normalised as ⟨q, q⟩ = 1,
// l1 = 2 s / w (worked by hand from Kuznetsov's eq. (3.20), from memory).
const normalForm = (s: number, w = 1): ModelFixture => ({
  equations: { x: "mu*x - w*y + s*x*(x^2 + y^2)", y: "w*x + mu*y + s*y*(x^2 + y^2)" },
  window: { x: [-1, 1], y: [-1, 1] },
  parameters: { mu: 0.1, w, s },
});

/**
 * An independent l1: the planar formula of Guckenheimer and Holmes, Nonlinear Oscillations,
 * Dynamical Systems, and Bifurcations of Vector Fields, section 3.4, eq. (3.4.11) (from memory),
 * 16 a = f_xxx + f_xyy + g_xxy + g_yyy + (1/ω)[f_xy (f_xx + f_yy) − g_xy (g_xx + g_yy) − f_xx g_xx + f_yy
 * g_yy],
 * in coordinates where the linear part is [[0, −ω], [ω, 0]]. Derivatives come from jets (exact
 * truncated Taylor arithmetic, tests/fixtures/jets.ts) on the right-hand side typed out by hand,
 * not from mathjs's `derivative`, which keel's own derivatives build on. The coordinates are
 * ξ ↦ x* + P ξ with P = √2 [Re q, −Im q], |q| = 1, for which Kuznetsov's l1 equals 2a/ω (a is the
 * r³ coefficient of the radial equation in the original time, l1 = Re c1/ω in time scaled by ω;
 * both read off the normal form above, from memory).
 */
function planarLyapunov(field: JetField, at: [number, number]): number {
  // the Jacobian: first-order coefficients in the state coordinates themselves
  const plain = field(jet.variable(at[0], 1, 0), jet.variable(at[1], 0, 1));
  const J = plain.map((fi) => [jet.partial(fi, 1, 0), jet.partial(fi, 0, 1)]);
  const omega = Math.sqrt(J[0][0] * J[1][1] - J[0][1] * J[1][0]);
  // q ∝ (J01, iω − J00): (J − iω) q = 0 from the first row
  const qRe = [J[0][1], -J[0][0]];
  const qIm = [0, omega];
  const norm = Math.hypot(...qRe, ...qIm);
  const P = [
    [qRe[0], -qIm[0]],
    [qRe[1], -qIm[1]],
  ].map((row) => row.map((x) => (Math.SQRT2 * x) / norm));
  const detP = P[0][0] * P[1][1] - P[0][1] * P[1][0];
  const Pinv = [
    [P[1][1] / detP, -P[0][1] / detP],
    [-P[1][0] / detP, P[0][0] / detP],
  ];
  // F(ξ) = P⁻¹ f(x* + P ξ), as jets in ξ
  const moved = field(jet.variable(at[0], P[0][0], P[0][1]), jet.variable(at[1], P[1][0], P[1][1]));
  const [F, G] = Pinv.map((row) => jet.add(jet.scale(moved[0], row[0]), jet.scale(moved[1], row[1])));
  expect(jet.partial(F, 1, 0)).toBeCloseTo(0, 10);
  expect(jet.partial(F, 0, 1)).toBeCloseTo(-omega, 10);
  const d = jet.partial;
  const sixteenA =
    d(F, 3, 0) +
    d(F, 1, 2) +
    d(G, 2, 1) +
    d(G, 0, 3) +
    (d(F, 1, 1) * (d(F, 2, 0) + d(F, 0, 2)) -
      d(G, 1, 1) * (d(G, 2, 0) + d(G, 0, 2)) -
      d(F, 2, 0) * d(G, 2, 0) +
      d(F, 0, 2) * d(G, 0, 2)) /
      omega;
  return (2 * sixteenA) / 16 / omega;
}

/** The Brusselator typed out in jet operations: x' = a − (b + 1) x + x² y, y' = b x − x² y. */
const brusselatorJets =
  (a: number, b: number): JetField =>
  (x, y) => {
    const x2y = jet.mul(x, x, y);
    return [jet.add(jet.constant(a), jet.scale(x, -(b + 1)), x2y), jet.sub(jet.scale(x, b), x2y)];
  };

/**
 * Rosenzweig's model in jet operations: x' = r x (1 − x/K) − a x y/(1 + a h x), y' = c a x y/(1 + a h x) − m
 * y.
 */
const rosenzweigJets =
  (p: Record<string, number>): JetField =>
  (x, y) => {
    const intake = jet.div(jet.scale(jet.mul(x, y), p.a), jet.add(jet.constant(1), jet.scale(x, p.a * p.h)));
    const growth = jet.scale(jet.mul(x, jet.sub(jet.constant(1), jet.scale(x, 1 / p.K))), p.r);
    return [jet.sub(growth, intake), jet.sub(jet.scale(intake, p.c), jet.scale(y, p.m))];
  };

describe("higher derivatives and parameter views", () => {
  // Brusselator derivatives by hand (common practice): f1 = a − (b+1)x + x²y, f2 = bx − x²y.
  it("compileHigherDerivatives(brusselator) gives the hand-worked second and third derivatives", () => {
    const model = buildModel(brusselator(1));
    const { second, third } = compileHigherDerivatives(model);
    const [x, y] = [1.3, 0.7];
    const d2 = new Float64Array(8);
    const d3 = new Float64Array(16);
    second.evaluate([x, y], model.parameterValues, d2);
    third.evaluate([x, y], model.parameterValues, d3);
    // order (i, j, k): f1xx f1xy f1yx f1yy f2xx f2xy f2yx f2yy
    expect(Array.from(d2)).toEqual([2 * y, 2 * x, 2 * x, 0, -2 * y, -2 * x, -2 * x, 0]);
    const want3 = new Array(16).fill(0);
    for (const idx of [1, 2, 4]) {
      want3[idx] = 2;
      want3[8 + idx] = -2;
    } // xxy, xyx, yxx
    expect(Array.from(d3)).toEqual(want3);
  });

  it("compileParameterDerivative(brusselator, b) gives (−x, x)", () => {
    const model = buildModel(brusselator(1));
    const out = new Float64Array(2);
    compileParameterDerivative(model, model.parameterNames.indexOf("b")).evaluate(
      [1.3, 0.7],
      model.parameterValues,
      out,
    );
    expect(Array.from(out)).toEqual([-1.3, 1.3]);
  });

  it("findEquilibria(withParameters(harvesting, h = 0.3)) finds x = 0.5 and 1.5 and leaves the model alone", () => {
    // x± = (K/2)(1 ± √(1 − 4h/(rK))) = 1 ± 0.5 for r = 0.8, K = 2, h = 0.3
    const model = buildModel(harvesting);
    const view = withParameters(model, withValue(model, "h", 0.3));
    expect(findEquilibria(view).map((e) => e.point.x)).toEqual([
      expect.closeTo(0.5, 12),
      expect.closeTo(1.5, 12),
    ]);
    expect(findEquilibria(model).map((e) => e.point.x)).toEqual([
      expect.closeTo(1 - Math.SQRT1_2, 12),
      expect.closeTo(1 + Math.SQRT1_2, 12),
    ]);
    expect(model.parameterValues[2]).toBe(0.2);
    expect(view.source.rhs).toContain("0.3");
  });
});

describe("continueEquilibria on textbook thresholds", () => {
  it("continueEquilibria(harvesting, h) locates the fold at h = rK/4 to 1e-10", () => {
    const model = buildModel(harvesting);
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(model, "h", [0.05, 0.6], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const fold = only(result, "saddle-node");
    const [r, K] = [0.8, 2];
    expect(relative(fold.value, (r * K) / 4)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(Math.abs(fold.point.x - K / 2) / 3).toBeLessThanOrEqual(POINT_REL_TOL);
    expect(fold.residual).toBeLessThanOrEqual(ROOT_RESIDUAL_TOL);
    // both equilibria lie on one branch, traced through the fold: the saddle x− and the stable node x+
    expect(result.branches).toHaveLength(1);
    expect([fold.stabilityChange.before, fold.stabilityChange.after].sort()).toEqual([
      "saddle",
      "stable-node",
    ]);
    for (const pt of result.branches[0].points) {
      if (Math.abs(pt.point.x - K / 2) > 1e-6)
        expect(pt.type).toBe(pt.point.x > K / 2 ? "stable-node" : "saddle");
    }
    expectOnCurve(model, result);
  });

  it("continueEquilibria(harvesting, h) reports the lower equilibrium leaving the feasible region at h = 0", () => {
    // x− = (K/2)(1 − √(1 − 4h/(rK))) = 0 exactly when h = 0 (closed form above); det J = −r(1 − 2x/K) ≠ 0
    // there
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(buildModel(harvesting), "h", [-0.1, 0.6], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const crossing = only(result, "boundary-crossing");
    expect(Math.abs(crossing.value)).toBeLessThanOrEqual(THRESHOLD_ABS_TOL * 0.7);
    expect(crossing.bound).toEqual({ state: "x", value: 0 });
    expect(Math.abs(crossing.point.x) / 3).toBeLessThanOrEqual(THRESHOLD_ABS_TOL);
  });

  for (const a of [1, 1.5]) {
    it(`continueEquilibria(brusselator a = ${a}, b) locates a supercritical Hopf point at b = 1 + a² to 1e-10`, () => {
      const fixture = brusselator(a);
      const model = buildModel(fixture);
      const diagnostics: Diagnostic[] = [];
      const result = continueEquilibria(model, "b", [1, 4], {}, diagnostics);
      expect(diagnostics).toEqual([]);
      const hopf = only(result, "hopf");
      expect(relative(hopf.value, 1 + a * a)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
      expect(Math.abs(hopf.point.x - a) / fixture.window.x[1]).toBeLessThanOrEqual(POINT_REL_TOL);
      expect(hopf.criticality).toBe("supercritical");
      expect(hopf.stabilityChange).toEqual({ before: "stable-focus", after: "unstable-focus" });
      // eigenvalues ±i√det = ±i a at the Hopf point
      expect(hopf.eigenvalues.map((e) => e.im)).toEqual([expect.closeTo(-a, 9), expect.closeTo(a, 9)]);
      const reference = planarLyapunov(brusselatorJets(a, 1 + a * a), [a, (1 + a * a) / a]);
      expect(relative(hopf.firstLyapunovCoefficient!, reference)).toBeLessThanOrEqual(LYAPUNOV_AGREEMENT_TOL);
      expectOnCurve(model, result);
    });
  }

  it("continueEquilibria(rosenzweig, K) locates the supercritical Hopf point at K = 2x* + 1/(ah)", () => {
    const model = buildModel(rosenzweig);
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(model, "K", [1.5, 4], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const { a, h, c, m, r } = rosenzweig.parameters as Record<string, number>;
    const xStar = m / (a * (c - m * h));
    const kHopf = 2 * xStar + 1 / (a * h);
    const hopf = only(result, "hopf");
    expect(relative(hopf.value, kHopf)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(Math.abs(hopf.point.x - xStar) / 5).toBeLessThanOrEqual(POINT_REL_TOL);
    expect(hopf.criticality).toBe("supercritical");
    const yStar = (r / a) * (1 - xStar / kHopf) * (1 + a * h * xStar);
    const reference = planarLyapunov(rosenzweigJets({ ...rosenzweig.parameters, K: kHopf }), [xStar, yStar]);
    expect(relative(hopf.firstLyapunovCoefficient!, reference)).toBeLessThanOrEqual(LYAPUNOV_AGREEMENT_TOL);
    expect(result.points.filter((p) => p.kind !== "hopf")).toEqual([]);
  });

  it("continueEquilibria(competition, a12) locates the transcritical at a12 = K1/K2 with the exchange of stability", () => {
    const model = buildModel(competition(1, 0.4));
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(model, "a12", [0.5, 2.2], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const t = only(result, "transcritical");
    expect(relative(t.value, 130 / 90)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(t.point).toEqual({ N: 0, S: expect.closeTo(90, 9) });
    expect(t.bound).toEqual({ state: "N", value: 0 });
    // (0, K2) is a saddle while N can invade (a12 < K1/K2), a stable node after; the coexistence branch the
    // reverse
    expect(t.stabilityChange).toEqual({ before: "saddle", after: "stable-node" });
    expect(t.exchange).not.toBeNull();
    expect(t.exchange!.branch).not.toBe(t.branch);
    expect([t.exchange!.before, t.exchange!.after]).toEqual(["stable-node", "saddle"]);
    const coexistence = result.branches[t.exchange!.branch];
    for (const pt of coexistence.points) {
      const margin = (130 / 90 - pt.value) / (130 / 90);
      if (Math.abs(margin) > 1e-6) expect(pt.stable, `coexistence at a12 = ${pt.value}`).toBe(margin > 0);
    }
    // the coexistence branch crossing N = 0 is the same threshold, reported once
    expect(result.points.filter((p) => p.kind === "boundary-crossing")).toEqual([]);
    expectOnCurve(model, result);
  });

  it("continueEquilibria(competition, a21) locates the transcritical at a21 = K2/K1 at (K1, 0)", () => {
    const model = buildModel(competition(0.6, 0.5));
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(model, "a21", [0.2, 1.2], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const t = only(result, "transcritical");
    expect(relative(t.value, 90 / 130)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(t.point).toEqual({ N: expect.closeTo(130, 9), S: 0 });
    expect(t.bound).toEqual({ state: "S", value: 0 });
    expect(t.stabilityChange).toEqual({ before: "saddle", after: "stable-node" });
    expect([t.exchange?.before, t.exchange?.after]).toEqual(["stable-node", "saddle"]);
    expect(result.points.filter((p) => p.kind === "boundary-crossing")).toEqual([]);
  });

  for (const [s, w] of [
    [-1, 1],
    [1, 1],
    [1, 2],
  ] as const) {
    it(`continueEquilibria(normal form s = ${s}, w = ${w}, mu) finds a ${s < 0 ? "super" : "sub"}critical Hopf point with l1 = 2s/w`, () => {
      const diagnostics: Diagnostic[] = [];
      const result = continueEquilibria(buildModel(normalForm(s, w)), "mu", [-0.5, 0.5], {}, diagnostics);
      expect(diagnostics).toEqual([]);
      const hopf = only(result, "hopf");
      expect(Math.abs(hopf.value)).toBeLessThanOrEqual(THRESHOLD_ABS_TOL);
      expect(hopf.criticality).toBe(s < 0 ? "supercritical" : "subcritical");
      expect(relative(hopf.firstLyapunovCoefficient!, (2 * s) / w)).toBeLessThanOrEqual(
        LYAPUNOV_AGREEMENT_TOL,
      );
    });
  }
});

describe("continueEquilibria: branches, switching, determinism", () => {
  // Lotka–Volterra predator–prey x' = x (al − be y), y' = y (de x − ga): the interior equilibrium
  // (ga/de, al/be) is a centre for every al (trace J = 0), with neutral cycles around it, not a Hopf
  // point (Murray, Mathematical Biology I, 3rd ed., section 3.1, from memory).
  it("continueEquilibria(predator-prey centre, al) reports no Hopf point along a branch of centres", () => {
    const model = buildModel({
      equations: { x: "x*(al - be*y)", y: "y*(de*x - ga)" },
      window: { x: [0, 4], y: [0, 5] },
      parameters: { al: 1, be: 0.7, de: 1.3, ga: 1.5 },
    });
    const result = continueEquilibria(model, "al", [0.5, 3]);
    expect(result.points).toEqual([]);
    const interior = result.branches.find((b) => b.points.every((p) => p.point.x > 1));
    expect(interior?.points.every((p) => p.type === "center")).toBe(true);
  });

  // x' = (x − 1/2)(20p − 9.5 − x), y' = −y (invented, common practice): the branch x = 1/2 and the
  // steep branch x = 20p − 9.5 cross at p = 1/2; the steep one is inside the window only for
  // p ∈ [0.475, 0.525], where no seed value falls, so only branch switching can find it.
  const crossing: ModelFixture = {
    equations: { x: "(x - 0.5)*(20*p - 9.5 - x)", y: "-y" },
    window: { x: [0, 1], y: [0, 1] },
    parameters: { p: 0.2 },
  };

  it("continueEquilibria(crossing, p) switches onto the crossing branch and reports the transcritical and both bound crossings", () => {
    const model = buildModel(crossing);
    const result = continueEquilibria(model, "p", [0, 1]);
    expect(result.branches).toHaveLength(2);
    expect(result.points.map((p) => p.kind)).toEqual([
      "boundary-crossing",
      "transcritical",
      "boundary-crossing",
    ]);
    const [low, t, high] = result.points;
    expect(relative(t.value, 0.5)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(t.bound).toBeNull(); // a crossing of two branches, not an axis
    expect(relative(low.value, 0.475)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(relative(high.value, 0.525)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expectOnCurve(model, result);
  });

  it("continueEquilibria(competition, a12) finds the threshold once when a seed value falls on it", () => {
    // the middle of five seed values is K1/K2 itself, where (0, K2) and the coexistence point coincide
    const threshold = 130 / 90;
    const result = continueEquilibria(buildModel(competition(1, 0.4)), "a12", [
      threshold - 0.5,
      threshold + 0.5,
    ]);
    const t = only(result, "transcritical");
    expect(relative(t.value, threshold)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(result.branches).toHaveLength(4);
    for (const b of result.branches) {
      b.points
        .slice(1)
        .forEach((pt, k) => expect(pt, `branch ${b.index} point ${k + 1} repeats`).not.toEqual(b.points[k]));
    }
  });

  it("continueEquilibria(competition, a12) is deterministic and does not touch the model", () => {
    const model = buildModel(competition(1, 0.4));
    const before = Array.from(model.parameterValues);
    const first = JSON.stringify(continueEquilibria(model, "a12", [0.5, 2.2]));
    expect(JSON.stringify(continueEquilibria(model, "a12", [0.5, 2.2]))).toBe(first);
    expect(Array.from(model.parameterValues)).toEqual(before);
  });

  it("continueEquilibria(competition, a12) traces each branch once, each ending at the range or beyond the window", () => {
    const result = continueEquilibria(buildModel(competition(1, 0.4)), "a12", [0.5, 2.2]);
    // (0,0), (0,K2), (K1,0) do not move with a12; the coexistence branch leaves through N < 0
    expect(result.branches).toHaveLength(4);
    for (const b of result.branches) for (const end of b.ends) expect(["range", "window"]).toContain(end);
    for (const b of result.branches) {
      for (const pt of b.points) {
        expect(pt.stable === null || pt.stable === pt.type.startsWith("stable")).toBe(true);
        expect(pt.value).toBeGreaterThanOrEqual(0.5);
        expect(pt.value).toBeLessThanOrEqual(2.2);
      }
    }
  });
});

describe("continueEquilibria: bounds and the kind of threshold there", () => {
  // Invented consumer–resource model with a harvested resource (values invented):
  // N' = N (b R − m), R' = g − h − d R − c N R. The axis N = 0 is invariant (N' = 0 there); R = 0 is not
  // (R' = g − h there). Worked by hand: the boundary branch is (0, (g − h)/d), lying on N = 0 for every h,
  // with R passing through 0 at h = g (dR/dh = −1/d ≠ 0: transversally). The interior branch is
  // R = m/b, N = (g − h − d m/b)/(c m/b); it meets (0, (g − h)/d) where N's invasion rate there,
  // b (g − h)/d − m, vanishes: h = g − d m/b, a transcritical (Strogatz, Nonlinear Dynamics and Chaos,
  // 2nd ed., §3.2; Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., §3.3, from memory).
  const consumer: ModelFixture = {
    equations: { N: "N*(b*R - m)", R: "g - h - d*R - c*N*R" },
    window: { N: [0, 40], R: [0, 5] },
    parameters: { b: 0.4, m: 0.2, g: 2, h: 1, d: 0.5, c: 0.1 },
  };

  it("continueEquilibria(consumer, h) reports no crossing along the branch lying on N = 0, one where R crosses 0 at h = g", () => {
    const model = buildModel(consumer);
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(model, "h", [0.5, 3], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const crossings = result.points.filter((p) => p.kind === "boundary-crossing");
    expect(crossings.map((p) => [p.value, p.bound])).toHaveLength(1);
    expect(crossings[0].bound).toEqual({ state: "R", value: 0 });
    expect(relative(crossings[0].value, 2)).toBeLessThanOrEqual(1e-9);
    const t = only(result, "transcritical");
    expect(relative(t.value, 2 - (0.5 * 0.2) / 0.4)).toBeLessThanOrEqual(1e-9);
    expect(t.bound).toEqual({ state: "N", value: 0 });
    expect(result.points).toHaveLength(2);
    expectOnCurve(model, result);
  });

  it("continueEquilibria(competition, K2) reports no crossing while (0, K2) and (K1, 0) lie on the axes, one where (0, K2) passes S = 160", () => {
    // Same source as `competition` above: the coexistence point leaves through S = 0 at K2 = a21 K1 and
    // through N = 0 at K2 = K1/a12 (transcriticals); (0, K2) and (K1, 0) lie on the axes for every K2, and
    // (0, K2) passes the upper bound S = 160 of the window at K2 = 160 (dS/dK2 = 1: transversally).
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(buildModel(competition(1, 0.4)), "K2", [10, 200], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    expect(result.points.map((p) => p.kind)).toEqual(["transcritical", "transcritical", "boundary-crossing"]);
    const [atS, atN, top] = result.points;
    expect(relative(atS.value, 0.4 * 130)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(atS.bound).toEqual({ state: "S", value: 0 });
    expect(relative(atN.value, 130 / 1)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(atN.bound).toEqual({ state: "N", value: 0 });
    expect(relative(top.value, 160)).toBeLessThanOrEqual(1e-9);
    expect(top.bound).toEqual({ state: "S", value: 160 });
    expect(top.point.N).toBe(0);
  });

  // Invented predator–prey model with harvesting effort E on the prey (values invented):
  // N' = r N (1 − N/K) − q E N − a N P, P' = b N P − m P. Worked by hand: the boundary equilibrium is
  // (K (1 − qE/r), 0), where P's invasion rate is b K (1 − qE/r) − m, zero at K* = m / (b (1 − qE/r));
  // the interior branch N = m/b, P = (r (1 − N/K) − qE)/a passes through P = 0 exactly there.
  const harvested: ModelFixture = {
    equations: { N: "r*N*(1 - N/K) - q*Ef*N - a*N*P", P: "b*N*P - m*P" },
    window: { N: [0, 100], P: [0, 50] },
    parameters: { r: 1, K: 80, q: 0.01, Ef: 20, a: 0.05, b: 0.01, m: 0.3 },
  };
  const kStar = 0.3 / (0.01 * (1 - (0.01 * 20) / 1));

  it("continueEquilibria(harvested predator–prey, K) calls the interior branch meeting (K(1 − qE/r), 0) a transcritical at K* with the exchange", () => {
    const diagnostics: Diagnostic[] = [];
    const result = continueEquilibria(buildModel(harvested), "K", [10, 150], {}, diagnostics);
    expect(diagnostics).toEqual([]);
    const t = only(result, "transcritical");
    expect(relative(t.value, kStar)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
    expect(t.bound).toEqual({ state: "P", value: 0 });
    expect(Math.abs(t.point.N - 30) / 100).toBeLessThanOrEqual(POINT_REL_TOL);
    // the boundary equilibrium is stable while P cannot invade (K < K*), a saddle after; the interior one
    // the reverse (exchange of stability, Strogatz §3.2)
    expect(t.stabilityChange).toEqual({ before: "stable-node", after: "saddle" });
    expect(t.exchange).not.toBeNull();
    // the only other point: (K(1 − qE/r), 0) reaching the window's edge N = 100 at K = 125
    expect(result.points.filter((p) => p.kind === "boundary-crossing").map((p) => p.bound)).toEqual([
      { state: "N", value: 100 },
    ]);
  });

  it("buildSpecialPoints(a turning seen where the harvested interior branch meets P = 0) reports a transcritical, not a fold", () => {
    // Where the continuation sees the branch turn numerically at (m/b, 0, K*) (a det J sign change with
    // the tangent's parameter component flipping), the point still lies on the invariant axis P = 0 with
    // P's invasion rate b N − m at zero: the closed form above says transcritical.
    const model = buildModel(harvested);
    const sys = buildSystem(model, model.parameterNames.indexOf("K"), [10, 150]);
    const seeds = [
      [30, 8.5, 80], // interior: N = m/b, P = (1 − 30/80 − 0.2)/0.05
      [64, 0, 80], // boundary: K (1 − qE/r)
    ];
    const branches = seeds.map((z) => continueBranch(sys, Float64Array.from(z), DEFAULT_STEP_OPTIONS)!);
    const turning: LocatedEvent = {
      kind: "saddle-node",
      branch: 0,
      z: Float64Array.from([30, 0, kStar]),
      t: Float64Array.from([0, 1, 0]),
      residual: 0,
      testResidual: 0,
      before: "saddle",
      after: "saddle",
      bound: null,
    };
    const points = buildSpecialPoints(sys, branches, [turning], DEFAULT_STEP_OPTIONS, []);
    expect(points.map((p) => p.kind)).toEqual(["transcritical"]);
    expect(points[0].bound).toEqual({ state: "P", value: 0 });
    expect(relative(points[0].value, kStar)).toBeLessThanOrEqual(THRESHOLD_REL_TOL);
  });

  it("continueEquilibria(x' = p − x², p) keeps the fold on the bound x = 0 a saddle-node: that bound is not invariant", () => {
    // x' = p − x² has equilibria ±√p meeting in a saddle-node at p = 0, x = 0 (Strogatz, Nonlinear Dynamics
    // and Chaos, 2nd ed., §3.1, with x ↦ −x); x' = p ≠ 0 on x = 0, so no branch lies on that bound.
    const fold: ModelFixture = {
      equations: { x: "p - x^2", y: "-y" },
      window: { x: [0, 2], y: [0, 1] },
      parameters: { p: 0.5 },
    };
    const result = continueEquilibria(buildModel(fold), "p", [-1, 1]);
    const sn = only(result, "saddle-node");
    expect(Math.abs(sn.value)).toBeLessThanOrEqual(THRESHOLD_ABS_TOL);
    expect(result.points.filter((p) => p.kind === "transcritical")).toEqual([]);
  });
});

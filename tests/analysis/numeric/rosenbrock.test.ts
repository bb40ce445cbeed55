/**
 * RODAS (src/analysis/numeric/rosenbrock.ts) against what lies outside keel: the order conditions
 * of Rosenbrock methods (Hairer and Wanner, Solving Ordinary Differential Equations II, 2nd ed.,
 * §IV.7, Table 7.1), closed-form solutions, scipy's Radau on the stiff van der Pol oscillator
 * (tests/reference/van_der_pol_radau.py) and the oscillator's asymptotic relaxation period.
 */
import { describe, expect, it } from "vitest";
import {
  integrateRosenbrock,
  RODAS_A,
  RODAS_C,
  RODAS_DENSE_H2,
  RODAS_DENSE_H3,
  RODAS_GAMMA,
  type RosenbrockStep,
  type StiffSystem,
} from "../../../src/analysis/numeric/rosenbrock.js";
import { integrateFlow } from "../../../src/analysis/numeric/integrate.js";
import { findScipyPython, runReference } from "../../fixtures/scipy.js";

/** Order-condition residuals of coefficients given to 16 digits: a few ulps of the sums' terms (about 30 in size). */
const ORDER_CONDITION_TOL = 1e-13;
/** The embedded solution must miss order 4 clearly, or its difference would not estimate the error. */
const EMBEDDED_ORDER4_MISS = 1e-3;
/** Halving the step divides an order-p error by 2^p; ±0.3 allows the next term of the error's expansion. */
const ORDER_SLACK = 0.3;

/** The method in the form of Hairer and Wanner's (7.4): α, Γ (γ_ii = γ), b and the embedded b̂. */
interface ClassicalForm {
  alpha: number[][];
  gammaMatrix: number[][];
  b: number[];
  bHat: number[];
  /** v ↦ vΓ (a row vector of the implementation form to the classical form). */
  times: (v: number[]) => number[];
}

/**
 * Undoes the implementation form of HW II §IV.7 (the substitution u_i = Σ γ_ij k_j): there
 * a = αΓ⁻¹, C = diag(1/γ) − Γ⁻¹ and m = bΓ⁻¹. RODAS's sixth stage point is y0 + Σ a_5j u_j + u_5,
 * its solution that point plus u_6, the embedded solution that point: m = (a_5·, 1, 1), m̂ = (a_5·, 1, 0).
 */
function classicalForm(): ClassicalForm {
  const s = 6;
  const a = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  RODAS_A.forEach((row, i) => row.forEach((v, j) => (a[i][j] = v)));
  RODAS_A[4].forEach((v, j) => (a[5][j] = v));
  a[5][4] = 1;
  const m = [...RODAS_A[4], 1, 1];
  const mHat = [...RODAS_A[4], 1, 0];
  const gammaInverse = Array.from({ length: s }, (_, i) =>
    Array.from({ length: s }, (_, j) => (i === j ? 1 / RODAS_GAMMA : j < i ? -RODAS_C[i][j] : 0)),
  );
  // Γ = (Γ⁻¹)⁻¹ by forward substitution, column by column
  const gammaMatrix = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  for (let col = 0; col < s; col++)
    for (let i = 0; i < s; i++) {
      let v = i === col ? 1 : 0;
      for (let k = 0; k < i; k++) v -= gammaInverse[i][k] * gammaMatrix[k][col];
      gammaMatrix[i][col] = v / gammaInverse[i][i];
    }
  const times = (v: number[]) =>
    gammaMatrix[0].map((_, j) => v.reduce((sum, x, k) => sum + x * gammaMatrix[k][j], 0));
  return { alpha: a.map(times), gammaMatrix, b: times(m), bHat: times(mHat), times };
}

/**
 * The dense output's weights at θ: y(θ) = y0 + θ(y1 − y0) + θ(1 − θ)(H2 + θH3) with H2, H3
 * combinations of u_1…u_5, so in the implementation form m(θ) = θm + θ(1 − θ)(d2 + θd3), and
 * b(θ) = m(θ)Γ.
 */
function denseWeights(form: ClassicalForm, theta: number): number[] {
  const m = [...RODAS_A[4], 1, 1];
  const d = (v: readonly number[], j: number) => (j < v.length ? v[j] : 0);
  return form.times(
    m.map(
      (mj, j) => theta * mj + theta * (1 - theta) * (d(RODAS_DENSE_H2, j) + theta * d(RODAS_DENSE_H3, j)),
    ),
  );
}

/**
 * Residuals of Table 7.1's conditions for orders 1–4 (eight trees), with β_ij = α_ij + γ_ij for
 * j < i. For a dense output at θ the right-hand sides are those of the step θh: a tree of order q
 * contributes θ^q·(1/γ(t)), and each γ on the left stands for hγ = θh·(γ/θ) (HW II §IV.7, dense output).
 */
function orderResiduals({ alpha, gammaMatrix }: ClassicalForm, b: number[], theta = 1): number[] {
  const s = b.length;
  const g = RODAS_GAMMA / theta;
  const scale = [theta, theta ** 2, theta ** 3, theta ** 3, theta ** 4, theta ** 4, theta ** 4, theta ** 4];
  const beta = alpha.map((row, i) => row.map((v, j) => (j < i ? v + gammaMatrix[i][j] : 0)));
  const rowSum = (x: number[][]) => x.map((row) => row.reduce((p, q) => p + q, 0));
  const al = rowSum(alpha);
  const be = rowSum(beta);
  const sum = (f: (j: number) => number) => {
    let total = 0;
    for (let j = 0; j < s; j++) total += f(j);
    return total;
  };
  return [
    sum((j) => b[j]) - scale[0],
    sum((j) => b[j] * be[j]) - (1 / 2 - g) * scale[1],
    sum((j) => b[j] * al[j] ** 2) - scale[2] / 3,
    sum((j) => b[j] * sum((k) => beta[j][k] * be[k])) - (1 / 6 - g + g * g) * scale[3],
    sum((j) => b[j] * al[j] ** 3) - scale[4] / 4,
    sum((j) => b[j] * al[j] * sum((k) => alpha[j][k] * be[k])) - (1 / 8 - g / 3) * scale[5],
    sum((j) => b[j] * sum((k) => beta[j][k] * al[k] ** 2)) - (1 / 12 - g / 3) * scale[6],
    sum((j) => b[j] * sum((k) => beta[j][k] * sum((l) => beta[k][l] * be[l]))) -
      (1 / 24 - g / 2 + (3 / 2) * g * g - g ** 3) * scale[7],
  ];
}

/** Fixed steps: an infinite absolute tolerance accepts every step, and maxStep caps each at h. */
function fixedSteps(system: StiffSystem, y0: number[], tEnd: number, count: number) {
  const steps: RosenbrockStep[] = [];
  const h = tEnd / count;
  const result = integrateRosenbrock(system, y0, 0, tEnd, {
    relative: 0,
    absolute: y0.map(() => Infinity),
    maxStep: h,
    maxSteps: 10 * count,
    initialStep: h,
    onStep: (step) => void steps.push(step),
  });
  return { result, steps };
}

/**
 * Logistic growth driving a decay, a closed form (common practice): x' = x(1 − x), y' = −xy. With
 * K = (1 − x0)/x0, x = 1/(1 + Ke^(−t)) and y = y0(1 + K)/(e^t + K) (as ∫x dt = ln((e^t + K)/(1 + K))).
 */
const X0 = 0.1;
const K = (1 - X0) / X0;
const logisticDecay: StiffSystem = {
  rhs: (y, out) => {
    out[0] = y[0] * (1 - y[0]);
    out[1] = -y[0] * y[1];
  },
  jacobian: (y, out) => out.set([1 - 2 * y[0], 0, -y[1], -y[0]]),
};
const logisticDecayAt = (t: number) => [1 / (1 + K * Math.exp(-t)), (1 + K) / (Math.exp(t) + K)];
const LOGISTIC_END = 8;

/** The observed order between successive halvings of the step. */
const observedOrders = (errors: number[]) => errors.slice(1).map((e, k) => Math.log2(errors[k] / e));

describe("integrateRosenbrock (RODAS)", () => {
  it("RODAS's coefficients satisfy Table 7.1's order conditions to order 4, the embedded ones to order 3", () => {
    // Hairer and Wanner, Solving ODEs II, 2nd ed., §IV.7, Table 7.1 (autonomous conditions)
    const form = classicalForm();
    const main = orderResiduals(form, form.b);
    const embedded = orderResiduals(form, form.bHat);
    for (const r of main) expect(Math.abs(r)).toBeLessThan(ORDER_CONDITION_TOL);
    for (const r of embedded.slice(0, 4)) expect(Math.abs(r)).toBeLessThan(ORDER_CONDITION_TOL);
    expect(Math.max(...embedded.slice(4).map(Math.abs))).toBeGreaterThan(EMBEDDED_ORDER4_MISS);
    // stage times c_i = α_i and γ_i = Σ_j γ_ij as published for RODAS (from memory: the same section)
    const c = form.alpha.map((row) => row.reduce((p, q) => p + q, 0));
    const gammaSums = form.gammaMatrix.map((row) => row.reduce((p, q) => p + q, 0));
    [0, 0.386, 0.21, 0.63, 1, 1].forEach((ci, i) => expect(c[i]).toBeCloseTo(ci, 13));
    [0.25, -0.1043, 0.1035, -0.0362, 0, 0].forEach((gi, i) => expect(gammaSums[i]).toBeCloseTo(gi, 13));
    // stiffly accurate (HW II §IV.15): the solution is the last stage's point, b_j = α_sj + γ_sj
    form.b.forEach((bj, j) => expect(bj).toBeCloseTo(form.alpha[5][j] + form.gammaMatrix[5][j], 13));
  });

  it("the dense output's weights satisfy the order-3 conditions at every θ in (0, 1)", () => {
    const form = classicalForm();
    for (let k = 1; k < 20; k++) {
      const residuals = orderResiduals(form, denseWeights(form, k / 20), k / 20);
      for (const r of residuals.slice(0, 4)) expect(Math.abs(r)).toBeLessThan(ORDER_CONDITION_TOL);
    }
  });

  it("R(z) from one step of y' = λy is at most 1 on the negative axis and tends to 0 (L-stable)", () => {
    const oneStep = (z: number) => {
      const system: StiffSystem = {
        rhs: (y, out) => void (out[0] = z * y[0]),
        jacobian: (_y, out) => void (out[0] = z),
      };
      return fixedSteps(system, [1], 1, 1).result.y[0];
    };
    const denseAtHalf = (z: number) => {
      const system: StiffSystem = {
        rhs: (y, out) => void (out[0] = z * y[0]),
        jacobian: (_y, out) => void (out[0] = z),
      };
      return fixedSteps(system, [1], 1, 1).steps[0].dense(0, 0.5);
    };

    const zs = Array.from({ length: 41 }, (_, k) => -(10 ** (-2 + k / 4)));
    for (const z of zs) expect(Math.abs(oneStep(z))).toBeLessThanOrEqual(1);
    // stiffly accurate and A-stable: R(z) = O(1/z) as z → −∞ (HW II §IV.3, L-stability)
    expect(Math.abs(oneStep(-1e6))).toBeLessThan(1e-5);
    expect(Math.abs(oneStep(-1e10))).toBeLessThan(1e-9);
    // the interpolant's corrections H2, H3 vanish there too: a stiff component is drawn as the
    // chord from y0 to y1 ≈ 0, never overshooting (the design's two free conditions, closed form 1 − θ)
    expect(denseAtHalf(-1e10)).toBeCloseTo(0.5, 8);
    // on the imaginary axis too (the planar path of the stage solver): a rotation by ωh never grows
    for (const omegaH of [0.5, 2, 10, 1e3, 1e6]) {
      const rotation: StiffSystem = {
        rhs: (y, out) => {
          out[0] = -omegaH * y[1];
          out[1] = omegaH * y[0];
        },
        jacobian: (_y, out) => out.set([0, -omegaH, omegaH, 0]),
      };
      const [x, y] = fixedSteps(rotation, [1, 0], 1, 1).result.y;
      expect(Math.hypot(x, y)).toBeLessThanOrEqual(1);
    }
  });

  it("fixed steps converge with order 4 on y' = −y and on logistic growth driving a decay (closed forms)", () => {
    const decay: StiffSystem = {
      rhs: (y, out) => void (out[0] = -y[0]),
      jacobian: (_y, out) => void (out[0] = -1),
    };
    const counts = [20, 40, 80, 160];
    const decayErrors = counts.map((n) => Math.abs(fixedSteps(decay, [1], 2, n).result.y[0] - Math.exp(-2)));
    const logisticErrors = counts.map((n) => {
      const y = fixedSteps(logisticDecay, [X0, 1], LOGISTIC_END, n).result.y;
      const exact = logisticDecayAt(LOGISTIC_END);
      return Math.hypot(y[0] - exact[0], y[1] - exact[1]);
    });
    for (const p of [...observedOrders(decayErrors), ...observedOrders(logisticErrors)]) {
      expect(p).toBeGreaterThan(4 - ORDER_SLACK);
      expect(p).toBeLessThan(4 + ORDER_SLACK);
    }
  });

  it("the dense output between steps is of order at least 3 (logistic growth driving a decay)", () => {
    const thetas = [0.2, 0.5, 0.8];
    // the largest error at interior points over the interval: the step's own error plus the interpolant's
    const errors = [20, 40, 80, 160].map((n) => {
      let worst = 0;
      for (const step of fixedSteps(logisticDecay, [X0, 1], LOGISTIC_END, n).steps)
        for (const theta of thetas) {
          const t = step.t0 + theta * (step.t1 - step.t0);
          const exact = logisticDecayAt(t);
          worst = Math.max(worst, Math.hypot(step.dense(0, t) - exact[0], step.dense(1, t) - exact[1]));
        }
      return worst;
    });
    for (const p of observedOrders(errors)) expect(p).toBeGreaterThan(3 - ORDER_SLACK);
  });
});

/**
 * The van der Pol oscillator in Liénard's usual form, y1' = y2, y2' = μ(1 − y1²)y2 − y1 (Strogatz,
 * Nonlinear Dynamics and Chaos, 2nd ed., §7.5, as a first-order system), at μ = 1000: on the slow
 * branches J has an eigenvalue near μ(1 − y1²) ≈ −3000 while the cycle takes ~1600 time units.
 */
const MU = 1000;
const vanDerPolRhs = (y: ArrayLike<number>, out: Float64Array) => {
  out[0] = y[1];
  out[1] = MU * (1 - y[0] * y[0]) * y[1] - y[0];
};
const vanDerPol: StiffSystem = {
  rhs: vanDerPolRhs,
  jacobian: (y, out) => out.set([0, 1, -2 * MU * y[0] * y[1] - 1, MU * (1 - y[0] * y[0])]),
};
const VDP_START = [2, 0];
/** Two downward zero crossings of y1 (near 807 and 2421) fall before the last time. */
const VDP_TIMES = [1000, 2000, 2500];
const VDP_RELATIVE = 1e-7;
const VDP_ABSOLUTE = [1e-9, 1e-9];
/**
 * Agreement with scipy's Radau at rtol 1e-10: the global error of a run held to 1e-7 per step,
 * grown through three fast jumps, stays near 1e-7 (measured 1.3e-7 in y1, 2.5e-8 in y2); ten times
 * that allows the error's growth without letting a wrong orbit through (y1 ~ 2, y2 ~ 1e-3 here).
 */
const VDP_STATE_TOL = 1e-6;
/** Crossing times: a phase error of 1e-6 of the period (measured 2e-4 at t ≈ 2421). */
const VDP_CROSSING_TOL = 2e-3;
/** Steps RODAS may take to t = 2500 (measured 2658); explicit odex must need a hundred times more. */
const VDP_MAX_STEPS = 5000;
const EXPLICIT_STEP_RATIO = 100;
/** First zero of the Airy function Ai, −2.33810741 (from memory; Abramowitz and Stegun, Table 10.13). */
const AIRY_ZERO = 2.33810741;
/**
 * The relaxation period's leading term (3 − 2 ln 2)μ (Strogatz, 2nd ed., §7.5) misses the first
 * correction 3|a1|μ^(−1/3) (Dorodnitsyn's expansion, from memory; a1 the Airy zero), 0.70 at
 * μ = 1000, i.e. 4.3e-4 of the period: the leading term must hold to 1e-3, and the correction
 * itself to 5 %, which leaves room for the next terms, O(μ⁻¹ ln μ) ≈ 0.007, 1 % of it.
 */
const PERIOD_LEADING_REL_TOL = 1e-3;
const PERIOD_CORRECTION_REL_TOL = 0.05;

/** The times where y1 crosses zero downwards, by bisection on each step's dense output. */
function downwardZeros(step: RosenbrockStep, into: number[]): void {
  const { t0, t1, dense } = step;
  if (!(dense(0, t0) > 0 && dense(0, t1) <= 0)) return;
  let [lo, hi] = [t0, t1];
  for (let k = 0; k < 100 && hi - lo > 1e-12 * t1; k++) {
    const mid = 0.5 * (lo + hi);
    if (dense(0, mid) > 0) lo = mid;
    else hi = mid;
  }
  into.push(0.5 * (lo + hi));
}

describe.skipIf(findScipyPython() === null)("integrateRosenbrock on van der Pol, μ = 1000", () => {
  const outputs: number[][] = [];
  const crossings: number[] = [];
  const tEnd = VDP_TIMES[VDP_TIMES.length - 1];
  const run = integrateRosenbrock(vanDerPol, VDP_START, 0, tEnd, {
    relative: VDP_RELATIVE,
    absolute: VDP_ABSOLUTE,
    maxStep: Infinity,
    maxSteps: 100_000,
    initialStep: 1e-6,
    onStep: (step) => {
      for (const t of VDP_TIMES)
        if (t > step.t0 && t <= step.t1) outputs.push([step.dense(0, t), step.dense(1, t)]);
      downwardZeros(step, crossings);
    },
  });
  const reference = runReference<{ y: number[][]; crossings: number[]; evaluations: number }>(
    "van_der_pol_radau.py",
    { mu: MU, start: VDP_START, times: VDP_TIMES, rtol: 1e-10 },
  );

  it("matches scipy's Radau (rtol 1e-10) at t = 1000, 2000, 2500, in fewer than 5000 steps", () => {
    expect(run.status).toBe("finished");
    expect(run.steps).toBeLessThan(VDP_MAX_STEPS);
    expect(outputs).toHaveLength(VDP_TIMES.length);
    outputs.forEach(([y1, y2], k) => {
      expect(Math.abs(y1 - reference.y[k][0])).toBeLessThan(VDP_STATE_TOL);
      expect(Math.abs(y2 - reference.y[k][1])).toBeLessThan(VDP_STATE_TOL);
    });
    expect(crossings).toHaveLength(reference.crossings.length);
    crossings.forEach((t, k) => expect(Math.abs(t - reference.crossings[k])).toBeLessThan(VDP_CROSSING_TOL));
  });

  it("explicit odex at the same tolerances needs over a hundred times as many steps", () => {
    let explicitSteps = 0;
    const explicit = integrateFlow(vanDerPolRhs, VDP_START, tEnd, {
      direction: 1,
      tolerances: { relative: VDP_RELATIVE, absolute: VDP_ABSOLUTE },
      maxStep: Infinity,
      maxSteps: EXPLICIT_STEP_RATIO * 10 * VDP_MAX_STEPS,
      onStep: () => void explicitSteps++,
    });
    expect(explicit.status).toBe("finished");
    expect(explicitSteps).toBeGreaterThan(EXPLICIT_STEP_RATIO * run.steps);
    expect(explicit.evaluations).toBeGreaterThan(EXPLICIT_STEP_RATIO * run.evaluations);
  });

  it("the period between zero crossings is (3 − 2 ln 2)μ plus Dorodnitsyn's μ^(−1/3) correction", () => {
    expect(crossings).toHaveLength(2);
    const period = crossings[1] - crossings[0];
    const leading = (3 - 2 * Math.log(2)) * MU;
    const correction = 3 * AIRY_ZERO * MU ** (-1 / 3);
    expect(Math.abs(period / leading - 1)).toBeLessThan(PERIOD_LEADING_REL_TOL);
    expect(Math.abs((period - leading) / correction - 1)).toBeLessThan(PERIOD_CORRECTION_REL_TOL);
  });
});

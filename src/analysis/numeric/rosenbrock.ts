import {
  ROSENBROCK_MAX_GROWTH,
  ROSENBROCK_MIN_SHRINK,
  ROSENBROCK_SAFETY,
  ROSENBROCK_SINGULAR_SHRINK,
} from "../constants.js";
import { solveSmall } from "./linear.js";

/**
 * RODAS: the L-stable, stiffly accurate linearly implicit Rosenbrock method of order 4 with an
 * embedded order-3 solution (Hairer and Wanner, Solving Ordinary Differential Equations II, 2nd
 * ed., §IV.7), for autonomous systems y' = f(y) only: no ∂f/∂t term is formed, so a field that
 * depends on time would lose the order. It uses the exact Jacobian, as a Rosenbrock method must.
 *
 * Coefficients from memory, in the implementation form of that section (stages u_i = Σ γ_ij k_j):
 *   (I/(hγ) − J) u_i = f(y0 + Σ_{j<i} a_ij u_j) + Σ_{j<i} (c_ij / h) u_j,
 * with the sixth stage at y0 + Σ a_5j u_j + u_5 (the embedded solution) and y1 = that + u_6, so
 * u_6 is the error estimate. tests/analysis/numeric/rosenbrock.test.ts checks them against the
 * published order conditions and measures the order. The dense output's coefficients were
 * derived here, not recalled: y(θ) = (1−θ)y0 + θ(y1 + (1−θ)(H2 + θ H3)), H2 and H3 combinations
 * of u_1…u_5, of order 3 for every θ (eight conditions), the two left free spent so that H2 and
 * H3 vanish as hλ → −∞: a stiff component is drawn as the chord from y0 to y1, never overshooting.
 */
const GAMMA = 0.25;
export const RODAS_A: readonly (readonly number[])[] = [
  [],
  [1.544],
  [0.9466785280815826, 0.2557011698983284],
  [3.314825187068521, 2.896124015972201, 0.9986419139977817],
  [1.221224509226641, 6.019134481288629, 12.53708332932087, -0.687886036105895],
];
export const RODAS_C: readonly (readonly number[])[] = [
  [],
  [-5.6688],
  [-2.430093356833875, -0.2063599157091915],
  [-0.1073529058151375, -9.594562251023355, -20.47028614809616],
  [7.496443313967647, -10.24680431464352, -33.99990352819905, 11.7089089320616],
  [8.083246795921522, -7.981132988064893, -31.52159432874371, 16.31930543123136, -6.058818238834054],
];
export const RODAS_GAMMA = GAMMA;
export const RODAS_DENSE_H2 = [
  12.09150704916284, 0.0999964888077614, -26.500777696403443, 7.44797339586486, -5.870079997319329,
];
export const RODAS_DENSE_H3 = [
  -3.818004055785335, -6.042604201944448, 3.1620692015932943, 0.0833360961704959, 4.428446095677406,
];
const STAGES = 6;
/** Embedded order 3: the error estimate is O(h⁴). */
const ERROR_EXPONENT = -1 / 4;

/** The field as the integrator sees it (direction applied); both write into out. */
export interface StiffSystem {
  rhs: (y: Float64Array, out: Float64Array) => void;
  /** Row-major ∂f_i/∂y_j. */
  jacobian: (y: Float64Array, out: Float64Array) => void;
}

export interface RosenbrockStep {
  t0: number;
  t1: number;
  y: number[];
  dense: (component: number, t: number) => number;
}

export interface RosenbrockOptions {
  relative: number;
  absolute: readonly number[];
  maxStep: number;
  /** Attempted steps (accepted and rejected) allowed. */
  maxSteps: number;
  initialStep: number;
  onStep: (step: RosenbrockStep) => boolean | void;
}

export interface RosenbrockResult {
  status: "finished" | "stopped" | "step-limit" | "non-finite";
  t: number;
  y: number[];
  /** Attempted steps. */
  steps: number;
  accepted: number;
  evaluations: number;
}

/** Integrates y' = f(y) from (t0, y0) to tEnd > t0 with RODAS; t is the caller's time. */
export function integrateRosenbrock(
  system: StiffSystem,
  y0: readonly number[],
  t0: number,
  tEnd: number,
  options: RosenbrockOptions,
): RosenbrockResult {
  const n = y0.length;
  const stepper = new RodasStepper(system, n);
  let y: Float64Array = Float64Array.from(y0);
  let t = t0;
  let h = Math.min(Math.abs(options.initialStep), options.maxStep);
  let steps = 0;
  let accepted = 0;
  let rejectedLast = false;
  const end = (status: RosenbrockResult["status"]): RosenbrockResult => ({
    status,
    t,
    y: Array.from(y),
    steps,
    accepted,
    evaluations: stepper.evaluations,
  });
  if (!stepper.prepare(y)) return end("non-finite");
  while (t < tEnd) {
    if (steps >= options.maxSteps) return end("step-limit");
    steps++;
    h = Math.min(h, options.maxStep);
    // as odex: a step that would stop just short of the end is stretched to it
    const last = t + 1.01 * h >= tEnd;
    if (last) h = tEnd - t;
    const outcome = stepper.attempt(y, h);
    if (outcome === "non-finite") return end("non-finite");
    if (outcome === "singular") {
      h *= ROSENBROCK_SINGULAR_SHRINK;
      rejectedLast = true;
      continue;
    }
    const err = stepper.errorNorm(y, options.relative, options.absolute);
    const factor = Math.min(
      rejectedLast ? 1 : ROSENBROCK_MAX_GROWTH,
      Math.max(ROSENBROCK_MIN_SHRINK, ROSENBROCK_SAFETY * Math.pow(err, ERROR_EXPONENT)),
    );
    if (!(err <= 1)) {
      // a NaN error (overflow in a stage) is a rejection too
      h *= Number.isFinite(factor) ? factor : ROSENBROCK_MIN_SHRINK;
      rejectedLast = true;
      continue;
    }
    const t1 = last ? tEnd : t + h;
    const step = stepper.acceptedStep(y, t, t1);
    y = stepper.takeNew();
    t = t1;
    accepted++;
    rejectedLast = false;
    if (!stepper.prepare(y)) return end("non-finite");
    if (options.onStep(step) === false) return end("stopped");
    h *= factor;
  }
  return end("finished");
}

/** One RODAS step's working storage; stages are solved by hand for n = 2 (no allocation in the stage loop). */
class RodasStepper {
  evaluations = 0;
  private readonly f0: Float64Array;
  private readonly jac: Float64Array;
  private readonly u: Float64Array[];
  private readonly stage: Float64Array;
  private readonly fStage: Float64Array;
  private yNew: Float64Array;

  constructor(
    private readonly system: StiffSystem,
    private readonly n: number,
  ) {
    this.f0 = new Float64Array(n);
    this.jac = new Float64Array(n * n);
    this.u = Array.from({ length: STAGES }, () => new Float64Array(n));
    this.stage = new Float64Array(n);
    this.fStage = new Float64Array(n);
    this.yNew = new Float64Array(n);
  }

  /** f and J at the step's start; false when either is not finite. */
  prepare(y: Float64Array): boolean {
    this.evaluations++;
    this.system.rhs(y, this.f0);
    this.system.jacobian(y, this.jac);
    return allFinite(this.f0) && allFinite(this.jac);
  }

  attempt(y: Float64Array, h: number): "ok" | "singular" | "non-finite" {
    const { n, u, stage, fStage, jac } = this;
    const diag = 1 / (h * GAMMA);
    const m = new Float64Array(n * n);
    for (let i = 0; i < n * n; i++) m[i] = -jac[i];
    for (let i = 0; i < n; i++) m[i * n + i] += diag;
    const solver = linearSolver(m, n);
    if (!solver) return "singular";
    for (let s = 0; s < STAGES; s++) {
      let f: Float64Array = this.f0;
      if (s > 0) {
        const a = RODAS_A[Math.min(s, STAGES - 2)];
        for (let k = 0; k < n; k++) {
          let v = y[k];
          for (let j = 0; j < a.length; j++) v += a[j] * u[j][k];
          // the sixth stage sits at the embedded solution: the fifth's point plus u_5
          stage[k] = s === STAGES - 1 ? v + u[STAGES - 2][k] : v;
        }
        this.evaluations++;
        this.system.rhs(stage, fStage);
        if (!allFinite(fStage)) return "non-finite";
        f = fStage;
      }
      const c = RODAS_C[s];
      for (let k = 0; k < n; k++) {
        let r = f[k];
        for (let j = 0; j < c.length; j++) r += (c[j] / h) * u[j][k];
        u[s][k] = r;
      }
      solver(u[s]);
    }
    for (let k = 0; k < n; k++) this.yNew[k] = stage[k] + u[STAGES - 1][k];
    return "ok";
  }

  /** RMS norm of the error estimate u_6, scaled as odex scales it (rtol · max|y| + atol). */
  errorNorm(y: Float64Array, relative: number, absolute: readonly number[]): number {
    let sum = 0;
    for (let k = 0; k < this.n; k++) {
      const scale = absolute[k] + relative * Math.max(Math.abs(y[k]), Math.abs(this.yNew[k]));
      const e = this.u[STAGES - 1][k] / scale;
      sum += e * e;
    }
    return Math.sqrt(sum / this.n);
  }

  /** The accepted step with its dense output (own copies: the stepper's storage is reused). */
  acceptedStep(y: Float64Array, t0: number, t1: number): RosenbrockStep {
    const { n, u } = this;
    const start = Array.from(y);
    const end = Array.from(this.yNew);
    const h2 = new Array<number>(n).fill(0);
    const h3 = new Array<number>(n).fill(0);
    for (let j = 0; j < STAGES - 1; j++)
      for (let k = 0; k < n; k++) {
        h2[k] += RODAS_DENSE_H2[j] * u[j][k];
        h3[k] += RODAS_DENSE_H3[j] * u[j][k];
      }
    const h = t1 - t0;
    const dense = (k: number, t: number) => {
      const s = (t - t0) / h;
      return (1 - s) * start[k] + s * (end[k] + (1 - s) * (h2[k] + s * h3[k]));
    };
    return { t0, t1, y: end, dense };
  }

  /** Hands over the new point; the stepper writes the next one elsewhere. */
  takeNew(): Float64Array {
    const y = this.yNew;
    this.yNew = new Float64Array(this.n);
    return y;
  }
}

/** x ← m⁻¹ x in place; null when m is singular or not finite. */
function linearSolver(m: Float64Array, n: number): ((x: Float64Array) => void) | null {
  if (n === 2) {
    const det = m[0] * m[3] - m[1] * m[2];
    if (!Number.isFinite(det) || det === 0) return null;
    const [a, b, c, d] = [m[3] / det, -m[1] / det, -m[2] / det, m[0] / det];
    return (x) => {
      const x0 = x[0];
      x[0] = a * x0 + b * x[1];
      x[1] = c * x0 + d * x[1];
    };
  }
  // other dimensions are not hot in keel (every model is planar): a fresh elimination per stage
  if (solveSmall(m, new Float64Array(n).fill(1)) === null) return null;
  return (x) => {
    const solution = solveSmall(m, x);
    if (solution) x.set(solution);
    else x.fill(NaN);
  };
}

function allFinite(v: Float64Array): boolean {
  for (let k = 0; k < v.length; k++) if (!Number.isFinite(v[k])) return false;
  return true;
}

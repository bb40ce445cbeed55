import type { RhsFunction } from "../../model/types.js";
import {
  QUADRATURE_GRADIENT_STEP,
  RODAS_FIRST_STEP_OF_SCALE,
  RODAS_MIN_RELATIVE_TOL,
  STIFFNESS_RATIO,
  STIFF_WINDOW_STEPS,
} from "../constants.js";
import type { FlowOptions, IntegrationResult } from "./integrate.js";
import { integrateRosenbrock, type RosenbrockResult, type RosenbrockStep } from "./rosenbrock.js";

/**
 * integrateFlow's stiffness switch: odex runs while its steps are healthy; when a window of
 * STIFF_WINDOW_STEPS accepted steps advances less than one longest step (its step collapsed),
 * or it runs out of steps, and the Jacobian's eigenvalues say the collapse is stiffness, the
 * integration continues from odex's last accepted point with RODAS (numeric/rosenbrock.ts).
 */

/** Watches odex's accepted steps for a stiff collapse; touches nothing odex computes. */
export class StiffnessWatch {
  private windowStart = 0;
  private count = 0;
  /** timeScale: the caller's longest step, or the span when there is none. */
  constructor(
    private readonly jacobian: RhsFunction,
    private readonly sign: 1 | -1,
    readonly timeScale: number,
  ) {}

  /** After each accepted step ending at (t1, y): true when the window just closed collapsed and y is stiff. */
  collapsedStiff(t1: number, y: readonly number[]): boolean {
    if (++this.count < STIFF_WINDOW_STEPS) return false;
    const advanced = t1 - this.windowStart;
    this.windowStart = t1;
    this.count = 0;
    return advanced < this.timeScale && this.isStiff(y);
  }

  /**
   * The directed field's most negative eigenvalue real part, against the inverse of the time
   * scale, is at least STIFFNESS_RATIO. Exact eigenvalues for n ≤ 2 (every keel model); beyond
   * that Gershgorin's bound, which may call a system stiff that is not (RODAS is then only
   * slower, not wrong).
   */
  isStiff(y: readonly number[]): boolean {
    const n = y.length;
    const jac = new Float64Array(n * n);
    this.jacobian(y, jac);
    for (let i = 0; i < n * n; i++) jac[i] *= this.sign;
    if (!jac.every(Number.isFinite)) return false;
    return -mostNegativeRealPart(jac, n) * this.timeScale >= STIFFNESS_RATIO;
  }
}

function mostNegativeRealPart(jac: Float64Array, n: number): number {
  if (n === 1) return jac[0];
  if (n === 2) {
    const half = 0.5 * (jac[0] + jac[3]);
    const disc = half * half - (jac[0] * jac[3] - jac[1] * jac[2]);
    return disc > 0 ? half - Math.sqrt(disc) : half;
  }
  let low = Infinity;
  for (let i = 0; i < n; i++) {
    let radius = 0;
    for (let j = 0; j < n; j++) if (j !== i) radius += Math.abs(jac[i * n + j]);
    low = Math.min(low, jac[i * n + i] - radius);
  }
  return low;
}

export interface RodasLeg {
  rhs: RhsFunction;
  jacobian: RhsFunction;
  sign: 1 | -1;
  /** The quadrature's integrand, its value at the start and its absolute tolerance, when one rides along. */
  quadrature?: { integrand: (y: ArrayLike<number>) => number; start: number; absolute: number };
  relative: number;
  absolute: readonly number[];
  maxStep: number;
  maxSteps: number;
  initialStep: number;
  onStep: (step: RosenbrockStep) => boolean | void;
}

/**
 * RODAS from (t0, y0) to tEnd for the directed field. A quadrature rides along as odex carries
 * it, an error-controlled last component q' = g(y); its Jacobian row ∂g/∂y is taken by central
 * differences (the integrand has no derivative of its own), the q column is zero.
 */
export function integrateRodasLeg(
  leg: RodasLeg,
  y0: readonly number[],
  t0: number,
  tEnd: number,
): RosenbrockResult {
  const { sign, quadrature } = leg;
  const n = y0.length;
  const m = quadrature ? n + 1 : n;
  const field = new Float64Array(n);
  const block = new Float64Array(n * n);
  const probe = new Float64Array(n);
  // below atol/rtol the absolute tolerance rules: the scale of a state near zero
  const steps = leg.absolute
    .slice(0, n)
    .map((a) => QUADRATURE_GRADIENT_STEP * (leg.relative > 0 ? a / leg.relative : a));
  const system = {
    rhs: (y: Float64Array, out: Float64Array) => {
      leg.rhs(y, field);
      for (let k = 0; k < n; k++) out[k] = sign * field[k];
      if (quadrature) out[n] = quadrature.integrand(y.subarray(0, n));
    },
    jacobian: (y: Float64Array, out: Float64Array) => {
      leg.jacobian(y, block);
      out.fill(0);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[i * m + j] = sign * block[i * n + j];
      if (!quadrature) return;
      for (let j = 0; j < n; j++) {
        const delta = Math.max(QUADRATURE_GRADIENT_STEP * Math.abs(y[j]), steps[j]);
        for (let k = 0; k < n; k++) probe[k] = y[k];
        probe[j] = y[j] + delta;
        const up = quadrature.integrand(probe);
        probe[j] = y[j] - delta;
        out[n * m + j] = (up - quadrature.integrand(probe)) / (2 * delta);
      }
    },
  };
  const start = quadrature ? [...y0, quadrature.start] : y0;
  return integrateRosenbrock(system, start, t0, tEnd, {
    relative: leg.relative,
    absolute: quadrature ? [...leg.absolute, quadrature.absolute] : leg.absolute,
    maxStep: leg.maxStep,
    maxSteps: leg.maxSteps,
    initialStep: leg.initialStep,
    onStep: leg.onStep,
  });
}

/**
 * The rest of integrateFlow's run after odex's last accepted point `from` (its time, state,
 * quadrature value and last step): RODAS with the same tolerances (none tighter than
 * RODAS_MIN_RELATIVE_TOL), step cap and onStep, and a budget of maxSteps of its own. Evaluations count RODAS's alone.
 */
export function continueWithRodas(
  rhs: RhsFunction,
  options: FlowOptions,
  from: { t: number; y: number[]; q: number; step: number },
  tEnd: number,
  timeScale: number,
): IntegrationResult {
  const quad = options.quadrature;
  const n = from.y.length;
  const loosen = Math.max(1, RODAS_MIN_RELATIVE_TOL / options.tolerances.relative);
  const rodas = integrateRodasLeg(
    {
      rhs,
      jacobian: options.jacobian!,
      sign: options.direction,
      quadrature: quad
        ? { integrand: quad.integrand, start: from.q, absolute: quad.absolute * loosen }
        : undefined,
      relative: options.tolerances.relative * loosen,
      absolute: options.tolerances.absolute.map((a) => a * loosen),
      maxStep: options.maxStep,
      maxSteps: options.maxSteps,
      // odex's last step is a stable one; none when it stopped before its first
      initialStep: from.step > 0 ? from.step : timeScale * RODAS_FIRST_STEP_OF_SCALE,
      onStep: options.onStep,
    },
    from.y,
    from.t,
    tEnd,
  );
  // as odex's result: the quadrature's value only at the end
  return {
    status: rodas.status,
    tEnd: rodas.t,
    y: rodas.status === "finished" ? rodas.y : rodas.y.slice(0, n),
    evaluations: rodas.evaluations,
    method: "odex+rodas",
  };
}

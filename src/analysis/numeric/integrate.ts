import { Solver } from "odex";
import type { RhsFunction } from "../../model/types.js";
import { TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH, TRAJECTORY_RELATIVE_TOL } from "../constants.js";
import { continueWithRodas, StiffnessWatch } from "./stiff-switch.js";

/**
 * Thin wrapper over odex (Hairer's extrapolation method); the dimension is that of the start.
 * Backward time is integrated as the forward flow of −f, so every caller sees increasing time.
 * Given the Jacobian, a stiff stretch continues with RODAS (numeric/stiff-switch.ts).
 */
export interface IntegrationTolerances {
  /** Relative tolerance per step. */
  relative: number;
  /** Absolute tolerance per state, in state units (scaled to the window). */
  absolute: number[];
}

export function tolerancesFor(
  width: number[],
  relative = TRAJECTORY_RELATIVE_TOL,
  absoluteOfWidth = TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH,
): IntegrationTolerances {
  return { relative, absolute: width.map((w) => absoluteOfWidth * w) };
}

export interface StepInfo {
  t0: number;
  t1: number;
  y: number[];
  /** Dense interpolant on [t0, t1]: component, time → value. */
  dense: (component: number, t: number) => number;
}

export interface FlowOptions {
  direction: 1 | -1;
  tolerances: IntegrationTolerances;
  maxStep: number;
  maxSteps: number;
  /**
   * Optional scalar integrated alongside the state (as a third, error-controlled component):
   * dq/dt = quadrature(y), read back through dense component 2.
   */
  quadrature?: { integrand: (y: ArrayLike<number>) => number; absolute: number };
  /**
   * The field's exact Jacobian, row-major (model.jacobianAt). With it, odex hands over to RODAS
   * when its step collapses or its steps run out and the Jacobian shows stiffness (RODAS then
   * has maxSteps of its own); without it odex runs alone.
   */
  jacobian?: RhsFunction;
  /** Called after every accepted step; return false to stop. */
  onStep: (step: StepInfo) => boolean | void;
}

/** How an integration ended: "finished": reached tEnd; "stopped": onStep asked to stop; "step-limit"; "non-finite": f was not finite. */
export type IntegrationStatus = "finished" | "stopped" | "step-limit" | "non-finite";

/** The integration's own result (not a fate: the fate rules read it, in flow/follow.ts). */
export interface IntegrationResult {
  status: IntegrationStatus;
  tEnd: number;
  y: number[];
  evaluations: number;
  /** "odex+rodas": odex ran up to a stiff stretch, RODAS from there on. */
  method: "odex" | "odex+rodas";
}

function odexSolver(n: number, options: FlowOptions): Solver {
  const quad = options.quadrature;
  const solver = new Solver(quad ? n + 1 : n);
  solver.denseOutput = true;
  solver.relativeTolerance = options.tolerances.relative;
  solver.absoluteTolerance = quad
    ? [...options.tolerances.absolute, quad.absolute]
    : options.tolerances.absolute;
  solver.maxStepSize = options.maxStep;
  solver.maxSteps = options.maxSteps;
  return solver;
}

export function integrateFlow(
  rhs: RhsFunction,
  y0: readonly number[],
  tEnd: number,
  options: FlowOptions,
): IntegrationResult {
  const quad = options.quadrature;
  const n = y0.length;
  const solver = odexSolver(n, options);
  const buffer = new Float64Array(n);
  const sign = options.direction;
  let nonFinite = false;
  let stopped = false;
  let evaluations = 0;
  const f = (_t: number, y: number[]) => {
    evaluations++;
    rhs(y, buffer);
    // no callbacks and arrays born as doubles: this runs a dozen times per step, and
    // Array.from/every here tripled the cost of a trajectory
    for (let k = 0; k < n; k++) {
      if (!Number.isFinite(buffer[k])) {
        nonFinite = true;
        return new Array<number>(n).fill(0);
      }
    }
    const dy =
      n === 2
        ? [sign * buffer[0], sign * buffer[1]]
        : (Array.prototype.map.call(buffer, (v: number) => sign * v) as number[]);
    if (quad) dy.push(quad.integrand(y));
    return dy;
  };
  let lastT = 0;
  let lastY = Array.from(y0);
  let lastQ = 0;
  let lastStep = 0;
  const timeScale = Number.isFinite(options.maxStep) ? options.maxStep : tEnd;
  const watch = options.jacobian ? new StiffnessWatch(options.jacobian, sign, timeScale) : null;
  let handOver = false;
  const observer = (
    step: number,
    t0: number,
    t1: number,
    y: number[],
    dense?: (c: number, x: number) => number,
  ) => {
    if (nonFinite) return false;
    lastT = t1;
    lastY = y.slice(0, n);
    lastQ = y[n];
    lastStep = t1 - t0;
    if (step === 1) return undefined;
    if (options.onStep({ t0, t1, y, dense: dense! }) === false) {
      stopped = true;
      return false;
    }
    if (watch?.collapsedStiff(t1, lastY)) {
      handOver = true;
      return false;
    }
    return undefined;
  };
  const result = solver.solve(f, 0, quad ? [...y0, 0] : Array.from(y0), tEnd, observer);
  const ranOut = result.outcome === 1 && !nonFinite && !stopped;
  if (watch && (handOver || (ranOut && watch.isStiff(lastY)))) {
    const rest = continueWithRodas(
      rhs,
      options,
      { t: lastT, y: lastY, q: lastQ, step: lastStep },
      tEnd,
      timeScale,
    );
    return { ...rest, evaluations: evaluations + rest.evaluations };
  }
  return odexOutcome(result, nonFinite, stopped, { t: lastT, y: lastY }, evaluations);
}

/** The result of an integration odex ran alone; `last`: its last accepted point. */
function odexOutcome(
  result: { outcome: number; xEnd: number; y: number[] },
  nonFinite: boolean,
  stopped: boolean,
  last: { t: number; y: number[] },
  evaluations: number,
): IntegrationResult {
  const status: IntegrationStatus = nonFinite
    ? "non-finite"
    : stopped
      ? "stopped"
      : result.outcome === 1
        ? "step-limit"
        : "finished";
  return {
    status,
    tEnd: status === "finished" ? result.xEnd : last.t,
    y: status === "finished" ? result.y : last.y,
    evaluations,
    method: "odex",
  };
}

import { Solver } from "odex";
import type { RhsFunction } from "../../model/types.js";

/**
 * Thin wrapper over odex (Hairer's extrapolation method) for planar flows. Backward time is
 * integrated as the forward flow of −f, so every caller sees increasing time.
 */
export interface IntegrationTolerances {
  /** Relative tolerance per step. */
  relative: number;
  /** Absolute tolerance per state, in state units (scaled to the window). */
  absolute: [number, number];
}

/**
 * Default tolerances: 1e-9 relative, and 1e-11 of the window width absolute, so a state of size
 * 10 and one of size 1e5 are both resolved to about nine digits.
 */
export const TRAJECTORY_RELATIVE_TOL = 1e-9;
export const TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH = 1e-11;

export function tolerancesFor(width: number[], relative = TRAJECTORY_RELATIVE_TOL, absoluteOfWidth = TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH): IntegrationTolerances {
  return { relative, absolute: [absoluteOfWidth * width[0], absoluteOfWidth * width[1]] };
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
  /** Called after every accepted step; return false to stop. */
  onStep: (step: StepInfo) => boolean | void;
}

export interface FlowOutcome {
  /** "finished": reached tEnd; "stopped": onStep asked to stop; "step-limit"; "non-finite": f was not finite. */
  status: "finished" | "stopped" | "step-limit" | "non-finite";
  tEnd: number;
  y: number[];
  evaluations: number;
}

export function integrateFlow(rhs: RhsFunction, y0: readonly number[], tEnd: number, options: FlowOptions): FlowOutcome {
  const quad = options.quadrature;
  const solver = new Solver(quad ? 3 : 2);
  solver.denseOutput = true;
  solver.relativeTolerance = options.tolerances.relative;
  solver.absoluteTolerance = quad ? [...options.tolerances.absolute, quad.absolute] : options.tolerances.absolute;
  solver.maxStepSize = options.maxStep;
  solver.maxSteps = options.maxSteps;
  const buffer = new Float64Array(2);
  const sign = options.direction;
  let nonFinite = false;
  let stopped = false;
  let evaluations = 0;
  const f = (_t: number, y: number[]) => {
    evaluations++;
    rhs(y, buffer);
    if (!Number.isFinite(buffer[0]) || !Number.isFinite(buffer[1])) {
      nonFinite = true;
      return [0, 0];
    }
    if (quad) return [sign * buffer[0], sign * buffer[1], quad.integrand(y)];
    return [sign * buffer[0], sign * buffer[1]];
  };
  let lastT = 0;
  let lastY = [y0[0], y0[1]];
  const observer = (n: number, t0: number, t1: number, y: number[], dense?: (c: number, x: number) => number) => {
    if (nonFinite) return false;
    lastT = t1;
    lastY = [y[0], y[1]];
    if (n === 1) return undefined;
    if (options.onStep({ t0, t1, y, dense: dense! }) === false) {
      stopped = true;
      return false;
    }
    return undefined;
  };
  const result = solver.solve(f, 0, quad ? [y0[0], y0[1], 0] : [y0[0], y0[1]], tEnd, observer);
  const status = nonFinite ? "non-finite" : stopped ? "stopped" : result.outcome === 1 ? "step-limit" : "finished";
  return { status, tEnd: status === "finished" ? result.xEnd : lastT, y: status === "finished" ? result.y : lastY, evaluations };
}

import { Solver } from "odex";
import type { RhsFunction } from "../../model/types.js";
import { TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH, TRAJECTORY_RELATIVE_TOL } from "../constants.js";

/**
 * Thin wrapper over odex (Hairer's extrapolation method); the dimension is that of the start.
 * Backward time is integrated as the forward flow of −f, so every caller sees increasing time.
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
}

export function integrateFlow(
  rhs: RhsFunction,
  y0: readonly number[],
  tEnd: number,
  options: FlowOptions,
): IntegrationResult {
  const quad = options.quadrature;
  const n = y0.length;
  const solver = new Solver(quad ? n + 1 : n);
  solver.denseOutput = true;
  solver.relativeTolerance = options.tolerances.relative;
  solver.absoluteTolerance = quad
    ? [...options.tolerances.absolute, quad.absolute]
    : options.tolerances.absolute;
  solver.maxStepSize = options.maxStep;
  solver.maxSteps = options.maxSteps;
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
    if (step === 1) return undefined;
    if (options.onStep({ t0, t1, y, dense: dense! }) === false) {
      stopped = true;
      return false;
    }
    return undefined;
  };
  const result = solver.solve(f, 0, quad ? [...y0, 0] : Array.from(y0), tEnd, observer);
  const status: IntegrationStatus = nonFinite
    ? "non-finite"
    : stopped
      ? "stopped"
      : result.outcome === 1
        ? "step-limit"
        : "finished";
  return {
    status,
    tEnd: status === "finished" ? result.xEnd : lastT,
    y: status === "finished" ? result.y : lastY,
    evaluations,
  };
}

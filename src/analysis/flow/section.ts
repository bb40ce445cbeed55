import type { Model } from "../../model/types.js";
import type { TrajectoryPath } from "./follow.js";
import { integrateFlow, tolerancesFor, type StepInfo } from "../numeric/integrate.js";
import { boundsOf, type Box } from "../numeric/window.js";
import { bisectPredicate } from "../numeric/roots.js";
import {
  MIN_RETURN_FRACTION,
  ORBIT_SAMPLES,
  SECTION_BISECTION_STEPS,
  SHOOT_ABSOLUTE_TOL_OF_WIDTH,
  SHOOT_MAX_STEP_OF_PERIOD,
  SHOOT_SAMPLE_MAX_STEP_OF_PERIOD,
  SHOOT_MAX_STEPS,
  SHOOT_PERIODS,
  SHOOT_RELATIVE_TOL,
  RODAS_MIN_RELATIVE_TOL,
  WINDOW_EXIT_SLACK,
} from "../constants.js";

/**
 * The Poincaré section of periodic-orbit work: the ray {second state = centre, first state >
 * centre} through an equilibrium, crossed in one sense (+1: the second state increasing), in one
 * time direction. A point on it is its scaled radius r = (x − x_c) / width.
 */
export interface Section {
  model: Model;
  box: Box;
  center: [number, number];
  sense: 1 | -1;
  direction: 1 | -1;
}

/** One return to the section: where, after how long, ∮ trace J dt, and the box the orbit swept. */
export interface Return {
  r: number;
  period: number;
  traceIntegral: number;
  /** Lowest and highest value of each state at the step points of the return. */
  lo: [number, number];
  hi: [number, number];
  orbit: TrajectoryPath | null;
  /** Whether RODAS took over a stiff stretch, at its looser tolerance (RODAS_MIN_RELATIVE_TOL). */
  stiff: boolean;
}

/**
 * How much looser than SHOOT_RELATIVE_TOL a return was integrated: 1, or where RODAS took over a
 * stiff stretch, RODAS_MIN_RELATIVE_TOL / SHOOT_RELATIVE_TOL. The shooting's residual, its
 * acceptance and the slope's difference step scale with it, so they ask no more than the
 * integration gives (a relaxation cycle's return wanders by ~1e-9 of the window from start to start).
 */
export function returnAccuracyScale(ret: Return): number {
  return ret.stiff ? Math.max(1, RODAS_MIN_RELATIVE_TOL / SHOOT_RELATIVE_TOL) : 1;
}

/** The section crossing in [t0, t1] on the interpolant (bisection, then one secant step for the last bits), when it lies on the ray. */
function sectionCrossing(
  dense: StepInfo["dense"],
  t0: number,
  t1: number,
  center: [number, number],
  sense: 1 | -1,
): { t: number; x0: number } | null {
  const side = (m: number) => sense * (dense(1, m) - center[1]) >= 0;
  const { lo: a, hi: b } = bisectPredicate(t0, t1, side, SECTION_BISECTION_STEPS);
  const fa = dense(1, a) - center[1],
    fb = dense(1, b) - center[1];
  const tc = fb !== fa ? b - (fb * (b - a)) / (fb - fa) : b;
  const x0 = dense(0, tc);
  return x0 > center[0] ? { t: tc, x0 } : null;
}

/**
 * The orbit has left the feasible region (the states' min/max, to WINDOW_EXIT_SLACK of the
 * window's width): trajectories end there, so no cycle they reach lies beyond it. A limit tied
 * to the window instead would cut through cycles that trajectories do reach, and a cycle grazing
 * it would be found at one parameter value and lost at the next.
 */
function strayed(region: Box, box: Box, y: ArrayLike<number>): boolean {
  for (let k = 0; k < region.lo.length; k++) {
    const slack = WINDOW_EXIT_SLACK * box.width[k];
    if (y[k] < region.lo[k] - slack || y[k] > region.hi[k] + slack) return true;
  }
  return false;
}

/** Whether a return's swept box lies inside `region` (the feasible region), to `slack` of the window's width. */
export function staysInside(ret: Return, region: Box, box: Box, slack: number): boolean {
  return [0, 1].every(
    (k) =>
      ret.lo[k] >= region.lo[k] - slack * box.width[k] && ret.hi[k] <= region.hi[k] + slack * box.width[k],
  );
}

/**
 * How much a return computes: "sample" only where it lands (steps up to
 * SHOOT_SAMPLE_MAX_STEP_OF_PERIOD), for scanning and probing the return map; "solve" the same in
 * steps of SHOOT_MAX_STEP_OF_PERIOD, for shooting; "orbit" also the orbit's samples and
 * ∮ trace J dt (the quadrature and its Jacobian evaluations are needed only once per orbit).
 */
export type ReturnMode = "sample" | "solve" | "orbit";

/**
 * The first return from radius r, integrated tightly (SHOOT_RELATIVE_TOL) for at most
 * SHOOT_PERIODS guessed periods; null when there is none (the orbit left the feasible region, stalled or never
 * came back). traceIntegral is NaN and orbit null unless mode is "orbit".
 */
export function returnMap(section: Section, r: number, guessPeriod: number, mode: ReturnMode): Return | null {
  const keepOrbit = mode === "orbit";
  const { model, box, center, sense, direction } = section;
  const region = boundsOf(model);
  const start: [number, number] = [center[0] + r * box.width[0], center[1]];
  const jac = new Float64Array(4);
  const y = new Float64Array(2);
  let result: Return | null = null;
  let prevSecond = start[1];
  const lo: [number, number] = [start[0], start[1]];
  const hi: [number, number] = [start[0], start[1]];
  const samples: TrajectoryPath = { t: [], x: [], y: [] };
  const sampleDt = guessPeriod / ORBIT_SAMPLES;
  let nextSample = 0;
  const run = integrateFlow(model.rhs, start, guessPeriod * SHOOT_PERIODS, {
    direction,
    tolerances: tolerancesFor(box.width, SHOOT_RELATIVE_TOL, SHOOT_ABSOLUTE_TOL_OF_WIDTH),
    maxStep: guessPeriod * (mode === "sample" ? SHOOT_SAMPLE_MAX_STEP_OF_PERIOD : SHOOT_MAX_STEP_OF_PERIOD),
    maxSteps: SHOOT_MAX_STEPS,
    jacobian: model.jacobianAt,
    // ∮ trace J dt as an error-controlled third component: the Floquet multiplier's exponent
    quadrature: keepOrbit
      ? {
          integrand: (state) => {
            y[0] = state[0];
            y[1] = state[1];
            model.jacobianAt(y, jac);
            return jac[0] + jac[3];
          },
          absolute: SHOOT_RELATIVE_TOL,
        }
      : undefined,
    onStep: ({ t0, t1, y: end, dense }) => {
      let stepEnd = t1;
      const before = prevSecond - center[1];
      const after = end[1] - center[1];
      prevSecond = end[1];
      const crossed =
        t1 > MIN_RETURN_FRACTION * guessPeriod &&
        (sense === -1 ? before > 0 && after <= 0 : before < 0 && after >= 0);
      const hit = crossed ? sectionCrossing(dense, t0, t1, center, sense) : null;
      if (hit) stepEnd = hit.t;
      for (let k = 0; k < 2; k++) {
        const v = hit ? dense(k, hit.t) : end[k];
        lo[k] = Math.min(lo[k], v);
        hi[k] = Math.max(hi[k], v);
      }
      if (keepOrbit) {
        while (nextSample <= stepEnd) {
          samples.t.push(nextSample);
          samples.x.push(dense(0, nextSample));
          samples.y.push(dense(1, nextSample));
          nextSample += sampleDt;
        }
      }
      if (hit) {
        if (keepOrbit) {
          samples.t.push(hit.t);
          samples.x.push(hit.x0);
          samples.y.push(center[1]);
        }
        result = {
          r: (hit.x0 - center[0]) / box.width[0],
          period: hit.t,
          traceIntegral: keepOrbit ? dense(2, hit.t) : NaN,
          lo,
          hi,
          orbit: keepOrbit ? samples : null,
          stiff: false,
        };
        return false;
      }
      return !strayed(region, box, end);
    },
  });
  // set in onStep: the compiler cannot see that and takes result for null here
  const found = result as Return | null;
  return found && { ...found, stiff: run.method === "odex+rodas" };
}

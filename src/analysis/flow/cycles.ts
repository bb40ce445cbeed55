import type { Model } from "../../model/types.js";
import type { Recurrence, TrajectoryPath } from "./follow.js";
import { integrateFlow, tolerancesFor, type StepInfo } from "../numeric/integrate.js";
import type { Box } from "../numeric/window.js";
import { bisectPredicate } from "../numeric/roots.js";
import {
  FAMILY_PROBE,
  MIN_RETURN_FRACTION,
  NEUTRAL_MULTIPLIER_TOL,
  ORBIT_SAMPLES,
  RETURN_SLOPE_OFFSET,
  SAME_CYCLE_EXTENT_TOL,
  SAME_CYCLE_PERIOD_TOL,
  SECTION_BISECTION_STEPS,
  SHOOT_ABSOLUTE_TOL_OF_WIDTH,
  SHOOT_ACCEPT_FACTOR,
  SHOOT_ESCAPE_WINDOWS,
  SHOOT_MAX_ITERATIONS,
  SHOOT_MAX_STEP_OF_PERIOD,
  SHOOT_MAX_STEPS,
  SHOOT_PERIODS,
  SHOOT_RELATIVE_TOL,
  SHOOT_RESIDUAL_TOL,
  SHOOT_SECANT_OFFSET,
} from "../constants.js";

export interface CycleResult {
  id: string;
  period: number;
  stability: "stable" | "unstable" | "semi-stable" | "neutral";
  /** The non-trivial Floquet multiplier, exp(∮ trace J dt). */
  floquetMultiplier: number;
  /** Slope of the return map at the fixed point by central differences: a cross-check of the multiplier. */
  returnMapSlope: number;
  extent: Record<string, [number, number]>;
  /** The equilibrium whose ray is the Poincaré section. */
  around: string;
  section: { point: Record<string, number>; sense: 1 | -1 };
  /** Residual of the shooting problem |P(r) − r| in window-scaled units. */
  residual: number;
  orbit: TrajectoryPath;
}

interface Return {
  r: number;
  period: number;
  traceIntegral: number;
  orbit: TrajectoryPath | null;
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

/** The orbit has strayed more than SHOOT_ESCAPE_WINDOWS window widths outside the window. */
function strayed(box: Box, y: ArrayLike<number>): boolean {
  for (let k = 0; k < box.lo.length; k++) {
    if (
      y[k] < box.lo[k] - SHOOT_ESCAPE_WINDOWS * box.width[k] ||
      y[k] > box.hi[k] + SHOOT_ESCAPE_WINDOWS * box.width[k]
    )
      return true;
  }
  return false;
}

function returnMap(
  model: Model,
  box: Box,
  center: [number, number],
  sense: 1 | -1,
  direction: 1 | -1,
  r: number,
  guessPeriod: number,
  keepOrbit: boolean,
): Return | null {
  const start: [number, number] = [center[0] + r * box.width[0], center[1]];
  const jac = new Float64Array(4);
  const y = new Float64Array(2);
  let result: Return | null = null;
  let prevSecond = start[1];
  const samples: TrajectoryPath = { t: [], x: [], y: [] };
  const sampleDt = guessPeriod / ORBIT_SAMPLES;
  let nextSample = 0;
  integrateFlow(model.rhs, start, guessPeriod * SHOOT_PERIODS, {
    direction,
    tolerances: tolerancesFor(box.width, SHOOT_RELATIVE_TOL, SHOOT_ABSOLUTE_TOL_OF_WIDTH),
    maxStep: guessPeriod * SHOOT_MAX_STEP_OF_PERIOD,
    maxSteps: SHOOT_MAX_STEPS,
    // ∮ trace J dt as an error-controlled third component: the Floquet multiplier's exponent
    quadrature: {
      integrand: (state) => {
        y[0] = state[0];
        y[1] = state[1];
        model.jacobianAt(y, jac);
        return jac[0] + jac[3];
      },
      absolute: SHOOT_RELATIVE_TOL,
    },
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
          traceIntegral: dense(2, hit.t),
          orbit: keepOrbit ? samples : null,
        };
        return false;
      }
      return !strayed(box, end);
    },
  });
  return result;
}

/**
 * Stability from the multiplier; where it is within NEUTRAL_MULTIPLIER_TOL of 1, from the return
 * map FAMILY_PROBE either side (flat both ways: a family of closed orbits, "neutral").
 */
function stabilityOf(
  multiplier: number,
  probe: (r: number) => Return | null,
  rStar: number,
  direction: 1 | -1,
): CycleResult["stability"] {
  if (multiplier < 1 - NEUTRAL_MULTIPLIER_TOL) return "stable";
  if (multiplier > 1 + NEUTRAL_MULTIPLIER_TOL) return "unstable";
  const rOut = rStar + FAMILY_PROBE;
  const rIn = Math.max(rStar - FAMILY_PROBE, rStar / 2);
  const out = probe(rOut);
  const inn = probe(rIn);
  const gOut = out ? out.r - rOut : NaN;
  const gIn = inn ? inn.r - rIn : NaN;
  const flat = SHOOT_ACCEPT_FACTOR * SHOOT_RESIDUAL_TOL;
  if (Math.abs(gOut) < flat && Math.abs(gIn) < flat) return "neutral";
  if (Math.sign(gOut) === Math.sign(gIn)) return "semi-stable";
  return direction * gOut < 0 ? "stable" : "unstable";
}

/**
 * Confirms and solves a periodic orbit from a recurrence: secant iteration on the return map of
 * the ray section through `around` (shooting), then the period, the orbit, its extent, and the
 * stability from the non-trivial Floquet multiplier (Liouville: exp of the integral of the trace
 * of J over one period, for planar flows).
 */
export function solvePeriodicOrbit(
  model: Model,
  box: Box,
  recurrence: Recurrence,
  center: [number, number],
  direction: 1 | -1,
): Omit<CycleResult, "id"> | null {
  const { sense } = recurrence;
  let period = recurrence.period;
  let r0 = (recurrence.point[0] - center[0]) / box.width[0];
  const p0 = returnMap(model, box, center, sense, direction, r0, period, false);
  if (!p0) return null;
  let g0 = p0.r - r0;
  let r1 = r0 * (1 + SHOOT_SECANT_OFFSET);
  for (let it = 0; it < SHOOT_MAX_ITERATIONS && Math.abs(g0) > SHOOT_RESIDUAL_TOL; it++) {
    const p1 = returnMap(model, box, center, sense, direction, r1, period, false);
    if (!p1) return null;
    const g1 = p1.r - r1;
    if (g1 === g0) break;
    const r2 = r1 - (g1 * (r1 - r0)) / (g1 - g0);
    r0 = r1;
    g0 = g1;
    period = p1.period;
    r1 = r2;
    if (!(r1 > 0)) return null;
    if (Math.abs(g0) <= SHOOT_RESIDUAL_TOL) break;
  }
  const rStar = Math.abs(g0) <= SHOOT_RESIDUAL_TOL ? r0 : r1;
  const final = returnMap(model, box, center, sense, direction, rStar, period, true);
  if (!final || !final.orbit) return null;
  const residual = Math.abs(final.r - rStar);
  if (residual > SHOOT_ACCEPT_FACTOR * SHOOT_RESIDUAL_TOL) return null;

  // the trace is of the forward field and dt > 0 either way, so this is the forward multiplier
  const multiplier = Math.exp(final.traceIntegral);
  const h = RETURN_SLOPE_OFFSET;
  const plus = returnMap(model, box, center, sense, direction, rStar + h, final.period, false);
  const minus = returnMap(model, box, center, sense, direction, rStar - h, final.period, false);
  let slope = plus && minus ? (plus.r - minus.r) / (2 * h) : NaN;
  if (direction === -1 && Number.isFinite(slope)) slope = 1 / slope; // the backward return map is the inverse
  const probe = (r: number) => returnMap(model, box, center, sense, direction, r, final.period, false);
  const stability = stabilityOf(multiplier, probe, rStar, direction);
  const names = model.stateNames;
  const xs = final.orbit.x,
    ys = final.orbit.y;
  return {
    period: final.period,
    stability,
    floquetMultiplier: multiplier,
    returnMapSlope: slope,
    extent: {
      [names[0]]: [Math.min(...xs), Math.max(...xs)],
      [names[1]]: [Math.min(...ys), Math.max(...ys)],
    },
    around: recurrence.around,
    section: {
      point: { [names[0]]: center[0] + rStar * box.width[0], [names[1]]: center[1] },
      sense: (sense * direction) as 1 | -1,
    },
    residual,
    orbit: final.orbit,
  };
}

/** Whether two solved orbits are the same closed curve. */
export function sameCycle(
  a: Omit<CycleResult, "id">,
  b: Omit<CycleResult, "id">,
  box: Box,
  names: string[],
): boolean {
  if (Math.abs(a.period - b.period) > SAME_CYCLE_PERIOD_TOL * Math.max(a.period, b.period)) return false;
  return names.every(
    (n, k) =>
      Math.abs(a.extent[n][0] - b.extent[n][0]) < SAME_CYCLE_EXTENT_TOL * box.width[k] &&
      Math.abs(a.extent[n][1] - b.extent[n][1]) < SAME_CYCLE_EXTENT_TOL * box.width[k],
  );
}

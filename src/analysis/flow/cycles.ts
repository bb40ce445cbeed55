import type { Model } from "../../model/types.js";
import type { Recurrence, TrajectoryPath } from "./follow.js";
import { integrateFlow, tolerancesFor } from "../numeric/integrate.js";
import type { Box } from "../numeric/window.js";

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

/** Shooting integrates tighter than trajectories: the period is reported to ~1e-9 relative. */
const SHOOT_RELATIVE_TOL = 1e-12;
const SHOOT_ABSOLUTE_TOL_OF_WIDTH = 1e-13;
/** Newton (secant) on the return map stops when |P(r) − r| is below this, scaled. */
const SHOOT_RESIDUAL_TOL = 1e-11;
const SHOOT_MAX_ITERATIONS = 40;
/** |m − 1| below this: the multiplier alone cannot tell stable from unstable. */
export const NEUTRAL_MULTIPLIER_TOL = 1e-6;
/** Return-map offsets (scaled) used to tell a family of closed orbits from a semi-stable orbit. */
const FAMILY_PROBE = 1e-3;
/** Ends of the section ray that count as a genuine return (not the start) after this fraction of the guess period. */
const MIN_RETURN_FRACTION = 0.2;
const ORBIT_SAMPLES = 240;

interface Return {
  r: number;
  period: number;
  traceIntegral: number;
  orbit: TrajectoryPath | null;
}


function returnMap(model: Model, box: Box, center: [number, number], sense: 1 | -1, direction: 1 | -1, r: number, guessPeriod: number, keepOrbit: boolean): Return | null {
  const start: [number, number] = [center[0] + r * box.width[0], center[1]];
  const jac = new Float64Array(4);
  const y = new Float64Array(2);
  let result: Return | null = null;
  let prevSecond = start[1];
  const samples: TrajectoryPath = { t: [], x: [], y: [] };
  const sampleDt = guessPeriod / ORBIT_SAMPLES;
  let nextSample = 0;
  integrateFlow(model.rhs, start, guessPeriod * 3, {
    direction,
    tolerances: tolerancesFor(box.width, SHOOT_RELATIVE_TOL, SHOOT_ABSOLUTE_TOL_OF_WIDTH),
    maxStep: guessPeriod / 16,
    maxSteps: 100_000,
    // ∮ trace J dt as an error-controlled third component: the Floquet multiplier's exponent
    quadrature: {
      integrand: (state) => {
        y[0] = state[0]; y[1] = state[1];
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
      const crossed = t1 > MIN_RETURN_FRACTION * guessPeriod && (sense === -1 ? before > 0 && after <= 0 : before < 0 && after >= 0);
      let hit: { t: number; x0: number } | null = null;
      if (crossed) {
        let a = t0, b = t1;
        for (let it = 0; it < 80; it++) {
          const m = 0.5 * (a + b);
          if (m === a || m === b) break;
          const v = dense(1, m) - center[1];
          if (sense * v >= 0) b = m; else a = m;
        }
        // one secant refinement on the interpolant for the last bits
        const fa = dense(1, a) - center[1], fb = dense(1, b) - center[1];
        const tc = fb !== fa ? b - (fb * (b - a)) / (fb - fa) : b;
        const x0 = dense(0, tc);
        if (x0 > center[0]) {
          hit = { t: tc, x0 };
          stepEnd = tc;
        }
      }
      if (keepOrbit) {
        while (nextSample <= stepEnd) {
          samples.t.push(nextSample); samples.x.push(dense(0, nextSample)); samples.y.push(dense(1, nextSample));
          nextSample += sampleDt;
        }
      }
      if (hit) {
        if (keepOrbit) { samples.t.push(hit.t); samples.x.push(hit.x0); samples.y.push(center[1]); }
        result = { r: (hit.x0 - center[0]) / box.width[0], period: hit.t, traceIntegral: dense(2, hit.t), orbit: keepOrbit ? samples : null };
        return false;
      }
      const outside = end.some((v, k) => v < box.lo[k] - box.width[k] || v > box.hi[k] + box.width[k]);
      return !outside;
    },
  });
  return result;
}

/**
 * Confirms and solves a periodic orbit from a recurrence: secant iteration on the return map of
 * the ray section through `around` (shooting), then the period, the orbit, its extent, and the
 * stability from the non-trivial Floquet multiplier (Liouville: exp of the integral of the trace
 * of J over one period, for planar flows).
 */
export function solvePeriodicOrbit(model: Model, box: Box, recurrence: Recurrence, center: [number, number], direction: 1 | -1): Omit<CycleResult, "id"> | null {
  const { sense } = recurrence;
  let period = recurrence.period;
  let r0 = (recurrence.point[0] - center[0]) / box.width[0];
  let p0 = returnMap(model, box, center, sense, direction, r0, period, false);
  if (!p0) return null;
  let g0 = p0.r - r0;
  let r1 = r0 * (1 + 1e-5);
  for (let it = 0; it < SHOOT_MAX_ITERATIONS && Math.abs(g0) > SHOOT_RESIDUAL_TOL; it++) {
    const p1 = returnMap(model, box, center, sense, direction, r1, period, false);
    if (!p1) return null;
    const g1 = p1.r - r1;
    if (g1 === g0) break;
    const r2 = r1 - (g1 * (r1 - r0)) / (g1 - g0);
    r0 = r1; g0 = g1; period = p1.period;
    r1 = r2;
    if (!(r1 > 0)) return null;
    if (Math.abs(g0) <= SHOOT_RESIDUAL_TOL) break;
  }
  const rStar = Math.abs(g0) <= SHOOT_RESIDUAL_TOL ? r0 : r1;
  const final = returnMap(model, box, center, sense, direction, rStar, period, true);
  if (!final || !final.orbit) return null;
  const residual = Math.abs(final.r - rStar);
  if (residual > 1e3 * SHOOT_RESIDUAL_TOL) return null;

  // the trace is of the forward field and dt > 0 either way, so this is the forward multiplier
  const multiplier = Math.exp(final.traceIntegral);
  const h = 1e-6;
  const plus = returnMap(model, box, center, sense, direction, rStar + h, final.period, false);
  const minus = returnMap(model, box, center, sense, direction, rStar - h, final.period, false);
  let slope = plus && minus ? (plus.r - minus.r) / (2 * h) : NaN;
  if (direction === -1 && Number.isFinite(slope)) slope = 1 / slope; // the backward return map is the inverse
  let stability: CycleResult["stability"];
  if (multiplier < 1 - NEUTRAL_MULTIPLIER_TOL) stability = "stable";
  else if (multiplier > 1 + NEUTRAL_MULTIPLIER_TOL) stability = "unstable";
  else {
    const out = returnMap(model, box, center, sense, direction, rStar + FAMILY_PROBE, final.period, false);
    const inn = returnMap(model, box, center, sense, direction, Math.max(rStar - FAMILY_PROBE, rStar / 2), final.period, false);
    const gOut = out ? out.r - (rStar + FAMILY_PROBE) : NaN;
    const gIn = inn ? inn.r - Math.max(rStar - FAMILY_PROBE, rStar / 2) : NaN;
    const flat = 1e3 * SHOOT_RESIDUAL_TOL;
    if (Math.abs(gOut) < flat && Math.abs(gIn) < flat) stability = "neutral";
    else if (Math.sign(gOut) === Math.sign(gIn)) stability = "semi-stable";
    else stability = direction * gOut < 0 ? "stable" : "unstable";
  }
  const names = model.stateNames;
  const xs = final.orbit.x, ys = final.orbit.y;
  return {
    period: final.period,
    stability,
    floquetMultiplier: multiplier,
    returnMapSlope: slope,
    extent: { [names[0]]: [Math.min(...xs), Math.max(...xs)], [names[1]]: [Math.min(...ys), Math.max(...ys)] },
    around: recurrence.around,
    section: { point: { [names[0]]: center[0] + rStar * box.width[0], [names[1]]: center[1] }, sense: (sense * direction) as 1 | -1 },
    residual,
    orbit: final.orbit,
  };
}

/** Whether two solved orbits are the same closed curve. */
export function sameCycle(a: Omit<CycleResult, "id">, b: Omit<CycleResult, "id">, box: Box, names: string[]): boolean {
  if (Math.abs(a.period - b.period) > 1e-6 * Math.max(a.period, b.period)) return false;
  return names.every((n, k) =>
    Math.abs(a.extent[n][0] - b.extent[n][0]) < 1e-5 * box.width[k] && Math.abs(a.extent[n][1] - b.extent[n][1]) < 1e-5 * box.width[k]);
}

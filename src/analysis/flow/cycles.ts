import type { Model } from "../../model/types.js";
import type { Recurrence, TrajectoryPath } from "./follow.js";
import type { Box } from "../numeric/window.js";
import { returnAccuracyScale, returnMap, type Return, type Section } from "./section.js";
import {
  CYCLE_MIN_EXTENT,
  FAMILY_PROBE,
  MULTIPLIER_AGREEMENT_TOL,
  NEUTRAL_MULTIPLIER_TOL,
  RETURN_SLOPE_OFFSET,
  SAME_CYCLE_EXTENT_TOL,
  SAME_CYCLE_PERIOD_TOL,
  SHOOT_ACCEPT_TOL,
  SHOOT_MAX_ITERATIONS,
  SHOOT_RESIDUAL_TOL,
  SHOOT_SECANT_OFFSET,
} from "../constants.js";

/**
 * Where crossings of a cycle's section are known to end, found once when the cycle is solved:
 * for a stable cycle ("attracting"), the radii whose return moves towards the cycle, with no
 * other fixed point sampled between and every such orbit inside the feasible region, so a
 * crossing there converges to it; for a neutral cycle ("family"), the radii whose return map is
 * the identity (to SHOOT_ACCEPT_TOL), every such orbit closed and inside the feasible region. Radii are scaled, along
 * the ray from `around`, for crossings in `section.sense` (forward time). Sampled, not proved.
 */
export interface CycleCapture {
  kind: "attracting" | "family";
  radii: [number, number];
}

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
  /** Section radii whose fate is this cycle (or its family); null for unstable and semi-stable cycles, or when none was verified. */
  capture: CycleCapture | null;
  orbit: TrajectoryPath;
}

/**
 * Why a periodic-orbit candidate was not accepted: no return to the section; the shooting did
 * not converge below SHOOT_ACCEPT_TOL; the orbit is no larger than an equilibrium's
 * neighbourhood (CYCLE_MIN_EXTENT); the Floquet multiplier disagrees with the return map's slope
 * (MULTIPLIER_AGREEMENT_TOL).
 */
export type CycleRejection =
  "no-return" | "not-converged" | "equilibrium-neighbourhood" | "multiplier-mismatch";

export type SolvedOrbit = Omit<CycleResult, "id" | "capture">;

export type OrbitSolution =
  { ok: true; cycle: SolvedOrbit; rStar: number } | { ok: false; reason: CycleRejection };

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
  if (Math.abs(gOut) < SHOOT_ACCEPT_TOL && Math.abs(gIn) < SHOOT_ACCEPT_TOL) return "neutral";
  if (Math.sign(gOut) === Math.sign(gIn)) return "semi-stable";
  return direction * gOut < 0 ? "stable" : "unstable";
}

/**
 * Secant iteration on g(r) = P(r) − r from the recurrence's crossing; a step that would leave
 * the ray (r ≤ 0) is halved towards the equilibrium instead. Returns the last iterate, its
 * period guess and whether |g| fell below SHOOT_RESIDUAL_TOL.
 */
function shoot(section: Section, r0: number, period: number): { r: number; period: number } | null {
  const p0 = returnMap(section, r0, period, "solve");
  if (!p0) return null;
  const tol = SHOOT_RESIDUAL_TOL * returnAccuracyScale(p0);
  let g0 = p0.r - r0;
  let r1 = r0 * (1 + SHOOT_SECANT_OFFSET);
  for (let it = 0; it < SHOOT_MAX_ITERATIONS && Math.abs(g0) > tol; it++) {
    const p1 = returnMap(section, r1, period, "solve");
    if (!p1) return null;
    const g1 = p1.r - r1;
    if (g1 === g0) break;
    let r2 = r1 - (g1 * (r1 - r0)) / (g1 - g0);
    if (!(r2 > 0)) r2 = r1 / 2;
    r0 = r1;
    g0 = g1;
    period = p1.period;
    r1 = r2;
  }
  return { r: Math.abs(g0) <= tol ? r0 : r1, period };
}

/** The return map's slope at r by central differences, in forward time for the section's direction. */
function returnSlope(section: Section, r: number, period: number, scale: number): number {
  const h = RETURN_SLOPE_OFFSET * scale;
  const plus = returnMap(section, r + h, period, "solve");
  const minus = returnMap(section, r - h, period, "solve");
  return plus && minus ? (plus.r - minus.r) / (2 * h) : NaN;
}

/**
 * The periodic orbit through the section's fixed point rStar, if it is one: the period, the
 * orbit, its extent, and the stability from the non-trivial Floquet multiplier (Liouville: exp
 * of the integral of the trace of J over one period, for planar flows). Accepted only when the
 * return closes to SHOOT_ACCEPT_TOL, the orbit is larger than an equilibrium's neighbourhood,
 * and the multiplier agrees with the slope of the return map: a spiral into a focus passes none
 * of these.
 */
export function acceptOrbit(section: Section, around: string, rStar: number, period: number): OrbitSolution {
  const { model, box, center, direction } = section;
  const final = returnMap(section, rStar, period, "orbit");
  if (!final || !final.orbit) return { ok: false, reason: "no-return" };
  const residual = Math.abs(final.r - rStar);
  const scale = returnAccuracyScale(final);
  if (!(residual <= SHOOT_ACCEPT_TOL * scale)) return { ok: false, reason: "not-converged" };
  const size = Math.max(...[0, 1].map((k) => (final.hi[k] - final.lo[k]) / box.width[k]));
  if (!(rStar > CYCLE_MIN_EXTENT && size > CYCLE_MIN_EXTENT))
    return { ok: false, reason: "equilibrium-neighbourhood" };

  // the trace is of the forward field and dt > 0 either way, so this is the forward multiplier;
  // the return map integrated backward is its inverse
  const multiplier = Math.exp(final.traceIntegral);
  const ownSlope = returnSlope(section, rStar, final.period, scale);
  const ownMultiplier = direction === 1 ? multiplier : 1 / multiplier;
  if (!(Math.abs(ownSlope - ownMultiplier) <= MULTIPLIER_AGREEMENT_TOL * Math.max(1, ownMultiplier)))
    return { ok: false, reason: "multiplier-mismatch" };
  const probe = (r: number) => returnMap(section, r, final.period, "solve");
  const names = model.stateNames;
  const xs = final.orbit.x,
    ys = final.orbit.y;
  const cycle: SolvedOrbit = {
    period: final.period,
    stability: stabilityOf(multiplier, probe, rStar, direction),
    floquetMultiplier: multiplier,
    returnMapSlope: direction === 1 ? ownSlope : 1 / ownSlope,
    extent: {
      [names[0]]: [Math.min(...xs), Math.max(...xs)],
      [names[1]]: [Math.min(...ys), Math.max(...ys)],
    },
    around,
    section: {
      point: { [names[0]]: center[0] + rStar * box.width[0], [names[1]]: center[1] },
      sense: (section.sense * direction) as 1 | -1,
    },
    residual,
    orbit: final.orbit,
  };
  return { ok: true, cycle, rStar };
}

/** Confirms and solves a periodic orbit from a recurrence: shooting on the return map of the ray section through `around`, then acceptOrbit. */
export function solvePeriodicOrbit(
  model: Model,
  box: Box,
  recurrence: Recurrence,
  center: [number, number],
  direction: 1 | -1,
): OrbitSolution {
  const section: Section = { model, box, center, sense: recurrence.sense, direction };
  const shot = shoot(section, (recurrence.point[0] - center[0]) / box.width[0], recurrence.period);
  if (!shot) return { ok: false, reason: "no-return" };
  return acceptOrbit(section, recurrence.around, shot.r, shot.period);
}

/** Whether two solved orbits are the same closed curve. */
export function sameCycle(a: SolvedOrbit, b: SolvedOrbit, box: Box, names: string[]): boolean {
  if (Math.abs(a.period - b.period) > SAME_CYCLE_PERIOD_TOL * Math.max(a.period, b.period)) return false;
  return names.every(
    (n, k) =>
      Math.abs(a.extent[n][0] - b.extent[n][0]) < SAME_CYCLE_EXTENT_TOL * box.width[k] &&
      Math.abs(a.extent[n][1] - b.extent[n][1]) < SAME_CYCLE_EXTENT_TOL * box.width[k],
  );
}

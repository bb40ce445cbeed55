import { Matrix, solve } from "ml-matrix";
import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { Box } from "../numeric/window.js";
import {
  CAPTURE_ANGLES,
  CAPTURE_FIRST_RADIUS,
  CAPTURE_MIN_RADIUS,
  CAPTURE_SAFETY,
  CAPTURE_SHELLS,
} from "../constants.js";

/**
 * A neighbourhood of an attracting equilibrium checked to lie in its basin: the sublevel set
 * {z : zᵀ P z < level} of the quadratic Lyapunov function of the linearisation, in
 * window-scaled coordinates z = (x − x*) / width, on which dV/dt < 0 was verified at sample
 * points. A trajectory entering it is counted as converged without integrating on.
 */
export interface CaptureRegion {
  equilibrium: string;
  center: [number, number];
  /** Symmetric P (row-major 2 × 2) of Aᵀ P + P A = −I, A the scaled Jacobian (times the flow direction). */
  p: [number, number, number, number];
  level: number;
  /** Radius of the largest scaled circle inside the region, for reporting. */
  radius: number;
}

function lyapunovMatrix(a: number, b: number, c: number, d: number): [number, number, number, number] | null {
  // Aᵀ P + P A = −I with P = [[p, q], [q, s]]: three linear equations in (p, q, s)
  const system = new Matrix([
    [2 * a, 2 * c, 0],
    [b, a + d, c],
    [0, 2 * b, 2 * d],
  ]);
  try {
    const x = solve(system, Matrix.columnVector([-1, 0, -1]));
    const [p, q, s] = [x.get(0, 0), x.get(1, 0), x.get(2, 0)];
    if (!(p > 0 && p * s - q * q > 0)) return null;
    return [p, q, q, s];
  } catch {
    return null;
  }
}

/**
 * Capture regions for equilibria attracting in the given time direction: sinks for forward
 * time (direction 1), sources for backward time (direction −1).
 */
export function findCaptureRegions(
  model: Model,
  equilibria: EquilibriumResult[],
  box: Box,
  direction: 1 | -1,
): CaptureRegion[] {
  const regions: CaptureRegion[] = [];
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  for (const e of equilibria) {
    if (!e.hyperbolic || e.type === "saddle") continue;
    const attracting = direction === 1 ? e.stable === true : e.stable === false;
    if (!attracting) continue;
    const [w0, w1] = box.width;
    const [[a, b], [c, d]] = e.jacobian;
    const p = lyapunovMatrix(
      direction * a,
      direction * b * (w1 / w0),
      direction * c * (w0 / w1),
      direction * d,
    );
    if (!p) continue;
    const center: [number, number] = [e.point[model.stateNames[0]], e.point[model.stateNames[1]]];
    const minEig = 0.5 * (p[0] + p[3]) - Math.hypot(0.5 * (p[0] - p[3]), p[1]);
    let verified = 0;
    let radius = 0;
    for (let r = CAPTURE_FIRST_RADIUS; r >= CAPTURE_MIN_RADIUS && verified === 0; r /= 2) {
      const level = r * r * minEig;
      let ok = true;
      for (const shell of CAPTURE_SHELLS) {
        for (let k = 0; k < CAPTURE_ANGLES && ok; k++) {
          const th = (2 * Math.PI * k) / CAPTURE_ANGLES;
          const u0 = Math.cos(th),
            u1 = Math.sin(th);
          const quad = p[0] * u0 * u0 + 2 * p[1] * u0 * u1 + p[3] * u1 * u1;
          const scale = Math.sqrt((shell * level) / quad);
          const z0 = u0 * scale,
            z1 = u1 * scale;
          y[0] = center[0] + z0 * w0;
          y[1] = center[1] + z1 * w1;
          model.rhs(y, f);
          if (!Number.isFinite(f[0]) || !Number.isFinite(f[1])) continue;
          const zd0 = (direction * f[0]) / w0,
            zd1 = (direction * f[1]) / w1;
          const vdot = 2 * (z0 * (p[0] * zd0 + p[1] * zd1) + z1 * (p[1] * zd0 + p[3] * zd1));
          if (!(vdot < 0)) ok = false;
        }
        if (!ok) break;
      }
      if (ok) {
        verified = level;
        radius = r;
      }
    }
    if (verified > 0) {
      const level = CAPTURE_SAFETY * verified;
      regions.push({ equilibrium: e.id, center, p, level, radius: radius * Math.sqrt(CAPTURE_SAFETY) });
    }
  }
  return regions;
}

/** Whether a point lies inside a capture region. */
export function isCaptured(region: CaptureRegion, x: ArrayLike<number>, box: Box): boolean {
  const z0 = (x[0] - region.center[0]) / box.width[0];
  const z1 = (x[1] - region.center[1]) / box.width[1];
  const p = region.p;
  return p[0] * z0 * z0 + 2 * p[1] * z0 * z1 + p[3] * z1 * z1 < region.level;
}

import { solveSmall } from "./linear.js";

/**
 * A small square system F(u) = 0 with its analytic Jacobian: fills r (n entries) and jac
 * (row-major n × n) at u; returns false where F is undefined.
 */
export type SquareSystem = (u: Float64Array, r: Float64Array, jac: Float64Array) => boolean;

export interface NewtonSettings {
  maxIterations: number;
  /** Converged when the largest scaled step max_k |Δu_k| / span_k is below this. */
  stepTol: number;
}

/**
 * Plain (undamped) Newton from u0 for systems of a few unknowns, each step solved by Gaussian
 * elimination with partial pivoting. Null when F or the step is not finite, the Jacobian is
 * singular, or it has not converged within maxIterations.
 */
export function newtonSolve(
  system: SquareSystem,
  u0: ArrayLike<number>,
  span: ArrayLike<number>,
  settings: NewtonSettings,
): Float64Array | null {
  const n = u0.length;
  const u = Float64Array.from(u0);
  const r = new Float64Array(n);
  const jac = new Float64Array(n * n);
  for (let it = 0; it < settings.maxIterations; it++) {
    if (!system(u, r, jac) || r.some((v) => !Number.isFinite(v))) return null;
    const step = solveSmall(
      jac,
      Array.from(r, (v) => -v),
    );
    if (!step) return null;
    let size = 0;
    for (let c = 0; c < n; c++) {
      u[c] += step[c];
      size = Math.max(size, Math.abs(step[c]) / span[c]);
    }
    if (!(size < Infinity)) return null;
    if (size < settings.stepTol) return u;
  }
  return null;
}

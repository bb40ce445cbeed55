import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { CLASSIFY_REL_TOL, EIGENVECTOR_LEAD_TOL } from "../constants.js";
import { spectralRadius } from "../numeric/linear.js";

export type EquilibriumType =
  | "saddle"
  | "stable-node"
  | "unstable-node"
  | "stable-focus"
  | "unstable-focus"
  | "center"
  | "stable-degenerate-node"
  | "unstable-degenerate-node"
  | "stable-star"
  | "unstable-star"
  | "non-hyperbolic";

export interface Complex {
  re: number;
  im: number;
}

export interface StabilityResult {
  jacobian: number[][];
  trace: number;
  determinant: number;
  discriminant: number;
  eigenvalues: Complex[];
  /** Unit eigenvectors for real eigenvalues, in eigenvalue order; empty for a complex pair. */
  eigenvectors: number[][];
  type: EquilibriumType;
  hyperbolic: boolean;
  /** true: asymptotically stable; false: unstable; null: the linearisation does not decide. */
  stable: boolean | null;
}

/** Sign convention for eigenvectors: the largest-magnitude component is positive. */
function normalizeVector(v: number[]): number[] {
  const norm = Math.hypot(...v);
  if (norm === 0) return v.map(() => 0);
  let lead = 0;
  for (let k = 1; k < v.length; k++)
    if (Math.abs(v[k]) > Math.abs(v[lead]) + EIGENVECTOR_LEAD_TOL * norm) lead = k;
  const sign = v[lead] < 0 ? -1 : 1;
  return v.map((c) => (sign * c) / norm + 0); // + 0 turns -0 into 0 for stable JSON
}

/** Classifies a planar equilibrium from its Jacobian (row-major 2 × 2). */
export function classifyEquilibrium(jacobian: number[][]): StabilityResult {
  const [[a, b], [c, d]] = jacobian;
  const trace = a + d;
  const determinant = a * d - b * c;
  const discriminant = trace * trace - 4 * determinant;
  const scale = Math.hypot(a, b, c, d);

  const evd = new EigenvalueDecomposition(new Matrix(jacobian));
  const order = [0, 1].sort(
    (i, j) =>
      evd.realEigenvalues[i] - evd.realEigenvalues[j] ||
      evd.imaginaryEigenvalues[i] - evd.imaginaryEigenvalues[j],
  );
  const eigenvalues = order.map((k) => ({
    re: evd.realEigenvalues[k] + 0,
    im: evd.imaginaryEigenvalues[k] + 0,
  }));
  const complexPair = eigenvalues.some((e) => e.im !== 0);
  const V = evd.eigenvectorMatrix;
  const eigenvectors = complexPair ? [] : order.map((k) => normalizeVector([V.get(0, k), V.get(1, k)]));

  // unit-invariant scales: a state measured in 1e5 units must not turn a node into "non-hyperbolic"
  const radius = spectralRadius(eigenvalues);
  const traceScale = Math.max(Math.abs(a), Math.abs(d), radius);
  const detScale = Math.max(Math.abs(a * d), Math.abs(b * c), radius * radius);
  const discScale = Math.max(trace * trace, 4 * detScale);
  const zeroTrace = Math.abs(trace) <= CLASSIFY_REL_TOL * traceScale;
  const zeroDet = Math.abs(determinant) <= CLASSIFY_REL_TOL * detScale;
  const zeroDisc = Math.abs(discriminant) <= CLASSIFY_REL_TOL * discScale;
  const base = {
    jacobian: jacobian.map((r) => r.slice()),
    trace,
    determinant,
    discriminant,
    eigenvalues,
    eigenvectors,
  };

  if (scale === 0 || zeroDet) return { ...base, type: "non-hyperbolic", hyperbolic: false, stable: null };
  if (determinant < 0) return { ...base, type: "saddle", hyperbolic: true, stable: false };
  if (zeroTrace) return { ...base, type: "center", hyperbolic: false, stable: null };
  const stable = trace < 0;
  const side = stable ? "stable" : "unstable";
  if (zeroDisc) {
    // repeated eigenvalue: a star when J is a multiple of the identity, else a degenerate node
    const isScalar =
      Math.abs(b) <= CLASSIFY_REL_TOL * scale &&
      Math.abs(c) <= CLASSIFY_REL_TOL * scale &&
      Math.abs(a - d) <= CLASSIFY_REL_TOL * scale;
    return { ...base, type: isScalar ? `${side}-star` : `${side}-degenerate-node`, hyperbolic: true, stable };
  }
  return { ...base, type: discriminant > 0 ? `${side}-node` : `${side}-focus`, hyperbolic: true, stable };
}

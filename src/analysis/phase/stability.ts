import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import {
  CLASSIFY_BORDERLINE_TOL,
  CLASSIFY_REL_TOL,
  CLASSIFY_ROUNDING_TOL,
  EIGENVECTOR_LEAD_TOL,
} from "../constants.js";
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
  /** The best call; when it rests on a quantity near zero, `borderline` says so. */
  type: EquilibriumType;
  /** Null when the type is decided with margin, or is a boundary type read at zero (non-hyperbolic, center, star, or a degenerate node whose discriminant is zero to rounding). */
  borderline: BorderlineResult | null;
  hyperbolic: boolean;
  /** true: asymptotically stable; false: unstable; null: the linearisation does not decide. */
  stable: boolean | null;
  /**
   * Present when the linearisation could not be read at all: "jacobian-not-finite" (an entry is
   * NaN or ±Infinity, as at a pole or an overflow). The type is then "non-hyperbolic" with
   * `stable: null`, which decides nothing: a placeholder, not a finding.
   */
  undecided?: "jacobian-not-finite";
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

/**
 * A type called on a quantity near zero: the reported type, the type across the nearest
 * boundary, and the evidence. Both quantities are unit-free.
 */
export interface BorderlineResult {
  /** The reported type first, then the type a small change of J would give instead. */
  between: [EquilibriumType, EquilibriumType];
  /**
   * discriminant: node against focus, by discriminant / trace² = ((λ₁ − λ₂)/(λ₁ + λ₂))²;
   * jordan: degenerate node against star, by ‖S⁻¹(J − λI)S‖ / |λ| (Frobenius norm, S the
   * states' scales, λ the repeated eigenvalue): zero exactly when J − λI has rank 0.
   */
  quantity: "discriminant" | "jordan";
  value: number;
  /** The band the value lies in: |value| ≤ CLASSIFY_BORDERLINE_TOL. */
  tolerance: number;
}

/**
 * Node, focus, degenerate node or star, for det > 0 and a trace that is not zero, read in the
 * states' scales: J̃ = S⁻¹ J S and its traceless part Ñ = J̃ − λI, λ = trace/2. The eigenvalue is
 * repeated when discriminant = −4 det Ñ vanishes; then J − λI of rank 0 is a star, of rank 1 a
 * degenerate node (Horn and Johnson, Matrix Analysis, 2nd ed., section 3.1: two Jordan blocks
 * or one). The discriminant is zero to precision when below CLASSIFY_ROUNDING_TOL · 4‖Ñ‖‖J̃‖:
 * an error E in J̃ moves −4 det Ñ by at most 4‖Ñ‖‖E‖, so an exactly computed near-star keeps
 * its node or focus while a Jordan block with noise in its entries stays a degenerate node.
 */
function fineType(
  J: number[][],
  side: "stable" | "unstable",
  discriminant: number,
  scales: readonly number[],
): { type: EquilibriumType; borderline: BorderlineResult | null } {
  const [[a, b], [c, d]] = J;
  const trace = a + d;
  const upper = (b * scales[1]) / scales[0],
    lower = (c * scales[0]) / scales[1];
  const half = (a - d) / 2;
  const tracelessNorm = Math.hypot(half, upper, lower, half);
  const jordan = tracelessNorm / Math.abs(trace / 2);
  if (jordan <= CLASSIFY_ROUNDING_TOL) return { type: `${side}-star`, borderline: null };
  const precision = CLASSIFY_ROUNDING_TOL * 4 * tracelessNorm * Math.hypot(a, upper, lower, d);
  if (Math.abs(discriminant) > precision) {
    const node: EquilibriumType = `${side}-node`,
      focus: EquilibriumType = `${side}-focus`;
    const between: [EquilibriumType, EquilibriumType] = discriminant > 0 ? [node, focus] : [focus, node];
    return {
      type: between[0],
      borderline: borderlineOf(between, "discriminant", discriminant / (trace * trace)),
    };
  }
  const type: EquilibriumType = `${side}-degenerate-node`;
  return { type, borderline: borderlineOf([type, `${side}-star`], "jordan", jordan) };
}

function borderlineOf(
  between: [EquilibriumType, EquilibriumType],
  quantity: BorderlineResult["quantity"],
  value: number,
): BorderlineResult | null {
  return Math.abs(value) <= CLASSIFY_BORDERLINE_TOL
    ? { between, quantity, value, tolerance: CLASSIFY_BORDERLINE_TOL }
    : null;
}

/**
 * Classifies a planar equilibrium from its Jacobian (row-major 2 × 2), following the
 * trace–determinant plane (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 5.2).
 * `scales` are the states' typical sizes (the window widths): the precision of J and its Jordan
 * structure are read in them, since a Jordan block's coupling changes with the units while
 * trace, determinant and discriminant do not (J → D J D⁻¹). Without them J is read as given.
 */
export function classifyEquilibrium(
  jacobian: number[][],
  scales: readonly number[] = [1, 1],
): StabilityResult {
  const entries = jacobian.flat();
  if (!entries.every(Number.isFinite)) return notFinite(jacobian);
  // every type is invariant under J → sJ, s > 0: classify J scaled by an even power of two so its
  // largest entry is near 1 (exact, sqrt included), then scale trace, determinant, discriminant
  // and eigenvalues back. Rates of 1e-300 would otherwise give a determinant that underflows to
  // 0 ("non-hyperbolic"), and rates of 1e200 one that overflows to NaN.
  const largest = Math.max(...entries.map(Math.abs));
  const exponent = largest > 0 ? 2 * Math.round(Math.log2(largest) / 2) : 0;
  if (exponent === 0) return classifyScaled(jacobian, scales);
  const scaled = classifyScaled(
    jacobian.map((row) => row.map((v) => timesPowerOfTwo(v, -exponent))),
    scales,
  );
  return {
    ...scaled,
    jacobian: jacobian.map((r) => r.slice()),
    trace: timesPowerOfTwo(scaled.trace, exponent),
    determinant: timesPowerOfTwo(scaled.determinant, 2 * exponent),
    discriminant: timesPowerOfTwo(scaled.discriminant, 2 * exponent),
    eigenvalues: scaled.eigenvalues.map((e) => ({
      re: timesPowerOfTwo(e.re, exponent),
      im: timesPowerOfTwo(e.im, exponent),
    })),
  };
}

/** x · 2^k, exact unless the result leaves double range; split in two so 2^k itself never overflows. */
function timesPowerOfTwo(x: number, k: number): number {
  const half = Math.trunc(k / 2);
  return x * 2 ** half * 2 ** (k - half);
}

/** An equilibrium whose Jacobian has a NaN or infinite entry: nothing about it is decided. */
function notFinite(jacobian: number[][]): StabilityResult {
  return {
    jacobian: jacobian.map((r) => r.slice()),
    trace: NaN,
    determinant: NaN,
    discriminant: NaN,
    eigenvalues: [
      { re: NaN, im: NaN },
      { re: NaN, im: NaN },
    ],
    eigenvectors: [],
    type: "non-hyperbolic",
    borderline: null,
    hyperbolic: false,
    stable: null,
    undecided: "jacobian-not-finite",
  };
}

function classifyScaled(jacobian: number[][], scales: readonly number[]): StabilityResult {
  const [[a, b], [c, d]] = jacobian;
  const trace = a + d;
  const determinant = a * d - b * c;
  // τ² − 4Δ written without the cancellation of τ² against 4ad
  const discriminant = (a - d) ** 2 + 4 * b * c;
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
  const zeroTrace = Math.abs(trace) <= CLASSIFY_REL_TOL * traceScale;
  const zeroDet = Math.abs(determinant) <= CLASSIFY_REL_TOL * detScale;
  const base = {
    jacobian: jacobian.map((r) => r.slice()),
    trace,
    determinant,
    discriminant,
    eigenvalues,
    eigenvectors,
    borderline: null,
  };

  if (scale === 0 || zeroDet) return { ...base, type: "non-hyperbolic", hyperbolic: false, stable: null };
  if (determinant < 0) return { ...base, type: "saddle", hyperbolic: true, stable: false };
  if (zeroTrace) return { ...base, type: "center", hyperbolic: false, stable: null };
  const stable = trace < 0;
  const fine = fineType(jacobian, stable ? "stable" : "unstable", discriminant, scales);
  return { ...base, ...fine, hyperbolic: true, stable };
}

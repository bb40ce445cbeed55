import type { FactorRole } from "../../../model/factors.js";

/**
 * Why the field has no linearisation there:
 * - `indeterminate`: a denominator and the numerator over it both vanish (0/0);
 * - `unbounded`: the field is infinite (a denominator alone, a log argument, a base under a negative power);
 * - `not-differentiable`: the field is finite but its Jacobian is not defined or has no limit (a
 *   kink of abs/min/max, a square root or fractional power of zero);
 * - `undefined-beyond`: a line past which the field is not defined (the root, log or fractional
 *   power of a negative number).
 */
export type SingularityReason = "indeterminate" | "unbounded" | "not-differentiable" | "undefined-beyond";

/** A factor that vanishes at the singular point or along the line: the evidence of where it comes from. */
export interface SingularFactorEvidence {
  role: FactorRole;
  /** States whose equations hold the factor. */
  equations: string[];
  /** The vanishing expression, with the user's names. */
  expression: string;
  tex: string;
  /** For a denominator: the numerators over it (one per equation), text with the user's names. */
  numerators: string[];
  /** For a power base: the exponent, when it is a number. */
  exponent: number | null;
}

/** The field and the Jacobian read along one ray from a singular point, at the scaled radii SINGULAR_RAY_RADII. */
export interface SingularRay {
  /** Unit direction in window units (each state divided by its window width). */
  direction: Record<string, number>;
  /** Each component of f over its scale, at each radius; null where not a finite number. */
  field: Record<string, number | null>[];
  /** The Jacobian at the smaller radius; null where an entry is not a finite number. */
  jacobian: number[][] | null;
  /** The flow at the smaller radius points toward the point (its radial component is negative); null where f is not finite. */
  toward: boolean | null;
}

export interface SingularityResult {
  /** X1, X2, ...: points first, then lines, each sorted by the first state and then the second. */
  id: string;
  /** The singular point; for a line, one point on it (its first listed sample). */
  point: Record<string, number>;
  reason: SingularityReason;
  shape: "point" | "line";
  factors: SingularFactorEvidence[];
  /**
   * The field at `point` as compiled: NaN (0/0) or ±Infinity where the formula has no value there
   * (results.json writes those as null and lists their paths under nonFinite).
   */
  field: Record<string, number>;
  /** The compiled Jacobian at `point`, row-major by state, non-finite entries as for `field` (a kink's rule gives a number even there). */
  jacobian: number[][];
  /** Points only: the equilibrium search converged here, and the point was not classified. */
  fromEquilibriumSearch: boolean;
  /** Points only: rays into the window; empty for lines. */
  rays: SingularRay[];
  /**
   * Points only (else null): along every ray the field tends to zero (the point is a rest point of
   * the field's continuous extension), grows without bound along some ray, or neither.
   */
  fieldLimit: "zero" | "nonzero" | "unbounded" | null;
  /** Points only (else null): the Jacobian's limit along the rays is the same on all, depends on the direction, or is unbounded. */
  jacobianLimit: "same" | "direction-dependent" | "unbounded" | null;
  /** Lines only (else null): the smallest box holding the listed samples. */
  extent: Record<string, [number, number]> | null;
  /** Lines only: points on the line (sign changes of the factor on grid edges, and grid nodes where it is zero), in grid order, thinned. */
  samples: Record<string, number>[];
}

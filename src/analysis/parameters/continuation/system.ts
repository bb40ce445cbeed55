import type { Model, ParametricRhsFunction } from "../../../model/types.js";
import { compileParameterDerivative } from "../../../model/higher.js";
import { componentScales, windowOf, type Box } from "../../numeric/window.js";
import { solveSmall } from "../../numeric/linear.js";
import {
  CORRECTOR_MAX_JUMP,
  CORRECTOR_ROUNDING_RESIDUAL,
  CORRECTOR_STEP_TOL,
  RANK_TOL,
  TANGENT_P_ZERO_TOL,
} from "../../constants.js";

/**
 * The curve F(x, p) = 0 in (x0, x1, p) space. Points are kept in the model's own units (so a seed
 * on an axis keeps its exact 0); steps, tangents and distances are measured in scaled coordinates
 * u = z / span, with the states scaled by the window widths and p by the range width, so that one
 * step length and one angle mean the same in every model.
 */
export interface ContinuationSystem {
  model: Model;
  parameterIndex: number;
  range: [number, number];
  box: Box;
  /** Unit of each scaled coordinate: the window widths, then the range width. */
  span: Float64Array;
  /** Size of each component of f over the window at the nominal values (for residuals). */
  fScale: Float64Array;
  dfdp: ParametricRhsFunction;
  /** Work arrays, overwritten by evaluate(). */
  params: Float64Array;
  y: Float64Array;
  f: Float64Array;
  j: Float64Array;
  fp: Float64Array;
  /** Continuation Jacobian [J | ∂f/∂p] in scaled coordinates, row-major 2 × 3. */
  a: Float64Array;
}

/** A point on the curve: the two states, then the parameter. */
export type CurvePoint = Float64Array;

export function buildSystem(
  model: Model,
  parameterIndex: number,
  range: [number, number],
): ContinuationSystem {
  const box = windowOf(model);
  const params = Float64Array.from(model.parameterValues);
  const span = Float64Array.from([...box.width, range[1] - range[0]]);
  const sys: ContinuationSystem = {
    model,
    parameterIndex,
    range,
    box,
    span,
    fScale: new Float64Array(2),
    dfdp: compileParameterDerivative(model, parameterIndex).evaluate,
    params,
    y: new Float64Array(2),
    f: new Float64Array(2),
    j: new Float64Array(4),
    fp: new Float64Array(2),
    a: new Float64Array(6),
  };
  sys.fScale.set(componentScales(model, box));
  return sys;
}

/** Fills sys.f, sys.j (natural units), sys.fp and the scaled continuation Jacobian sys.a at z. */
export function evaluate(sys: ContinuationSystem, z: ArrayLike<number>): void {
  sys.y[0] = z[0];
  sys.y[1] = z[1];
  sys.params[sys.parameterIndex] = z[2];
  sys.model.rhsParametric(sys.y, sys.params, sys.f);
  sys.model.jacobianParametric(sys.y, sys.params, sys.j);
  sys.dfdp(sys.y, sys.params, sys.fp);
  const s = sys.span;
  for (let i = 0; i < 2; i++) {
    sys.a[3 * i] = sys.j[2 * i] * s[0];
    sys.a[3 * i + 1] = sys.j[2 * i + 1] * s[1];
    sys.a[3 * i + 2] = sys.fp[i] * s[2];
  }
}

/** max_i |f_i| / fScale_i at the last evaluated point. */
export function currentResidual(sys: ContinuationSystem): number {
  const r = Math.max(Math.abs(sys.f[0]) / sys.fScale[0], Math.abs(sys.f[1]) / sys.fScale[1]);
  return Number.isFinite(r) ? r : Infinity;
}

export function residualAt(sys: ContinuationSystem, z: ArrayLike<number>): number {
  evaluate(sys, z);
  return currentResidual(sys);
}

export function determinantAt(sys: ContinuationSystem, z: ArrayLike<number>): number {
  evaluate(sys, z);
  return sys.j[0] * sys.j[3] - sys.j[1] * sys.j[2];
}

export function traceAt(sys: ContinuationSystem, z: ArrayLike<number>): number {
  evaluate(sys, z);
  return sys.j[0] + sys.j[3];
}

export function jacobianRows(sys: ContinuationSystem, z: ArrayLike<number>): number[][] {
  evaluate(sys, z);
  return [
    [sys.j[0], sys.j[1]],
    [sys.j[2], sys.j[3]],
  ];
}

export function dot3(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross3(a: ArrayLike<number>, b: ArrayLike<number>): Float64Array {
  return Float64Array.from([a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]]);
}

/** z + h · span ∘ t: a step of scaled length h along the scaled direction t. */
export function stepAlong(
  sys: ContinuationSystem,
  z: ArrayLike<number>,
  t: ArrayLike<number>,
  h: number,
): CurvePoint {
  return Float64Array.from([0, 1, 2].map((k) => z[k] + h * sys.span[k] * t[k]));
}

/**
 * Unit tangent (scaled coordinates) of the curve at z: the cross product of the two rows of the
 * scaled [J | f_p], which spans its null space. Oriented along `orient` when given, else with a
 * positive p-component (or, when that vanishes, a positive largest component). Null where the
 * rows are parallel (a branch point, or a degenerate curve).
 */
export function tangentAt(
  sys: ContinuationSystem,
  z: ArrayLike<number>,
  orient: ArrayLike<number> | null,
): Float64Array | null {
  evaluate(sys, z);
  const r0 = sys.a.subarray(0, 3);
  const r1 = sys.a.subarray(3, 6);
  const t = cross3(r0, r1);
  const norm = Math.hypot(t[0], t[1], t[2]);
  const rows = Math.hypot(r0[0], r0[1], r0[2]) * Math.hypot(r1[0], r1[1], r1[2]);
  if (!Number.isFinite(norm) || !(norm > RANK_TOL * rows)) return null;
  for (let k = 0; k < 3; k++) t[k] /= norm;
  let sign: number;
  if (orient) sign = dot3(t, orient) < 0 ? -1 : 1;
  else if (Math.abs(t[2]) > TANGENT_P_ZERO_TOL) sign = Math.sign(t[2]);
  else {
    let lead = 0;
    for (let k = 1; k < 3; k++) if (Math.abs(t[k]) > Math.abs(t[lead])) lead = k;
    sign = Math.sign(t[lead]);
  }
  for (let k = 0; k < 3; k++) t[k] = sign * t[k] + 0;
  return t;
}

export interface Correction {
  z: CurvePoint;
  iterations: number;
  converged: boolean;
  residual: number;
}

/**
 * Newton on F(z) = 0 together with the hyperplane condition normal · (z − anchor)/scale = 0:
 * pseudo-arclength when the normal is the previous tangent and the anchor the predicted point;
 * natural-parameter continuation when the normal is the p axis. Converged only when the step
 * has dropped below CORRECTOR_STEP_TOL (near a branch point it may not: then the caller backs off).
 */
export function correct(
  sys: ContinuationSystem,
  start: ArrayLike<number>,
  normal: ArrayLike<number>,
  anchor: ArrayLike<number>,
  maxIterations: number,
): Correction {
  const z = Float64Array.from(start);
  const s = sys.span;
  for (let it = 1; it <= maxIterations; it++) {
    evaluate(sys, z);
    const g =
      (normal[0] * (z[0] - anchor[0])) / s[0] +
      (normal[1] * (z[1] - anchor[1])) / s[1] +
      (normal[2] * (z[2] - anchor[2])) / s[2];
    // exactly on the curve and the hyperplane: nothing to correct, even where the matrix is singular
    if (sys.f[0] === 0 && sys.f[1] === 0 && g === 0)
      return { z, iterations: it, converged: true, residual: 0 };
    const m = [...sys.a, normal[0], normal[1], normal[2]];
    const dz = solveSmall(m, [-sys.f[0], -sys.f[1], -g]);
    const size = dz ? Math.max(Math.abs(dz[0]), Math.abs(dz[1]), Math.abs(dz[2])) : Infinity;
    if (!dz || size > CORRECTOR_MAX_JUMP) {
      // singular at a branch point: a point already on the curve and the hyperplane to rounding is the answer
      const residual = currentResidual(sys);
      const onCurve = residual <= CORRECTOR_ROUNDING_RESIDUAL && Math.abs(g) <= CORRECTOR_STEP_TOL;
      return { z, iterations: it, converged: onCurve, residual };
    }
    for (let k = 0; k < 3; k++) z[k] += dz[k] * s[k];
    if (size <= CORRECTOR_STEP_TOL) {
      const residual = residualAt(sys, z);
      return { z, iterations: it, converged: Number.isFinite(residual), residual };
    }
  }
  const residual = residualAt(sys, z);
  return { z, iterations: maxIterations, converged: false, residual };
}

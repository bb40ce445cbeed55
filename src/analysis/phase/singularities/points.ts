import type { SingularFactor } from "../../../model/factors.js";
import type { Model } from "../../../model/types.js";
import { componentScales, type Box } from "../../numeric/window.js";
import {
  COMPONENT_SCALE_INTERVALS,
  SINGULAR_GROWTH,
  SINGULAR_JACOBIAN_SPREAD_TOL,
  SINGULAR_RAY_DIRECTIONS,
  SINGULAR_RAY_RADII,
  SINGULAR_ROOT_DISTANCE,
  SNAP_REL_TOL,
} from "../../constants.js";
import type { SingularFactorEvidence, SingularityReason, SingularityResult, SingularRay } from "./types.js";

/** Factors that share one expression g, so one zero set: e.g. x + y under both equations. */
export interface FactorGroup {
  factors: SingularFactor[];
  /** max |g| over the component-scale grid (1 where g vanishes there). */
  scale: number;
}

/** What the point and line searches share: the window, the field's scales, the factor groups. */
export interface SingularContext {
  model: Model;
  box: Box;
  fScale: number[];
  groups: FactorGroup[];
}

/** A singular point before it is numbered. */
export type SingularPoint = Omit<SingularityResult, "id">;

/** A finite number (−0 written as 0, as JSON would), else null. */
const finiteOrNull = (v: number): number | null => (Number.isFinite(v) ? v + 0 : null);

/** A row-major 2 × 2 Jacobian as rows, −0 written as 0 (as JSON would). */
export const jacobianRows = (j: ArrayLike<number>): number[][] => [
  [j[0] + 0, j[1] + 0],
  [j[2] + 0, j[3] + 0],
];

/** g, its gradient and the numerator (1 when none) of a factor at x. */
export function factorAt(ctx: SingularContext, factor: SingularFactor, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(4);
  factor.evaluate(x, ctx.model.parameterValues, out);
  return out;
}

export function singularContext(model: Model, box: Box): SingularContext {
  const byExpression = new Map<string, SingularFactor[]>();
  for (const f of model.singularFactors) {
    const key = f.expression.node.toString();
    byExpression.set(key, [...(byExpression.get(key) ?? []), f]);
  }
  const ctx: SingularContext = { model, box, fScale: componentScales(model, box), groups: [] };
  const n = COMPONENT_SCALE_INTERVALS;
  for (const factors of byExpression.values()) {
    let scale = 0;
    for (let a = 0; a <= n; a++)
      for (let b = 0; b <= n; b++) {
        const g = factorAt(ctx, factors[0], [
          box.lo[0] + (box.width[0] * a) / n,
          box.lo[1] + (box.width[1] * b) / n,
        ])[0];
        if (Number.isFinite(g)) scale = Math.max(scale, Math.abs(g));
      }
    ctx.groups.push({ factors, scale: scale > 0 ? scale : 1 });
  }
  return ctx;
}

/** |g| / |∇g| in window units: about the scaled distance from x to the zero set of g (0 on it). */
function distanceToZero(ctx: SingularContext, group: FactorGroup, x: ArrayLike<number>): number {
  const [g, g0, g1] = factorAt(ctx, group.factors[0], x);
  if (g === 0) return 0;
  const gradient = Math.hypot(g0 * ctx.box.width[0], g1 * ctx.box.width[1]);
  return Number.isFinite(g) && gradient > 0 ? Math.abs(g) / gradient : Infinity;
}

/** The factor groups whose zero set passes within SINGULAR_ROOT_DISTANCE of x. */
export function groupsAt(ctx: SingularContext, x: ArrayLike<number>): FactorGroup[] {
  return ctx.groups.filter((group) => distanceToZero(ctx, group, x) <= SINGULAR_ROOT_DISTANCE);
}

/** A root of the equilibrium search that may be singular, moved onto the bound or zero set it converged to. */
export function locateSingularPoint(ctx: SingularContext, x: [number, number]): [number, number] {
  const { box } = ctx;
  const near = groupsAt(ctx, x);
  const measure = (p: ArrayLike<number>) => Math.min(...near.map((group) => distanceToZero(ctx, group, p)));
  const out: [number, number] = [x[0], x[1]];
  for (let k = 0; k < 2; k++)
    for (const bound of [box.lo[k], box.hi[k], 0]) {
      if (out[k] === bound || Math.abs(out[k] - bound) > SNAP_REL_TOL * box.width[k]) continue;
      const trial: [number, number] = [out[0], out[1]];
      trial[k] = bound;
      if (measure(trial) <= measure(out)) out[k] = bound;
    }
  return out;
}

function raysFrom(ctx: SingularContext, p: ArrayLike<number>): SingularRay[] {
  const { model, box, fScale } = ctx;
  const names = model.stateNames;
  const f = new Float64Array(2);
  const j = new Float64Array(4);
  const rays: SingularRay[] = [];
  for (let k = 0; k < SINGULAR_RAY_DIRECTIONS; k++) {
    const angle = (2 * Math.PI * k) / SINGULAR_RAY_DIRECTIONS;
    // exact zeros on the axes, so a ray along an edge stays on it
    const d = [Math.cos(angle), Math.sin(angle)].map((c) => (Math.abs(c) < 1e-15 ? 0 : c));
    const at = (r: number) => [0, 1].map((i) => p[i] + r * d[i] * box.width[i]);
    const inside = SINGULAR_RAY_RADII.every((r) => at(r).every((v, i) => v >= box.lo[i] && v <= box.hi[i]));
    if (!inside) continue;
    const field = SINGULAR_RAY_RADII.map((r) => {
      model.rhs(at(r), f);
      return Object.fromEntries(names.map((n, i) => [n, finiteOrNull(f[i] / fScale[i])]));
    });
    const small = at(SINGULAR_RAY_RADII[SINGULAR_RAY_RADII.length - 1]);
    model.jacobianAt(small, j);
    model.rhs(small, f);
    const radial = (f[0] / box.width[0]) * d[0] + (f[1] / box.width[1]) * d[1];
    rays.push({
      direction: Object.fromEntries(names.map((n, i) => [n, d[i] + 0])),
      field,
      jacobian: Array.from(j).every(Number.isFinite) ? jacobianRows(j) : null,
      toward: Number.isFinite(radial) ? radial < 0 : null,
    });
  }
  return rays;
}

/** Largest scaled field component along a ray at radius index r; NaN when a component is not finite. */
function fieldSize(ray: SingularRay, r: number): number {
  const values = Object.values(ray.field[r]);
  return values.every((v) => v !== null) ? Math.max(...values.map((v) => Math.abs(v!))) : NaN;
}

function fieldLimitOf(
  ctx: SingularContext,
  p: ArrayLike<number>,
  rays: SingularRay[],
): SingularPoint["fieldLimit"] {
  const f = new Float64Array(2);
  ctx.model.rhs(p, f);
  if (Array.from(f).some((v) => v === Infinity || v === -Infinity)) return "unbounded";
  const read = rays
    .map((ray) => [fieldSize(ray, 0), fieldSize(ray, SINGULAR_RAY_RADII.length - 1)])
    .filter(([a, b]) => Number.isFinite(a) && Number.isFinite(b));
  if (!read.length) return null;
  if (read.some(([a, b]) => b > SINGULAR_GROWTH * a && b > 0)) return "unbounded";
  return read.every(([a, b]) => b <= a / SINGULAR_GROWTH) ? "zero" : "nonzero";
}

/** The Jacobian in window units (S⁻¹ J S, S = diag(widths)), as a flat list. */
function scaledJacobian(box: Box, j: ArrayLike<number>): number[] {
  const w = box.width;
  return [j[0], (j[1] * w[1]) / w[0], (j[2] * w[0]) / w[1], j[3]];
}

function jacobianLimitOf(
  ctx: SingularContext,
  p: ArrayLike<number>,
  rays: SingularRay[],
): SingularPoint["jacobianLimit"] {
  const { model, box } = ctx;
  if (!rays.length) return null;
  const j = new Float64Array(4);
  const size = (v: number[]) => Math.max(...v.map(Math.abs));
  const small: number[][] = [];
  for (const ray of rays) {
    if (!ray.jacobian) return "unbounded";
    const d = [0, 1].map((i) => ray.direction[model.stateNames[i]]);
    model.jacobianAt(
      [0, 1].map((i) => p[i] + SINGULAR_RAY_RADII[0] * d[i] * box.width[i]),
      j,
    );
    const far = size(scaledJacobian(box, j));
    const near = scaledJacobian(box, ray.jacobian.flat());
    if (!(size(near) <= SINGULAR_GROWTH * far) && size(near) > 0) return "unbounded";
    small.push(near);
  }
  const norm = Math.max(...small.map(size));
  const spread = Math.max(
    ...[0, 1, 2, 3].map((e) => Math.max(...small.map((s) => s[e])) - Math.min(...small.map((s) => s[e]))),
  );
  return spread > SINGULAR_JACOBIAN_SPREAD_TOL * norm ? "direction-dependent" : "same";
}

export function factorEvidence(model: Model, group: FactorGroup): SingularFactorEvidence {
  const [first] = group.factors;
  const equations = [...new Set(group.factors.flatMap((f) => f.equations))].sort((a, b) => a - b);
  return {
    role: first.role,
    equations: equations.map((i) => model.stateNames[i]),
    expression: first.expression.text,
    tex: first.expression.tex,
    numerators: group.factors.flatMap((f) => (f.numerator ? [f.numerator.text] : [])),
    exponent: first.exponent,
  };
}

function reasonAt(
  groups: FactorGroup[],
  fieldFinite: boolean,
  jacobianFinite: boolean,
  fieldLimit: SingularPoint["fieldLimit"],
  jacobianLimit: SingularPoint["jacobianLimit"],
): SingularityReason | null {
  const unbounded = fieldLimit === "unbounded";
  if (groups.some((g) => g.factors.some((f) => f.role === "denominator")))
    return unbounded ? "unbounded" : "indeterminate";
  if (unbounded || !fieldFinite) return "unbounded";
  if (!jacobianFinite || jacobianLimit !== "same") return "not-differentiable";
  return null;
}

/** The evidence at p, or null where the field and its Jacobian are regular after all. */
export function singularPointAt(
  ctx: SingularContext,
  p: [number, number],
  fromSearch: boolean,
): SingularPoint | null {
  const { model } = ctx;
  const groups = groupsAt(ctx, p);
  const f = new Float64Array(2);
  const j = new Float64Array(4);
  model.rhs(p, f);
  model.jacobianAt(p, j);
  const fieldFinite = Array.from(f).every(Number.isFinite);
  const jacobianFinite = Array.from(j).every(Number.isFinite);
  if (!groups.length && fieldFinite && jacobianFinite) return null;
  const rays = raysFrom(ctx, p);
  const fieldLimit = fieldLimitOf(ctx, p, rays);
  const jacobianLimit = jacobianLimitOf(ctx, p, rays);
  const reason = reasonAt(groups, fieldFinite, jacobianFinite, fieldLimit, jacobianLimit);
  if (!reason) return null;
  return {
    point: Object.fromEntries(model.stateNames.map((n, i) => [n, p[i] + 0])),
    reason,
    shape: "point",
    factors: groups.map((g) => factorEvidence(model, g)),
    field: Object.fromEntries(model.stateNames.map((n, i) => [n, f[i] + 0])),
    jacobian: jacobianRows(j),
    fromEquilibriumSearch: fromSearch,
    rays,
    fieldLimit,
    jacobianLimit,
    extent: null,
    samples: [],
  };
}

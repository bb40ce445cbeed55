import { contours } from "d3-contour";
import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { INVARIANT_EDGE_TOL, ROOT_RESIDUAL_TOL, type EquilibriumResult } from "./equilibria.js";
import { windowOf, type Box } from "../numeric/window.js";

/**
 * Nullclines: for each state i, the curves f_i = 0 inside the window, as ordered polylines cut
 * into pieces at equilibria, each piece labelled with the direction of the other component.
 *
 * Method: (1) sample f_i on a grid of nodes; (2) find lines x_k = c (window edges, the axis
 * x_k = 0) on which f_i vanishes identically: they become exact straight branches, and f_i is
 * divided by them ("deflated") so the rest of the zero set changes sign and marching squares sees
 * it right up to those lines; (3) marching squares (d3-contour, unsmoothed) stitches grid-edge
 * crossings into rings; (4) each crossing is bracketed along its grid edge to adjacent doubles,
 * so every vertex lies on the exact curve; (5) rings are cut where they run along the window
 * border or around holes (non-finite samples); (6) branches are split at equilibria, then
 * wherever the other component changes sign.
 */
export interface NullclineOptions {
  /** Grid nodes across the window in the first state, both edges included. Default 161. */
  nx: number;
  /** Grid nodes across the window in the second state, both edges included. Default 161. */
  ny: number;
}

export const DEFAULT_NULLCLINE_OPTIONS: NullclineOptions = { nx: 161, ny: 161 };

/**
 * Every vertex has |f_i| ≤ this × (max |f_i| over the grid). Traced vertices are bracketed to
 * adjacent doubles (rounding level, far below this); break points are equilibria, which are
 * accepted at ROOT_RESIDUAL_TOL, so the bound cannot be tighter than that.
 */
export const NULLCLINE_RESIDUAL_TOL = ROOT_RESIDUAL_TOL;
/** f_i vanishes identically on a line when every finite sample on it is this small (relative to its scale), as for invariant edges. */
export const VANISHING_LINE_TOL = INVARIANT_EDGE_TOL;
/**
 * An equilibrium lies on a branch when its distance to the nearest chord is below what the curve
 * can bend away from that chord: SAGITTA_SAFETY × (chord length × turning angle at its ends) / 8,
 * the sagitta of a circular arc, with a floor of MERGE_DISTANCE, and never beyond this many grid
 * cells (window-scaled): branches closer together than that are not resolved by the grid anyway.
 */
export const EQUILIBRIUM_ON_BRANCH_CELLS = 0.5;
/** Margin on the arc estimate, for curvature that changes within one chord. */
const SAGITTA_SAFETY = 4;
/** The other component counts as zero at a vertex when below this fraction of its scale. */
export const DIRECTION_ZERO_TOL = 1e-12;
/**
 * Vertices this close (window-scaled) to a break point merge into it: 100 × the position error an
 * equilibrium accepted at ROOT_RESIDUAL_TOL can carry, so no vertex beside it has a rounding-noise sign.
 */
const MERGE_DISTANCE = 1e-7;
/** A point this close (window-scaled) to a vanishing line is on it: the deflated value then comes from the derivative. */
const ON_LINE_TOL = 1e-12;
/** Where two vanishing lines cross, the deflated value is read this far (window-scaled) inside the window. */
const CORNER_NUDGE = 1e-6;
/** Halvings of a grid edge: 2^-80 of a cell is below one ulp, so the bracket has collapsed well before. */
const BISECTION_STEPS = 80;
/** Sign changes of the other component are located to 2^-50 of a segment. */
const SIGN_BISECTION_STEPS = 50;
/** A located sign change is a zero when |f_j| there is below this fraction of its scale (bisection leaves rounding level); otherwise it is a jump. */
const SIGN_CHANGE_ZERO_TOL = 1e-8;
/** Newton from within a cell of the curve converges in a handful of steps; the rest is room near tangencies. */
const PROJECTION_STEPS = 30;
/** A Newton step shorter than this (window-scaled) is a few ulps: the projection has converged. */
const PROJECTION_STEP_TOL = 1e-15;

export type NullclineEnd =
  | { kind: "equilibrium"; id: string }
  /** The piece runs out of the window through the side where `state` is at its window bound. */
  | { kind: "window-edge"; state: string; bound: "min" | "max" }
  /** The model is non-finite beyond this end. */
  | { kind: "hole" }
  /** Neither: the other component changes sign here without a listed equilibrium, or tracing failed (a pole). */
  | { kind: "interior" }
  /** The piece is a closed curve; its last point repeats its first. */
  | { kind: "loop" };

/** The line where state `state` equals `value`. */
export interface AxisLine {
  state: string;
  value: number;
}

export interface NullclinePiece {
  /** Index of the branch (connected curve before splitting) this piece belongs to. */
  branch: number;
  /** Vertices [first state, second state], ordered along the curve. */
  points: [number, number][];
  otherState: string;
  /** Sign of the other state's derivative along the piece (constant: pieces are split where it changes). */
  otherDirection: "increasing" | "decreasing" | "zero";
  /** True when the piece lies on a straight line where f_i vanishes identically (an axis or a window edge). */
  onAxis: boolean;
  axis: AxisLine | null;
  ends: [NullclineEnd, NullclineEnd];
}

export interface NullclineResult {
  /** The state whose derivative vanishes on these pieces. */
  state: string;
  /** max |f_i| over the grid: the scale residuals are measured against. */
  scale: number;
  /** max |f_i| / scale over every vertex. */
  maxResidual: number;
  /** Lines where f_i vanishes identically. */
  lines: AxisLine[];
  /**
   * Branches ordered by their first point, then second (first state, then second); an open branch
   * starts at its lexicographically smaller end, a closed one runs counter-clockwise from its
   * smallest vertex (or its first equilibrium). Pieces follow their branch in that order.
   */
  pieces: NullclinePiece[];
}

type Point = [number, number];
interface Line { index: number; value: number }
interface Branch { points: Point[]; ends: [NullclineEnd, NullclineEnd]; closed: boolean; line: Line | null }
interface Piece { points: Point[]; ends: [NullclineEnd, NullclineEnd] }
type Vertex = { kind: "real"; p: Point; side: NullclineEnd | null } | { kind: "frame" | "hole" | "failed" };

interface Evaluator {
  f(p: Point, i: number): number;
  both(p: Point): Point;
  grad(p: Point, i: number): Point;
}

function evaluator(model: Model): Evaluator {
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  const j = new Float64Array(4);
  return {
    f(p, i) {
      y[0] = p[0]; y[1] = p[1];
      model.rhs(y, f);
      return Number.isFinite(f[i]) ? f[i] : NaN;
    },
    both(p) {
      y[0] = p[0]; y[1] = p[1];
      model.rhs(y, f);
      return [Number.isFinite(f[0]) ? f[0] : NaN, Number.isFinite(f[1]) ? f[1] : NaN];
    },
    grad(p, i) {
      y[0] = p[0]; y[1] = p[1];
      model.jacobianAt(y, j);
      return [j[2 * i], j[2 * i + 1]];
    },
  };
}

const product = (v: number[]) => v.reduce((a, b) => a * b, 1);
const lexLess = (p: Point, q: Point) => p[0] < q[0] || (p[0] === q[0] && p[1] < q[1]);
const samePoint = (p: Point, q: Point) => p[0] === q[0] && p[1] === q[1];

export function scaledDistance(p: Point, q: Point, box: Box): number {
  return Math.hypot((p[0] - q[0]) / box.width[0], (p[1] - q[1]) / box.width[1]);
}

/** Window-scaled distance from p to the segment a → b, and the parameter t ∈ [0, 1] of the nearest point. */
export function segmentDistance(p: Point, a: Point, b: Point, box: Box): { d: number; t: number } {
  const d0 = (b[0] - a[0]) / box.width[0], d1 = (b[1] - a[1]) / box.width[1];
  const e0 = (p[0] - a[0]) / box.width[0], e1 = (p[1] - a[1]) / box.width[1];
  const len2 = d0 * d0 + d1 * d1;
  const t = len2 > 0 ? Math.min(1, Math.max(0, (e0 * d0 + e1 * d1) / len2)) : 0;
  return { d: Math.hypot(e0 - t * d0, e1 - t * d1), t };
}

/** f_i divided by the (window-scaled) distance to each vanishing line: the rest of its zero set, now sign-changing. */
interface Deflated {
  value(p: Point): number;
  /** Gradient in state units, or null on a vanishing line. */
  gradient(p: Point): Point | null;
}

function deflate(ev: Evaluator, box: Box, i: number, lines: Line[]): Deflated {
  const offsets = (p: Point) => lines.map((l) => (p[l.index] - l.value) / box.width[l.index]);
  const value = (p: Point): number => {
    if (lines.length === 0) return ev.f(p, i);
    if (lines.length === 1) {
      // the common case (one axis), without allocation
      const { index, value: c } = lines[0];
      const d = (p[index] - c) / box.width[index];
      return Math.abs(d) > ON_LINE_TOL ? ev.f(p, i) / d : ev.grad(p, i)[index] * box.width[index];
    }
    const d = offsets(p);
    const on = d.flatMap((v, k) => (Math.abs(v) <= ON_LINE_TOL ? [k] : []));
    if (on.length === 0) return ev.f(p, i) / product(d);
    if (on.length === 1) {
      // the limit f / d as d → 0, by l'Hôpital
      const k = on[0];
      const rest = product(d.filter((_, m) => m !== k));
      return (ev.grad(p, i)[lines[k].index] * box.width[lines[k].index]) / rest;
    }
    const q = p.map((v, k) => v + (v <= (box.lo[k] + box.hi[k]) / 2 ? 1 : -1) * CORNER_NUDGE * box.width[k]) as Point;
    return ev.f(q, i) / product(offsets(q));
  };
  const gradient = (p: Point): Point | null => {
    const g = ev.grad(p, i);
    if (lines.length === 0) return g;
    if (offsets(p).some((v) => Math.abs(v) <= ON_LINE_TOL)) return null;
    const pi = product(offsets(p));
    const h = ev.f(p, i) / pi;
    const out: Point = [g[0] / pi, g[1] / pi];
    for (const l of lines) out[l.index] -= h / (p[l.index] - l.value);
    return out;
  };
  return { value, gradient };
}

/** Bisection between a and b, where g has opposite signs (≥ 0 versus < 0), down to adjacent doubles. */
function bracketRoot(g: (p: Point) => number, a: Point, b: Point, ga: number, gb: number): Point {
  if (ga === 0) return a;
  if (gb === 0) return b;
  let lo = a, hi = b, glo = ga, ghi = gb;
  for (let s = 0; s < BISECTION_STEPS; s++) {
    const m: Point = [0.5 * (lo[0] + hi[0]), 0.5 * (lo[1] + hi[1])];
    if (samePoint(m, lo) || samePoint(m, hi)) break;
    const gm = g(m);
    if (gm === 0) return m;
    if (!Number.isFinite(gm)) break;
    if (gm < 0 === glo < 0) { lo = m; glo = gm; } else { hi = m; ghi = gm; }
  }
  return Math.abs(glo) <= Math.abs(ghi) ? lo : hi;
}

/** Newton steps along the gradient of the deflated function, in window-scaled coordinates. */
function projectOnto(h: Deflated, box: Box, start: Point): Point {
  let x: Point = [start[0], start[1]];
  for (let it = 0; it < PROJECTION_STEPS; it++) {
    const hv = h.value(x);
    const g = h.gradient(x);
    if (!g || hv === 0 || !Number.isFinite(hv)) break;
    const gs = [g[0] * box.width[0], g[1] * box.width[1]];
    const norm2 = gs[0] * gs[0] + gs[1] * gs[1];
    if (!(norm2 > 0 && Number.isFinite(norm2))) break;
    const step = -hv / norm2;
    x = [x[0] + step * gs[0] * box.width[0], x[1] + step * gs[1] * box.width[1]];
    if (Math.abs(step) * Math.sqrt(norm2) < PROJECTION_STEP_TOL) break;
  }
  return x;
}

function vanishingLines(ev: Evaluator, box: Box, i: number, scale: number, axes: number[][]): Line[] {
  const lines: Line[] = [];
  for (const k of [0, 1]) {
    const candidates = [box.lo[k], box.hi[k]];
    if (box.lo[k] < 0 && box.hi[k] > 0) candidates.push(0);
    for (const c of candidates.sort((a, b) => a - b)) {
      let finite = 0;
      let vanishes = true;
      for (const t of axes[1 - k]) {
        const v = ev.f(k === 0 ? [c, t] : [t, c], i);
        if (!Number.isFinite(v)) continue;
        finite++;
        if (Math.abs(v) > VANISHING_LINE_TOL * scale) { vanishes = false; break; }
      }
      if (vanishes && finite >= 2) lines.push({ index: k, value: c });
    }
  }
  return lines;
}

function lineBranches(ev: Evaluator, i: number, line: Line, axes: number[][], names: string[]): Branch[] {
  const free = 1 - line.index;
  const ts = axes[free];
  const branches: Branch[] = [];
  let run: Point[] = [];
  let startEnd: NullclineEnd = { kind: "hole" };
  const flush = (end: NullclineEnd) => {
    if (run.length >= 2) branches.push({ points: run, ends: [startEnd, end], closed: false, line });
    run = [];
  };
  ts.forEach((t, a) => {
    const p: Point = line.index === 0 ? [line.value, t] : [t, line.value];
    if (Number.isFinite(ev.f(p, i))) {
      if (run.length === 0) startEnd = a === 0 ? { kind: "window-edge", state: names[free], bound: "min" } : { kind: "hole" };
      run.push(p);
    } else flush({ kind: "hole" });
  });
  flush({ kind: "window-edge", state: names[free], bound: "max" });
  return branches;
}

interface Grid { nx: number; ny: number; axes: number[][]; values: number[] }

/** Marching squares on the deflated samples, each crossing bracketed on its grid edge, rings cut at the border and at holes. */
function traceCurves(h: Deflated, ev: Evaluator, i: number, scale: number, grid: Grid, names: string[]): { branches: Branch[]; failed: number } {
  const { nx, ny, axes, values } = grid;
  let failed = 0;
  const vertexAt = ([cx, cy]: number[]): Vertex => {
    // unsmoothed vertices are edge midpoints; node (a, b) sits at (a + 0.5, b + 0.5)
    const horizontal = Number.isInteger(cx);
    const [a0, a1, b0, b1] = horizontal ? [cx - 1, cx, cy - 0.5, cy - 0.5] : [cx - 0.5, cx - 0.5, cy - 1, cy];
    if (a0 < 0 || b0 < 0 || a1 >= nx || b1 >= ny) return { kind: "frame" };
    const hA = values[b0 * nx + a0], hB = values[b1 * nx + a1];
    if (!Number.isFinite(hA) || !Number.isFinite(hB)) return { kind: "hole" };
    const p = bracketRoot(h.value, [axes[0][a0], axes[1][b0]], [axes[0][a1], axes[1][b1]], hA, hB);
    if (!(Math.abs(ev.f(p, i)) <= NULLCLINE_RESIDUAL_TOL * scale)) { failed++; return { kind: "failed" }; }
    let side: NullclineEnd | null = null;
    if (!horizontal && (a0 === 0 || a0 === nx - 1)) side = { kind: "window-edge", state: names[0], bound: a0 === 0 ? "min" : "max" };
    if (horizontal && (b0 === 0 || b0 === ny - 1)) side = { kind: "window-edge", state: names[1], bound: b0 === 0 ? "min" : "max" };
    return { kind: "real", p, side };
  };

  const branches: Branch[] = [];
  const [contour] = contours().size([nx, ny]).thresholds([0]).smooth(false)(values);
  for (const polygon of contour.coordinates) for (const ring of polygon) {
    const vertices = ring.slice(0, samePoint(ring[0] as Point, ring[ring.length - 1] as Point) ? -1 : undefined).map(vertexAt);
    const start = vertices.findIndex((v) => v.kind !== "real");
    if (start < 0) {
      const points = dedupe(vertices.map((v) => (v as { p: Point }).p), true);
      if (points.length >= 3) branches.push({ points, ends: [{ kind: "loop" }, { kind: "loop" }], closed: true, line: null });
      continue;
    }
    let run: { p: Point; side: NullclineEnd | null }[] = [];
    let previous = vertices[start];
    const endFor = (v: Vertex, at: { side: NullclineEnd | null }): NullclineEnd =>
      v.kind === "frame" ? (at.side ?? { kind: "interior" }) : v.kind === "hole" ? { kind: "hole" } : { kind: "interior" };
    for (let k = 1; k <= vertices.length; k++) {
      const v = vertices[(start + k) % vertices.length];
      if (v.kind === "real") { run.push(v); continue; }
      const points = dedupe(run.map((r) => r.p), false);
      if (points.length >= 2) {
        branches.push({ points, ends: [endFor(previous, run[0]), endFor(v, run[run.length - 1])], closed: false, line: null });
      }
      run = [];
      previous = v;
    }
  }
  return { branches, failed };
}

function dedupe(points: Point[], closed: boolean): Point[] {
  const out = points.filter((p, k) => k === 0 || !samePoint(p, points[k - 1]));
  if (closed) while (out.length > 1 && samePoint(out[0], out[out.length - 1])) out.pop();
  return out;
}

/** Fixed orientation and start, so the order of branches does not depend on d3-contour's ring order. */
function canonical(b: Branch): Branch {
  if (b.closed) {
    let area = 0;
    b.points.forEach((p, k) => { const q = b.points[(k + 1) % b.points.length]; area += p[0] * q[1] - q[0] * p[1]; });
    const points = area < 0 ? [...b.points].reverse() : [...b.points];
    let m = 0;
    points.forEach((p, k) => { if (lexLess(p, points[m])) m = k; });
    return { ...b, points: [...points.slice(m), ...points.slice(0, m)] };
  }
  if (lexLess(b.points[b.points.length - 1], b.points[0])) return { ...b, points: [...b.points].reverse(), ends: [b.ends[1], b.ends[0]] };
  return b;
}

function compareBranches(p: Branch, q: Branch): number {
  for (let k = 0; k < 2; k++) {
    if (lexLess(p.points[k], q.points[k])) return -1;
    if (lexLess(q.points[k], p.points[k])) return 1;
  }
  return 0;
}

/** Turning angle (radians, window-scaled) of a polyline at vertex k; 0 at the ends of an open one. */
function turningAngle(pts: Point[], k: number, closed: boolean, box: Box): number {
  const n = pts.length;
  if (!closed && (k === 0 || k === n - 1)) return 0;
  const [a, b, c] = [pts[(k - 1 + n) % n], pts[k], pts[(k + 1) % n]];
  const u = [(b[0] - a[0]) / box.width[0], (b[1] - a[1]) / box.width[1]];
  const v = [(c[0] - b[0]) / box.width[0], (c[1] - b[1]) / box.width[1]];
  return Math.abs(Math.atan2(u[0] * v[1] - u[1] * v[0], u[0] * v[0] + u[1] * v[1]));
}

/** Cut a branch at every equilibrium on it (see EQUILIBRIUM_ON_BRANCH_CELLS); the equilibrium becomes the shared end point. */
function splitAtEquilibria(b: Branch, equilibria: { id: string; p: Point }[], box: Box, reach: number, attached: Set<string>): Piece[] {
  const pts = b.points;
  const segments = b.closed ? pts.length : pts.length - 1;
  const hits: { s: number; t: number; id: string; p: Point }[] = [];
  for (const e of equilibria) {
    let best = { s: -1, t: 0, d: Infinity };
    for (let s = 0; s < segments; s++) {
      const { d, t } = segmentDistance(e.p, pts[s], pts[(s + 1) % pts.length], box);
      if (d < best.d) best = { s, t, d };
    }
    if (best.s < 0) continue;
    const [a, c] = [best.s, (best.s + 1) % pts.length];
    const bend = Math.max(turningAngle(pts, a, b.closed, box), turningAngle(pts, c, b.closed, box));
    const sagitta = (SAGITTA_SAFETY * scaledDistance(pts[a], pts[c], box) * bend) / 8;
    if (best.d <= Math.min(reach, Math.max(MERGE_DISTANCE, sagitta))) {
      hits.push({ s: best.s, t: best.t, id: e.id, p: e.p });
      attached.add(e.id);
    }
  }
  hits.sort((h, k) => h.s - k.s || h.t - k.t);

  let nodes: { p: Point; eq: string | null }[] = [];
  for (let s = 0; s < pts.length; s++) {
    nodes.push({ p: pts[s], eq: null });
    for (const hit of hits) if (hit.s === s) nodes.push({ p: hit.p, eq: hit.id });
  }
  nodes = nodes.filter((n) => n.eq !== null || hits.every((hit) => scaledDistance(n.p, hit.p, box) > MERGE_DISTANCE));
  const ends = b.ends;
  if (hits.length === 0) {
    return [{ points: b.closed ? [...pts, pts[0]] : pts, ends }];
  }
  if (b.closed) {
    const first = nodes.findIndex((n) => n.eq !== null);
    nodes = [...nodes.slice(first), ...nodes.slice(0, first), nodes[first]];
  }
  const pieces: Piece[] = [];
  let current: { p: Point; eq: string | null }[] = [];
  const endOf = (n: { eq: string | null }, fallback: NullclineEnd): NullclineEnd => (n.eq !== null ? { kind: "equilibrium", id: n.eq } : fallback);
  const flush = () => {
    const points = dedupe(current.map((n) => n.p), false);
    if (points.length >= 2) pieces.push({ points, ends: [endOf(current[0], ends[0]), endOf(current[current.length - 1], ends[1])] });
  };
  for (const n of nodes) {
    current.push(n);
    if (n.eq !== null && current.length > 1) { flush(); current = [n]; }
  }
  if (current.length > 1) flush();
  return pieces;
}

type Sign = -1 | 0 | 1;
type SignChange = (p: Point, kind: "zero" | "jump") => void;

/**
 * Split a piece wherever the other component changes sign, and label each part with its direction.
 * Through a zero the parts share the crossing point; across a jump (a pole, a hole) they are left apart.
 */
function splitByDirection(
  piece: Piece, ev: Evaluator, j: number, scaleJ: number, locate: (a: Point, b: Point, sa: Sign) => Point | null, onChange: SignChange,
): (Piece & { sign: Sign })[] {
  const excluded = (e: NullclineEnd) => e.kind === "equilibrium" || e.kind === "interior";
  const pts = piece.points;
  const values = pts.map((p) => ev.f(p, j));
  const signs: (Sign | null)[] = values.map((v, k) => {
    if ((k === 0 && excluded(piece.ends[0])) || (k === pts.length - 1 && excluded(piece.ends[1])) || !Number.isFinite(v)) return null;
    return Math.abs(v) <= DIRECTION_ZERO_TOL * scaleJ ? 0 : (Math.sign(v) as Sign);
  });
  let k1 = -1;
  for (let k = 0; k < signs.length; k++) {
    if (!signs[k]) continue;
    if (k1 < 0 || signs[k] === signs[k1]) { k1 = k; continue; }
    let shared: Point | null = null;
    if (k === k1 + 1) {
      const p = locate(pts[k1], pts[k], signs[k1] as Sign);
      if (p && Math.abs(ev.f(p, j)) <= SIGN_CHANGE_ZERO_TOL * scaleJ) shared = p;
      onChange(p ?? pts[k1], shared ? "zero" : "jump");
    } else {
      // vertices between are zero (the crossing) or non-finite (a jump)
      const zero = pts.findIndex((_, m) => m > k1 && m < k && signs[m] === 0);
      if (zero >= 0) shared = pts[zero];
      onChange(shared ?? pts[k1 + 1], shared ? "zero" : "jump");
    }
    const interior: NullclineEnd = { kind: "interior" };
    const head: Piece = { points: [...pts.slice(0, k1 + 1), ...(shared ? [shared] : [])], ends: [piece.ends[0], interior] };
    const tail: Piece = { points: [...(shared ? [shared] : []), ...pts.slice(k)], ends: [interior, piece.ends[1]] };
    const out: (Piece & { sign: Sign })[] = head.points.length >= 2 ? [{ ...head, sign: signs[k1] as Sign }] : [];
    return tail.points.length >= 2 ? [...out, ...splitByDirection(tail, ev, j, scaleJ, locate, onChange)] : out;
  }
  return [{ ...piece, sign: k1 >= 0 ? (signs[k1] as Sign) : 0 }];
}

/**
 * Every branch of every nullcline in the window (see the module comment for the method and
 * NullclineResult.pieces for the ordering). `equilibria` supplies the break points.
 */
export function findNullclines(
  model: Model,
  equilibria: EquilibriumResult[],
  options: NullclineOptions = DEFAULT_NULLCLINE_OPTIONS,
  diagnostics: Diagnostic[] = [],
): NullclineResult[] {
  const box = windowOf(model);
  const names = model.stateNames;
  const { nx, ny } = options;
  if (!(Number.isInteger(nx) && Number.isInteger(ny) && nx >= 3 && ny >= 3)) throw new Error(`invalid nullcline grid ${nx} × ${ny}`);
  const ev = evaluator(model);
  const axes = [nx, ny].map((n, k) => Array.from({ length: n }, (_, a) => (a === n - 1 ? box.hi[k] : box.lo[k] + (box.width[k] * a) / (n - 1))));
  const samples: number[][] = [new Array(nx * ny), new Array(nx * ny)];
  for (let b = 0; b < ny; b++) for (let a = 0; a < nx; a++) {
    const [f0, f1] = ev.both([axes[0][a], axes[1][b]]);
    samples[0][b * nx + a] = f0;
    samples[1][b * nx + a] = f1;
  }
  const scales = samples.map((s) => s.reduce((m, v) => (Number.isFinite(v) ? Math.max(m, Math.abs(v)) : m), 0));
  const points = equilibria.map((e) => ({ id: e.id, p: [e.point[names[0]], e.point[names[1]]] as Point }));
  const reach = EQUILIBRIUM_ON_BRANCH_CELLS * Math.hypot(1 / (nx - 1), 1 / (ny - 1));

  return [0, 1].map((i): NullclineResult => {
    const j = 1 - i;
    const scale = scales[i];
    if (!(scale > 0)) {
      diagnostics.push({ severity: "warning", stage: "nullclines", message: `d${names[i]}/dt is zero or undefined at every grid point of the window: no ${names[i]}-nullcline is drawn` });
      return { state: names[i], scale, maxResidual: 0, lines: [], pieces: [] };
    }
    const lines = vanishingLines(ev, box, i, scale, axes);
    const h = deflate(ev, box, i, lines);
    const values = lines.length ? samples[i].map((v, n) => (Number.isFinite(v) ? h.value([axes[0][n % nx], axes[1][Math.floor(n / nx)]]) : NaN)) : samples[i];
    const traced = traceCurves(h, ev, i, scale, { nx, ny, axes, values }, names);
    if (traced.failed > 0) {
      diagnostics.push({ severity: "info", stage: "nullclines", message: `${traced.failed} grid-edge sign changes of d${names[i]}/dt are not zeros (a pole or a jump) and were left out of the ${names[i]}-nullcline` });
    }
    const branches = [...lines.flatMap((l) => lineBranches(ev, i, l, axes, names)), ...traced.branches].map(canonical).sort(compareBranches);

    const attached = new Set<string>();
    const locateOnLine = (a: Point, b: Point, sa: Sign) => locateSignChange(a, b, sa, (p) => p, ev, j);
    const locateOnCurve = (a: Point, b: Point, sa: Sign) => locateSignChange(a, b, sa, (p) => projectOnto(h, box, p), ev, j, (p) => Math.abs(ev.f(p, i)) <= NULLCLINE_RESIDUAL_TOL * scale);
    const pieces: NullclinePiece[] = [];
    branches.forEach((branch, index) => {
      for (const piece of splitAtEquilibria(branch, points, box, reach, attached)) {
        const parts = splitByDirection(piece, ev, j, scales[j], branch.line ? locateOnLine : locateOnCurve, (p, kind) => {
          const at = `(${p.map((v) => +v.toPrecision(6)).join(", ")})`;
          diagnostics.push(kind === "zero"
            ? { severity: "warning", stage: "nullclines", message: `d${names[j]}/dt changes sign on the ${names[i]}-nullcline near ${at}, where no equilibrium is listed` }
            : { severity: "info", stage: "nullclines", message: `d${names[j]}/dt jumps in sign (a pole or a gap in its domain) on the ${names[i]}-nullcline near ${at}` });
        });
        for (const part of parts) {
          const axis = branch.line ? { state: names[branch.line.index], value: branch.line.value } : null;
          pieces.push({
            branch: index,
            points: part.points.map((p) => [p[0] + 0, p[1] + 0]),
            otherState: names[j],
            otherDirection: part.sign > 0 ? "increasing" : part.sign < 0 ? "decreasing" : "zero",
            onAxis: axis !== null,
            axis,
            ends: part.ends,
          });
        }
      }
    });
    for (const e of points) if (!attached.has(e.id)) {
      diagnostics.push({ severity: "info", stage: "nullclines", message: `equilibrium ${e.id} lies on no traced branch of the ${names[i]}-nullcline (an isolated zero or a tangency the grid cannot see)` });
    }
    const maxResidual = pieces.reduce((m, piece) => piece.points.reduce((mm, p) => Math.max(mm, Math.abs(ev.f(p, i)) / scale), m), 0);
    return { state: names[i], scale, maxResidual, lines: lines.map((l) => ({ state: names[l.index], value: l.value })), pieces };
  });
}

/** Bisection on the segment a → b (points projected onto the nullcline) for a sign change of f_j. */
function locateSignChange(a: Point, b: Point, sa: Sign, project: (p: Point) => Point, ev: Evaluator, j: number, accept: (p: Point) => boolean = () => true): Point | null {
  let lo = 0, hi = 1;
  let best: Point | null = null;
  for (let s = 0; s < SIGN_BISECTION_STEPS; s++) {
    const t = 0.5 * (lo + hi);
    const p = project([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
    if (!accept(p)) return null;
    const v = ev.f(p, j);
    if (!Number.isFinite(v)) return null;
    best = p;
    if (v === 0) break;
    if (Math.sign(v) === sa) lo = t; else hi = t;
  }
  return best;
}

import type { Model } from "../../../model/types.js";
import type { Box } from "../../numeric/window.js";
import type { NullclineEnd } from "../nullclines.js";
import {
  CORNER_NUDGE,
  ON_LINE_TOL,
  PROJECTION_STEP_TOL,
  PROJECTION_STEPS,
  VANISHING_LINE_TOL,
} from "../../constants.js";
import type { Curve, Line, Point } from "./geometry.js";

/** The model's right-hand side and Jacobian rows at a point, non-finite values as NaN. */
export interface Evaluator {
  f(p: Point, i: number): number;
  both(p: Point): Point;
  grad(p: Point, i: number): Point;
}

export function evaluator(model: Model): Evaluator {
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  const j = new Float64Array(4);
  return {
    f(p, i) {
      y[0] = p[0];
      y[1] = p[1];
      model.rhs(y, f);
      return Number.isFinite(f[i]) ? f[i] : NaN;
    },
    both(p) {
      y[0] = p[0];
      y[1] = p[1];
      model.rhs(y, f);
      return [Number.isFinite(f[0]) ? f[0] : NaN, Number.isFinite(f[1]) ? f[1] : NaN];
    },
    grad(p, i) {
      y[0] = p[0];
      y[1] = p[1];
      model.jacobianAt(y, j);
      return [j[2 * i], j[2 * i + 1]];
    },
  };
}

const product = (v: number[]) => v.reduce((a, b) => a * b, 1);

/** f_i divided by the (window-scaled) distance to each vanishing line: the rest of its zero set, now sign-changing. */
export interface Deflated {
  value(p: Point): number;
  /** Gradient in state units, or null on a vanishing line. */
  gradient(p: Point): Point | null;
}

export function deflate(ev: Evaluator, box: Box, i: number, lines: Line[]): Deflated {
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
    const q = p.map(
      (v, k) => v + (v <= (box.lo[k] + box.hi[k]) / 2 ? 1 : -1) * CORNER_NUDGE * box.width[k],
    ) as Point;
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

/** Newton steps along the gradient of the deflated function, in window-scaled coordinates. */
export function projectOnto(h: Deflated, box: Box, start: Point): Point {
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

export function vanishingLines(ev: Evaluator, box: Box, i: number, scale: number, axes: number[][]): Line[] {
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
        if (Math.abs(v) > VANISHING_LINE_TOL * scale) {
          vanishes = false;
          break;
        }
      }
      if (vanishes && finite >= 2) lines.push({ index: k, value: c });
    }
  }
  return lines;
}

export function lineCurves(ev: Evaluator, i: number, line: Line, axes: number[][], names: string[]): Curve[] {
  const free = 1 - line.index;
  const ts = axes[free];
  const curves: Curve[] = [];
  let run: Point[] = [];
  let startEnd: NullclineEnd = { kind: "hole" };
  const flush = (end: NullclineEnd) => {
    if (run.length >= 2) curves.push({ points: run, ends: [startEnd, end], closed: false, line });
    run = [];
  };
  ts.forEach((t, a) => {
    const p: Point = line.index === 0 ? [line.value, t] : [t, line.value];
    if (Number.isFinite(ev.f(p, i))) {
      if (run.length === 0)
        startEnd = a === 0 ? { kind: "window-edge", state: names[free], bound: "min" } : { kind: "hole" };
      run.push(p);
    } else flush({ kind: "hole" });
  });
  flush({ kind: "window-edge", state: names[free], bound: "max" });
  return curves;
}

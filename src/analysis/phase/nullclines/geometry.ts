import type { Box } from "../../numeric/window.js";
import type { NullclineEnd } from "../nullclines.js";

/** Polylines of the nullcline tracer: points, lines where f_i vanishes, connected curves, and the pieces they are cut into. */
export type Point = [number, number];
/** The line x_index = value. */
export interface Line {
  index: number;
  value: number;
}
/** A connected curve of the zero set before splitting (closed, or with two ends); on a vanishing line when `line` is set. */
export interface Curve {
  points: Point[];
  ends: [NullclineEnd, NullclineEnd];
  closed: boolean;
  line: Line | null;
}
export interface Piece {
  points: Point[];
  ends: [NullclineEnd, NullclineEnd];
}

export const lexLess = (p: Point, q: Point) => p[0] < q[0] || (p[0] === q[0] && p[1] < q[1]);
export const samePoint = (p: Point, q: Point) => p[0] === q[0] && p[1] === q[1];

export function dedupe(points: Point[], closed: boolean): Point[] {
  const out = points.filter((p, k) => k === 0 || !samePoint(p, points[k - 1]));
  if (closed) while (out.length > 1 && samePoint(out[0], out[out.length - 1])) out.pop();
  return out;
}

/** Fixed orientation and start, so the order of curves does not depend on d3-contour's ring order. */
export function canonical(b: Curve): Curve {
  if (b.closed) {
    let area = 0;
    b.points.forEach((p, k) => {
      const q = b.points[(k + 1) % b.points.length];
      area += p[0] * q[1] - q[0] * p[1];
    });
    const points = area < 0 ? [...b.points].reverse() : [...b.points];
    let m = 0;
    points.forEach((p, k) => {
      if (lexLess(p, points[m])) m = k;
    });
    return { ...b, points: [...points.slice(m), ...points.slice(0, m)] };
  }
  if (lexLess(b.points[b.points.length - 1], b.points[0]))
    return { ...b, points: [...b.points].reverse(), ends: [b.ends[1], b.ends[0]] };
  return b;
}

export function compareCurves(p: Curve, q: Curve): number {
  for (let k = 0; k < 2; k++) {
    if (lexLess(p.points[k], q.points[k])) return -1;
    if (lexLess(q.points[k], p.points[k])) return 1;
  }
  return 0;
}

/** Turning angle (radians, window-scaled) of a polyline at vertex k; 0 at the ends of an open one. */
export function turningAngle(pts: Point[], k: number, closed: boolean, box: Box): number {
  const n = pts.length;
  if (!closed && (k === 0 || k === n - 1)) return 0;
  const [a, b, c] = [pts[(k - 1 + n) % n], pts[k], pts[(k + 1) % n]];
  const u = [(b[0] - a[0]) / box.width[0], (b[1] - a[1]) / box.width[1]];
  const v = [(c[0] - b[0]) / box.width[0], (c[1] - b[1]) / box.width[1]];
  return Math.abs(Math.atan2(u[0] * v[1] - u[1] * v[0], u[0] * v[0] + u[1] * v[1]));
}

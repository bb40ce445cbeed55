import { contours } from "d3-contour";
import type { NullclineEnd } from "../nullclines.js";
import { bisect } from "../../numeric/roots.js";
import { NULLCLINE_BISECTION_STEPS, NULLCLINE_RESIDUAL_TOL } from "../../constants.js";
import type { Deflated, Evaluator } from "./evaluate.js";
import { dedupe, samePoint, type Curve, type Point } from "./geometry.js";

/** A ring vertex: a point on the curve (with the window side it sits on, if any), or where the ring runs along the frame, through a hole, or failed to bracket. */
type Vertex = { kind: "real"; p: Point; side: NullclineEnd | null } | { kind: "frame" | "hole" | "failed" };

/**
 * Bisection between grid nodes a and b, where g has opposite signs (≥ 0 versus < 0), down to
 * adjacent doubles. Grid edges are axis-parallel, so only the coordinate `k` that differs moves.
 */
function bracketRoot(g: (p: Point) => number, a: Point, b: Point, ga: number, gb: number): Point {
  if (ga === 0) return a;
  if (gb === 0) return b;
  const k = a[0] === b[0] ? 1 : 0;
  const at = (v: number): Point => (k === 0 ? [v, a[1]] : [a[0], v]);
  let glo = ga,
    ghi = gb;
  const { lo, hi } = bisect(
    a[k],
    b[k],
    (m) => {
      const gm = g(at(m));
      if (gm === 0) return "root";
      if (!Number.isFinite(gm)) return "stop";
      if (gm < 0 === glo < 0) {
        glo = gm;
        return "upper";
      }
      ghi = gm;
      return "lower";
    },
    NULLCLINE_BISECTION_STEPS,
  );
  if (lo === hi) return at(lo);
  return Math.abs(glo) <= Math.abs(ghi) ? at(lo) : at(hi);
}

export interface Grid {
  nx: number;
  ny: number;
  axes: number[][];
  values: number[];
}

/** Marching squares on the deflated samples, each crossing bracketed on its grid edge, rings cut at the border and at holes. */
export function contourCurves(
  h: Deflated,
  ev: Evaluator,
  i: number,
  scale: number,
  grid: Grid,
  names: string[],
): { curves: Curve[]; failed: number } {
  const { nx, ny, axes, values } = grid;
  let failed = 0;
  const vertexAt = ([cx, cy]: number[]): Vertex => {
    // unsmoothed vertices are edge midpoints; node (a, b) sits at (a + 0.5, b + 0.5)
    const horizontal = Number.isInteger(cx);
    const [a0, a1, b0, b1] = horizontal ? [cx - 1, cx, cy - 0.5, cy - 0.5] : [cx - 0.5, cx - 0.5, cy - 1, cy];
    if (a0 < 0 || b0 < 0 || a1 >= nx || b1 >= ny) return { kind: "frame" };
    const hA = values[b0 * nx + a0],
      hB = values[b1 * nx + a1];
    if (!Number.isFinite(hA) || !Number.isFinite(hB)) return { kind: "hole" };
    const p = bracketRoot(h.value, [axes[0][a0], axes[1][b0]], [axes[0][a1], axes[1][b1]], hA, hB);
    if (!(Math.abs(ev.f(p, i)) <= NULLCLINE_RESIDUAL_TOL * scale)) {
      failed++;
      return { kind: "failed" };
    }
    let side: NullclineEnd | null = null;
    if (!horizontal && (a0 === 0 || a0 === nx - 1))
      side = { kind: "window-edge", state: names[0], bound: a0 === 0 ? "min" : "max" };
    if (horizontal && (b0 === 0 || b0 === ny - 1))
      side = { kind: "window-edge", state: names[1], bound: b0 === 0 ? "min" : "max" };
    return { kind: "real", p, side };
  };

  const curves: Curve[] = [];
  const [contour] = contours().size([nx, ny]).thresholds([0]).smooth(false)(values);
  for (const polygon of contour.coordinates)
    for (const ring of polygon) {
      const vertices = ring
        .slice(0, samePoint(ring[0] as Point, ring[ring.length - 1] as Point) ? -1 : undefined)
        .map(vertexAt);
      const start = vertices.findIndex((v) => v.kind !== "real");
      if (start < 0) {
        const points = dedupe(
          vertices.map((v) => (v as { p: Point }).p),
          true,
        );
        if (points.length >= 3)
          curves.push({ points, ends: [{ kind: "loop" }, { kind: "loop" }], closed: true, line: null });
        continue;
      }
      let run: { p: Point; side: NullclineEnd | null }[] = [];
      let previous = vertices[start];
      const endFor = (v: Vertex, at: { side: NullclineEnd | null }): NullclineEnd =>
        v.kind === "frame"
          ? (at.side ?? { kind: "interior" })
          : v.kind === "hole"
            ? { kind: "hole" }
            : { kind: "interior" };
      for (let k = 1; k <= vertices.length; k++) {
        const v = vertices[(start + k) % vertices.length];
        if (v.kind === "real") {
          run.push(v);
          continue;
        }
        const points = dedupe(
          run.map((r) => r.p),
          false,
        );
        if (points.length >= 2) {
          curves.push({
            points,
            ends: [endFor(previous, run[0]), endFor(v, run[run.length - 1])],
            closed: false,
            line: null,
          });
        }
        run = [];
        previous = v;
      }
    }
  return { curves, failed };
}

import { describe, expect, it } from "vitest";
import { modelOf } from "../../fixtures/models.js";
import type { Model } from "../../../src/model/types.js";
import type { Diagnostic } from "../../../src/diagnostics/issue.js";
import { findEquilibria } from "../../../src/analysis/phase/equilibria.js";
import {
  findNullclines,
  type NullclineResult,
  type NullclinePiece,
} from "../../../src/analysis/phase/nullclines.js";
import { DEFAULT_NULLCLINE_OPTIONS, NULLCLINE_RESIDUAL_TOL } from "../../../src/analysis/constants.js";

type Rhs = (x: number, y: number) => [number, number];

// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4 (rabbits versus sheep):
// x' = x(3 - x - 2y), y' = y(2 - x - y); nullclines x = 0, x + 2y = 3 and y = 0, x + y = 2;
// fixed points (0,0), (0,2), (3,0), (1,1).
const competition = {
  equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
  window: { x: [0, 4], y: [0, 4] } as Record<string, [number, number]>,
};
const competitionRhs: Rhs = (x, y) => [x * (3 - x - 2 * y), y * (2 - x - y)];

// Logistic prey with a saturating (Holling type II) response, r = 1, K = 4, a = 1, h = 1, b = 2, m = 1.
// Dividing f_0 = 0 by x gives the prey nullcline y = (r/a)(1 - x/K)(1 + h x); f_1 = 0 off y = 0
// gives x = m/(b - m h) = 1 (elementary algebra, common practice).
const predatorPrey = {
  equations: { x: "x*(1 - x/4) - x*y/(1 + x)", y: "y*(2*x/(1 + x) - 1)" },
  window: { x: [0, 5], y: [0, 3] } as Record<string, [number, number]>,
};
const predatorPreyRhs: Rhs = (x, y) => [x * (1 - x / 4) - (x * y) / (1 + x), y * ((2 * x) / (1 + x) - 1)];
const preyNullcline = (x: number) => (1 - x / 4) * (1 + x);

// The unit circle as a nullcline, cut by the line y = x at (±1/√2, ±1/√2) (common practice).
const circle = {
  equations: { x: "x^2 + y^2 - 1", y: "x - y" },
  window: { x: [-2, 2], y: [-2, 2] } as Record<string, [number, number]>,
};
const circleRhs: Rhs = (x, y) => [x * x + y * y - 1, x - y];

const cases = [
  { name: "competition", ...competition, rhs: competitionRhs },
  { name: "predator-prey", ...predatorPrey, rhs: predatorPreyRhs },
  { name: "circle", ...circle, rhs: circleRhs },
];

const compiled = new Map<object, Model>();
function run(c: { equations: Record<string, string>; window: Record<string, [number, number]> }) {
  // compiling is the slow part: each model once per file
  const model = compiled.get(c.equations) ?? modelOf(c.equations, c.window);
  compiled.set(c.equations, model);
  const equilibria = findEquilibria(model);
  const diagnostics: Diagnostic[] = [];
  const nullclines = findNullclines(model, equilibria, DEFAULT_NULLCLINE_OPTIONS, diagnostics);
  return { model, equilibria, nullclines, diagnostics };
}

/** max |f_i| over the nullcline grid, computed here from the closed form. */
function gridScale(rhs: Rhs, window: Record<string, [number, number]>, i: number): number {
  const [[x0, x1], [y0, y1]] = Object.values(window);
  const { nx, ny } = DEFAULT_NULLCLINE_OPTIONS;
  let s = 0;
  for (let a = 0; a < nx; a++)
    for (let b = 0; b < ny; b++) {
      s = Math.max(s, Math.abs(rhs(x0 + ((x1 - x0) * a) / (nx - 1), y0 + ((y1 - y0) * b) / (ny - 1))[i]));
    }
  return s;
}

const vertices = (n: NullclineResult, filter: (p: NullclinePiece) => boolean = () => true) =>
  n.pieces.filter(filter).flatMap((p) => p.points);

describe("findNullclines", () => {
  it.each(cases)(
    "findNullclines($name) puts every vertex on its curve within NULLCLINE_RESIDUAL_TOL",
    (c) => {
      const { nullclines } = run(c);
      for (const i of [0, 1]) {
        const scale = gridScale(c.rhs, c.window, i);
        expect(nullclines[i].pieces.length).toBeGreaterThan(0);
        for (const [x, y] of vertices(nullclines[i]))
          expect(Math.abs(c.rhs(x, y)[i])).toBeLessThanOrEqual(NULLCLINE_RESIDUAL_TOL * scale);
      }
    },
  );

  it("findNullclines(competition) lies exactly on x = 0, x + 2y = 3, y = 0 and x + y = 2", () => {
    const [nx, ny] = run(competition).nullclines;
    const tol = 1e-12;
    for (const [x] of vertices(nx, (p) => p.onAxis)) expect(x).toBe(0);
    for (const [x, y] of vertices(nx, (p) => !p.onAxis)) expect(Math.abs(x + 2 * y - 3)).toBeLessThan(tol);
    for (const [, y] of vertices(ny, (p) => p.onAxis)) expect(y).toBe(0);
    for (const [x, y] of vertices(ny, (p) => !p.onAxis)) expect(Math.abs(x + y - 2)).toBeLessThan(tol);
    expect(nx.lines).toEqual([{ state: "x", value: 0 }]);
    expect(ny.lines).toEqual([{ state: "y", value: 0 }]);
  });

  it("findNullclines(competition) includes the axis curves across the whole window and the oblique lines edge to edge", () => {
    const [nx, ny] = run(competition).nullclines;
    const span = (n: NullclineResult, axis: boolean, k: number) => {
      const v = vertices(n, (p) => p.onAxis === axis).map((p) => p[k]);
      return [Math.min(...v), Math.max(...v)];
    };
    expect(span(nx, true, 1)).toEqual([0, 4]);
    expect(span(ny, true, 0)).toEqual([0, 4]);
    // x + 2y = 3 runs from (0, 1.5) to (3, 0); x + y = 2 from (0, 2) to (2, 0)
    expect(span(nx, false, 0)[0]).toBeCloseTo(0, 12);
    expect(span(nx, false, 0)[1]).toBeCloseTo(3, 12);
    expect(span(ny, false, 1)[1]).toBeCloseTo(2, 12);
    expect(span(ny, false, 0)[1]).toBeCloseTo(2, 12);
    const edgeEnds = nx.pieces.flatMap((p) => p.ends.filter((e) => e.kind === "window-edge"));
    expect(edgeEnds).toContainEqual({ kind: "window-edge", state: "x", bound: "min" });
  });

  it("findNullclines(predator-prey) follows the closed form y = (1 - x/4)(1 + x) and the line x = 1", () => {
    const [nx, ny] = run(predatorPrey).nullclines;
    const curve = vertices(nx, (p) => !p.onAxis);
    expect(curve.length).toBeGreaterThan(100);
    for (const [x, y] of curve) expect(Math.abs(y - preyNullcline(x))).toBeLessThan(1e-9);
    // the parabola meets x = 0 at (0, 1) and y = 0 at (4, 0)
    expect(curve.some(([x, y]) => x === 0 && Math.abs(y - 1) < 1e-12)).toBe(true);
    expect(curve.some(([x, y]) => Math.abs(x - 4) < 1e-12 && y === 0)).toBe(true);
    for (const [x] of vertices(ny, (p) => !p.onAxis)) expect(Math.abs(x - 1)).toBeLessThan(1e-12);
    expect(vertices(nx, (p) => p.onAxis).every(([x]) => x === 0)).toBe(true);
  });

  it("findNullclines(circle) gives one closed curve of radius 1 cut into two pieces at the equilibria", () => {
    const { nullclines, equilibria } = run(circle);
    const pieces = nullclines[0].pieces;
    expect(equilibria).toHaveLength(2);
    expect(pieces).toHaveLength(2);
    expect(new Set(pieces.map((p) => p.curve)).size).toBe(1);
    for (const [x, y] of vertices(nullclines[0])) expect(Math.abs(Math.hypot(x, y) - 1)).toBeLessThan(1e-12);
    for (const p of pieces) expect(p.ends.map((e) => e.kind)).toEqual(["equilibrium", "equilibrium"]);
    // together the two pieces go once round the circle
    const turn = pieces.reduce(
      (sum, p) =>
        sum +
        p.points.slice(1).reduce((s, q, k) => {
          const [a, b] = [p.points[k], q];
          return s + Math.atan2(a[0] * b[1] - a[1] * b[0], a[0] * b[0] + a[1] * b[1]);
        }, 0),
      0,
    );
    expect(Math.abs(turn)).toBeCloseTo(2 * Math.PI, 9);
  });

  it.each(cases)(
    "findNullclines($name) makes every equilibrium an end point of pieces of both nullclines, never an inner vertex",
    (c) => {
      const { nullclines, equilibria } = run(c);
      const box = Object.values(c.window);
      for (const n of nullclines) {
        for (const e of equilibria) {
          const p: [number, number] = [e.point.x, e.point.y];
          const ends = n.pieces
            .flatMap((piece) => [
              { end: piece.ends[0], at: piece.points[0] },
              { end: piece.ends[1], at: piece.points[piece.points.length - 1] },
            ])
            .filter(({ end }) => end.kind === "equilibrium" && end.id === e.id);
          // one piece on each side, unless the equilibrium sits where its curve leaves the window
          expect(ends.length).toBeGreaterThanOrEqual(1);
          for (const { at } of ends) expect(at).toEqual(p);
          for (const piece of n.pieces)
            for (const q of piece.points.slice(1, -1)) {
              const d = Math.hypot(
                (q[0] - p[0]) / (box[0][1] - box[0][0]),
                (q[1] - p[1]) / (box[1][1] - box[1][0]),
              );
              expect(d).toBeGreaterThan(1e-9);
            }
        }
      }
    },
  );

  it.each(cases)(
    "findNullclines($name) labels each piece with the sign of the other component at its vertices",
    (c) => {
      const { nullclines } = run(c);
      for (const i of [0, 1]) {
        const j = 1 - i;
        const scale = gridScale(c.rhs, c.window, j);
        for (const piece of nullclines[i].pieces) {
          expect(piece.otherState).toBe(j === 0 ? "x" : "y");
          const expected =
            piece.otherDirection === "increasing" ? 1 : piece.otherDirection === "decreasing" ? -1 : 0;
          const inner = piece.points.filter(
            (_, k) =>
              (k > 0 || piece.ends[0].kind !== "equilibrium") &&
              (k < piece.points.length - 1 || piece.ends[1].kind !== "equilibrium"),
          );
          for (const [x, y] of inner) {
            const v = c.rhs(x, y)[j];
            if (Math.abs(v) > 1e-12 * scale) expect(Math.sign(v)).toBe(expected);
          }
        }
      }
    },
  );

  it("findNullclines(competition) labels the pieces as worked out by hand", () => {
    // on x = 0, y' = y(2 - y): up below (0, 2), down above; on y = 0, x' = x(3 - x): right below (3, 0)
    const [nx, ny] = run(competition).nullclines;
    const summary = (n: NullclineResult) =>
      n.pieces.map((p) => [p.points[0], p.points[p.points.length - 1], p.otherDirection]);
    const near = (v: unknown) =>
      JSON.parse(JSON.stringify(v, (_, x) => (typeof x === "number" ? Math.round(x * 1e9) / 1e9 : x)));
    expect(near(summary(nx))).toEqual([
      [[0, 0], [0, 2], "increasing"],
      [[0, 2], [0, 4], "decreasing"],
      [[0, 1.5], [1, 1], "increasing"],
      [[1, 1], [3, 0], "decreasing"],
    ]);
    expect(near(summary(ny))).toEqual([
      [[0, 0], [3, 0], "increasing"],
      [[3, 0], [4, 0], "decreasing"],
      [[0, 2], [1, 1], "decreasing"],
      [[1, 1], [2, 0], "increasing"],
    ]);
  });

  it("findNullclines(competition, no equilibria) still splits where the other component changes sign, and warns", () => {
    const model = modelOf(competition.equations, competition.window);
    const diagnostics: Diagnostic[] = [];
    const [nx] = findNullclines(model, [], DEFAULT_NULLCLINE_OPTIONS, diagnostics);
    expect(nx.pieces).toHaveLength(4);
    const cuts = nx.pieces
      .flatMap((p) => [p.ends[0].kind === "interior" ? p.points[0] : null])
      .filter((p) => p !== null);
    expect(cuts.map(([x, y]) => [Math.round(x * 1e6) / 1e6, Math.round(y * 1e6) / 1e6])).toEqual([
      [0, 2],
      [1, 1],
    ]);
    expect(diagnostics.filter((d) => d.severity === "warning" && d.stage === "nullclines")).toHaveLength(4);
  });

  it("findNullclines orders curves by first point and starts each open curve at its smaller end", () => {
    for (const c of cases) {
      for (const n of run(c).nullclines) {
        const curves = [...new Set(n.pieces.map((p) => p.curve))];
        expect(curves).toEqual(curves.map((_, k) => k));
        const firsts = curves.map((b) => n.pieces.find((p) => p.curve === b)!.points[0]);
        const notAfter = (p: number[], q: number[]) => p[0] < q[0] || (p[0] === q[0] && p[1] <= q[1]);
        for (let k = 1; k < firsts.length; k++) expect(notAfter(firsts[k - 1], firsts[k])).toBe(true);
        for (const b of curves) {
          const own = n.pieces.filter((p) => p.curve === b);
          const last = own[own.length - 1].points;
          expect(notAfter(own[0].points[0], last[last.length - 1])).toBe(true);
        }
      }
    }
  });

  it("findNullclines(hole) stops the curve y = √x where the model is undefined (x < 0)", () => {
    // sqrt(x) is NaN for x < 0: those samples are holes (common practice, as in d3-contour)
    const model = modelOf({ x: "y - sqrt(x)", y: "x - 0.5" }, { x: [-1, 1], y: [-1, 1.5] });
    const [nx] = findNullclines(model, findEquilibria(model));
    const points = vertices(nx);
    for (const [x, y] of points) {
      expect(x).toBeGreaterThanOrEqual(0);
      expect(Math.abs(y - Math.sqrt(x))).toBeLessThan(1e-12);
    }
    expect(nx.pieces[0].ends[0]).toEqual({ kind: "hole" });
    expect(nx.pieces[0].points[0]).toEqual([0, 0]);
  });

  it("findNullclines(interior axis) emits x = 0 inside the window as a straight branch", () => {
    const model = modelOf({ x: "x*(1 - x^2 - y^2)", y: "y - x/2" }, { x: [-2, 2], y: [-2, 2] });
    const [nx] = findNullclines(model, findEquilibria(model));
    const axis = nx.pieces.filter((p) => p.onAxis);
    expect(
      axis.every((p) => p.axis?.state === "x" && p.axis.value === 0 && p.points.every(([x]) => x === 0)),
    ).toBe(true);
    const ys = axis.flatMap((p) => p.points.map(([, y]) => y));
    expect([Math.min(...ys), Math.max(...ys)]).toEqual([-2, 2]);
    for (const [x, y] of vertices(nx, (p) => !p.onAxis))
      expect(Math.abs(x * x + y * y - 1)).toBeLessThan(1e-12);
  });

  it("findNullclines(thin window) does not cut a curve at an equilibrium it only passes near", () => {
    // x' = x(1 - x - 0.2y): the curve y = 5(1 - x) runs 5e-6 of the window above the equilibrium (0, 0),
    // well inside one grid cell, but it does not go through it (elementary algebra, common practice)
    const model = modelOf({ x: "x*(1 - x - 0.2*y)", y: "y*(x - 0.4)" }, { x: [0, 1e-3], y: [0, 1e6] });
    const [nx] = findNullclines(model, findEquilibria(model));
    const curve = nx.pieces.filter((p) => !p.onAxis);
    expect(curve).toHaveLength(1);
    expect(curve[0].ends.map((e) => e.kind)).toEqual(["window-edge", "window-edge"]);
    for (const [x, y] of curve[0].points) expect(Math.abs(y - 5 * (1 - x))).toBeLessThan(1e-9);
  });

  it("findNullclines(pole) does not take a sign change across a pole for a nullcline", () => {
    // x' = 1/(x - 0.51) + y has no zero in [0, 1]^2: y = 1/(0.51 - x) is ≥ 1.96 for x < 0.51 and < 0 beyond
    const model = modelOf({ x: "1/(x - 0.51) + y", y: "x - y" }, { x: [0, 1], y: [0, 1] });
    const diagnostics: Diagnostic[] = [];
    const [nx] = findNullclines(model, [], DEFAULT_NULLCLINE_OPTIONS, diagnostics);
    expect(nx.pieces).toEqual([]);
    expect(
      diagnostics.some((d) => d.stage === "nullclines" && d.code === "nullcline-non-zeros-omitted"),
    ).toBe(true);
  });

  it("findNullclines(x' = 0) warns instead of calling the whole window a nullcline", () => {
    const model = modelOf({ x: "0*x", y: "x - y" }, { x: [0, 1], y: [0, 1] });
    const diagnostics: Diagnostic[] = [];
    const [nx, ny] = findNullclines(model, [], DEFAULT_NULLCLINE_OPTIONS, diagnostics);
    expect(nx.pieces).toEqual([]);
    expect(diagnostics.filter((d) => d.severity === "warning" && d.code === "nullcline-absent")).toHaveLength(
      1,
    );
    // y' = x - y still has its nullcline, the diagonal from corner to corner
    for (const [x, y] of vertices(ny)) expect(x).toBe(y);
  });

  it("findNullclines(competition) is deterministic, JSON-clean and leaves its input alone", () => {
    const model = modelOf(competition.equations, competition.window);
    const equilibria = findEquilibria(model);
    const before = JSON.stringify(equilibria);
    const a = findNullclines(model, equilibria);
    const b = findNullclines(model, equilibria);
    expect(JSON.stringify(a)).toBe(JSON.stringify(b));
    expect(JSON.parse(JSON.stringify(a))).toEqual(a);
    expect(JSON.stringify(equilibria)).toBe(before);
  });
});

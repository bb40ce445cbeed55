import { describe, expect, it } from "vitest";
import type { Results, SeparatrixResult } from "../../../src/analysis/types.js";
import { exampleField, exampleSpecText } from "../../fixtures/examples.js";
import { COARSE_BASINS, fixtureSpec, runOrThrow } from "../../fixtures/models.js";
import { integrateRk4 as rk4, type Field } from "../../fixtures/reference-integrators.js";

/**
 * Offset to either side of a separatrix, as a fraction of the window: far above the path's error (~1e-9),
 * small enough to stay beside it.
 */
const SIDE_OFFSET = 1e-3;
/** Points checked along each branch, spread evenly by arc length over its part inside the window. */
const CHECKS_PER_BRANCH = 8;
/** A check point keeps this scaled distance from every equilibrium, where sides are ill-defined. */
const KEEP_AWAY = 0.02;
/** Fewer clear points than this means the branch was not really tested. */
const MIN_CHECKS = 5;
/** Arrived: within this scaled distance of the attractor. */
const ARRIVED = 1e-4;

interface Attractor {
  id: string;
  point: [number, number];
}
/** A field written by hand, keel's results for it, and how long RK4 runs to settle on an attractor. */
interface Flow {
  f: Field;
  results: Results;
  attractors: Attractor[];
  settleTime: number;
  step: number;
}

function scales(results: Results) {
  const names = results.model.states;
  const lo = names.map((n) => results.model.window[n][0]);
  const hi = names.map((n) => results.model.window[n][1]);
  return {
    lo,
    hi,
    width: names.map((_, k) => hi[k] - lo[k]),
    equilibria: results.equilibria.map((e) => names.map((n) => e.point[n])),
  };
}

/** Where a point ends under RK4: the id of the attractor it reaches (scaled distance), else "none". */
function destination(m: Flow, start: [number, number]): string {
  const { width } = scales(m.results);
  const end = rk4(m.f, start, m.settleTime, m.step);
  const hit = m.attractors.find(
    (a) => Math.hypot((end[0] - a.point[0]) / width[0], (end[1] - a.point[1]) / width[1]) < ARRIVED,
  );
  return hit?.id ?? "none";
}

/**
 * Points on a stable-manifold branch spread by arc length over its part inside the window: the
 * step point before each target, carried on along the branch by RK4 in backward time for the
 * matching fraction of that step, so the checks do not depend on how long keel's steps are.
 */
function pointsAlong(sep: SeparatrixResult, m: Flow): [number, number][] {
  const { lo, hi, width, equilibria } = scales(m.results);
  const { t, x, y } = sep.path;
  const inside = (p: number[]) =>
    p.every((v, k) => v > lo[k] + 2 * SIDE_OFFSET * width[k] && v < hi[k] - 2 * SIDE_OFFSET * width[k]);
  let last = 0;
  while (last + 1 < x.length && inside([x[last + 1], y[last + 1]])) last++;
  const length = [0];
  for (let i = 1; i <= last; i++)
    length.push(length[i - 1] + Math.hypot((x[i] - x[i - 1]) / width[0], (y[i] - y[i - 1]) / width[1]));
  const out: [number, number][] = [];
  for (let k = 0; k < CHECKS_PER_BRANCH; k++) {
    const target = ((k + 0.5) / CHECKS_PER_BRANCH) * length[last];
    let i = 0;
    while (i + 1 < last && length[i + 1] < target) i++;
    const w = (target - length[i]) / (length[i + 1] - length[i]);
    const p = rk4(m.f, [x[i], y[i]], w * (t[i + 1] - t[i]), m.step / 10, -1);
    const clear = equilibria.every(
      (e) => Math.hypot((p[0] - e[0]) / width[0], (p[1] - e[1]) / width[1]) > KEEP_AWAY,
    );
    if (clear && inside(p)) out.push(p);
  }
  return out;
}

/**
 * For points spread along a stable-manifold branch, the destinations of the two points offset to
 * the left and to the right of the flow there (the manifold is an orbit, so the field is its
 * tangent), in window-scaled coordinates; `normal` points to the left.
 */
function sidesAlong(sep: SeparatrixResult, m: Flow): { left: string; right: string; normal: number[] }[] {
  const { width } = scales(m.results);
  const points = pointsAlong(sep, m);
  expect(points.length, `${sep.saddle} ${sep.manifold} ${sep.side}`).toBeGreaterThanOrEqual(MIN_CHECKS);
  return points.map((p) => {
    const v = m.f(p[0], p[1]);
    const t0 = v[0] / width[0],
      t1 = v[1] / width[1];
    const n = Math.hypot(t0, t1);
    const normal = [-t1 / n, t0 / n];
    const side = (s: number): [number, number] => [
      p[0] + s * SIDE_OFFSET * normal[0] * width[0],
      p[1] + s * SIDE_OFFSET * normal[1] * width[1],
    ];
    return { left: destination(m, side(1)), right: destination(m, side(-1)), normal };
  });
}

/** Results with a coarse basin map, which is not under test here. */
const run = (text: string): Results =>
  runOrThrow(JSON.stringify({ ...JSON.parse(text), analysis: COARSE_BASINS })).results;

const attractorsOf = (results: Results): Attractor[] =>
  results.equilibria
    .filter((e) => e.stable === true)
    .map((e) => ({ id: e.id, point: [e.point[results.model.states[0]], e.point[results.model.states[1]]] }));

describe("findSeparatrices(competition)", () => {
  // Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4 (rabbits versus sheep): the stable
  // manifold of the saddle (1, 1) separates the basins of the stable nodes (0, 2) and (3, 0); in
  // backward time it comes from the unstable node (0, 0) and from outside the window.
  const f: Field = (x, y) => [x * (3 - x - 2 * y), y * (2 - x - y)];
  const results = run(
    JSON.stringify(
      fixtureSpec({
        equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
        window: { x: [0, 4], y: [0, 4] },
      }),
    ),
  );
  const id = (x: number, y: number) =>
    results.equilibria.find((e) => Math.abs(e.point.x - x) < 1e-9 && Math.abs(e.point.y - y) < 1e-9)!.id;
  const saddle = id(1, 1);
  const ofSaddle = (manifold: "stable" | "unstable") =>
    results.separatrices.filter((s) => s.saddle === saddle && s.manifold === manifold);

  it("findSeparatrices(competition) gives two branches of each manifold of the one saddle", () => {
    expect(results.separatrices.map((s) => [s.saddle, s.manifold, s.side])).toEqual([
      [saddle, "stable", 1],
      [saddle, "stable", -1],
      [saddle, "unstable", 1],
      [saddle, "unstable", -1],
    ]);
    // every drawn curve starts at the saddle itself
    const at = results.equilibria.find((e) => e.id === saddle)!.point;
    for (const s of results.separatrices) expect([s.path.x[0], s.path.y[0]]).toEqual([at.x, at.y]);
  });

  it("findSeparatrices(competition) ends the stable branches at the window edge and at the unstable node (0, 0)", () => {
    const ends = ofSaddle("stable").map((s) => s.fate);
    expect(ends.map((e) => e.kind).sort()).toEqual(["equilibrium", "left-window"]);
    expect(ends.find((e) => e.kind === "equilibrium")).toEqual({ kind: "equilibrium", target: id(0, 0) });
    const edge = ends.find((e) => e.kind === "left-window");
    // the branch going up and right leaves through x = 4 or y = 4
    expect(
      edge &&
        edge.kind === "left-window" &&
        [JSON.stringify({ state: "x", value: 4 }), JSON.stringify({ state: "y", value: 4 })].includes(
          JSON.stringify(edge.edge),
        ),
    ).toBe(true);
  });

  it("findSeparatrices(competition) ends the unstable branches at the stable nodes (0, 2) and (3, 0)", () => {
    expect(
      ofSaddle("unstable")
        .map((s) => s.fate)
        .sort((a, b) => JSON.stringify(a).localeCompare(JSON.stringify(b))),
    ).toEqual([
      { kind: "equilibrium", target: id(0, 2) },
      { kind: "equilibrium", target: id(3, 0) },
    ]);
  });

  it("findSeparatrices(competition) stable manifold separates the basins of (0, 2) and (3, 0) all along it", () => {
    for (const branch of ofSaddle("stable")) {
      for (const { left, right, normal } of sidesAlong(branch, {
        f,
        results,
        attractors: attractorsOf(results),
        settleTime: 60,
        step: 0.01,
      })) {
        // the curve runs up and to the right: the side of more sheep (y), up and left, goes to (0, 2)
        const [upperLeft, lowerRight] = normal[1] - normal[0] > 0 ? [left, right] : [right, left];
        expect({ upperLeft, lowerRight }).toEqual({ upperLeft: id(0, 2), lowerRight: id(3, 0) });
      }
    }
  });
});

describe("findSeparatrices on the example specs", () => {
  // common practice: a saddle's stable manifold, where it has attractors on both sides, bounds their basins
  const results = run(exampleSpecText("grazer-forage"));
  // the grazer–forage equations of the spec, written out by hand
  const f = exampleField("grazer-forage");

  it("findSeparatrices(grazer-forage) interior saddle's stable manifold separates the two stable states", () => {
    const interior = results.equilibria.find((e) => e.type === "saddle" && !e.onBoundary)!;
    const attractors = attractorsOf(results);
    expect(attractors).toHaveLength(2);
    const branches = results.separatrices.filter((s) => s.saddle === interior.id && s.manifold === "stable");
    expect(branches).toHaveLength(2);
    for (const branch of branches) {
      // the slower focus (decay rate 0.13 per year) needs a longer settling time
      const sides = sidesAlong(branch, { f, results, attractors, settleTime: 300, step: 0.02 });
      const left = new Set(sides.map((s) => s.left));
      const right = new Set(sides.map((s) => s.right));
      expect(left.size, `branch ${branch.side}`).toBe(1);
      expect(right.size, `branch ${branch.side}`).toBe(1);
      expect([...left, ...right].sort()).toEqual(attractors.map((a) => a.id).sort());
    }
    // and the unstable branches fall one into each
    expect(
      results.separatrices
        .filter((s) => s.saddle === interior.id && s.manifold === "unstable")
        .map((s) => s.fate.kind === "equilibrium" && s.fate.target)
        .sort(),
    ).toEqual(attractors.map((a) => a.id).sort());
  });
});

import { expm, matrix, multiply } from "mathjs";
import { describe, expect, it } from "vitest";
import type { Results, ScenarioResult } from "../../../src/analysis/types.js";
import { runPipeline } from "../../../src/pipeline.js";
import { exampleSpec } from "../../fixtures/examples.js";
import {
  analyzeFixture,
  COARSE_BASINS,
  type FixtureScenario as Scenario,
  type ModelFixture,
} from "../../fixtures/models.js";

/** Step points of a 1e-9 relative integration (keel's default) hold about nine digits; 1e-7 leaves two. */
const CLOSED_FORM_REL_TOL = 1e-7;
/**
 * x' = x² blows up at t* = 1/x0; keel calls it at 1e6 window widths (x ≈ 1e7), where
 * t* − t = 1/x ≈ 1e-7, so the reported time sits within 1e-6 of t*.
 */
const BLOWUP_TIME_TOL = 1e-6;
/** A window exit is located by bisection on the dense output, past a slack of 1e-9 of the width. */
const EXIT_TIME_TOL = 1e-7;

function analyzeExample(file: string, extraScenarios: Scenario[] = []): Results {
  const spec = exampleSpec(file.replace(/\.json$/, ""));
  spec.scenarios.push(...extraScenarios);
  // no parameter studies: trajectories are under test, and the studies would only cost time
  spec.analysis = { ...COARSE_BASINS, parameters: [] };
  const out = runPipeline(JSON.stringify(spec));
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return out.value.results;
}

/** Worst |computed − exact| / scale(exact) over the points of a path or series. */
function worstError(
  path: ScenarioResult["path"],
  exact: (t: number) => [number, number],
  scale: (v: [number, number]) => [number, number],
): number {
  let worst = 0;
  path.t.forEach((t, i) => {
    const e = exact(t);
    const s = scale(e);
    worst = Math.max(worst, Math.abs(path.x[i] - e[0]) / s[0], Math.abs(path.y[i] - e[1]) / s[1]);
  });
  return worst;
}

function equilibriumAt(results: Results, point: Record<string, number>): string {
  const found = results.equilibria.find((e) =>
    Object.entries(point).every(([k, v]) => Math.abs(e.point[k] - v) < 1e-9 * Math.max(1, Math.abs(v))),
  );
  if (!found) throw new Error(`no equilibrium at ${JSON.stringify(point)}`);
  return found.id;
}

describe("scenario trajectories against closed forms", () => {
  // Logistic growth, x(t) = K x0 e^{rt} / (K + x0 (e^{rt} − 1)) (Murray, Mathematical Biology I,
  // 3rd ed., section 1.1); y' = −y decays as y0 e^{−t}.
  const r = 0.8,
    K = 5,
    x0 = 0.1,
    y0 = 0.5;
  const logistic = analyzeFixture(
    { equations: { x: "r*x*(1 - x/K)", y: "-y" }, parameters: { r, K }, window: { x: [0, 6], y: [-1, 1] } },
    [{ name: "growth", initial: { x: x0, y: y0 }, horizon: 60 }],
  );
  const logisticExact = (t: number): [number, number] => [
    (K * x0 * Math.exp(r * t)) / (K + x0 * (Math.exp(r * t) - 1)),
    y0 * Math.exp(-t),
  ];

  it("integrateScenarios(logistic) follows the closed form along its path and series to 1e-7 relative", () => {
    const sc = logistic.scenarios[0];
    expect(sc.path.t.length).toBeGreaterThan(5);
    expect(sc.series.t.length).toBe(401);
    // relative, floored at 1e-3 of the window: y decays to ~1e-26 by the horizon, where only the absolute
    // tolerance applies
    const relative = (v: [number, number]): [number, number] => [
      Math.max(Math.abs(v[0]), 6e-3),
      Math.max(Math.abs(v[1]), 2e-3),
    ];
    expect(worstError(sc.path, logisticExact, relative)).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    expect(worstError(sc.series, logisticExact, relative)).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
  });

  it("integrateScenarios(logistic) converges to (K, 0) with a linear approach", () => {
    const fate = logistic.scenarios[0].fate;
    expect(fate).toMatchObject({
      kind: "equilibrium",
      target: equilibriumAt(logistic, { x: K, y: 0 }),
      approach: "linear",
    });
    expect(logistic.equilibria.find((e) => e.point.x === K)?.type).toBe("stable-node");
  });

  // y' = A y has the solution e^{At} y0 (Hirsch, Smale and Devaney, Differential Equations,
  // Dynamical Systems, and an Introduction to Chaos, 3rd ed., chapter 3); e^{At} from mathjs expm.
  const linearCases = [
    {
      name: "focus",
      A: [
        [-0.3, 2],
        [-2, -0.3],
      ],
      start: [1.5, -1],
      type: "stable-focus",
    },
    // start near the stable direction (1, −(1 + √7)/2) so the path passes the saddle before leaving
    {
      name: "saddle",
      A: [
        [1, 2],
        [3, -1],
      ],
      start: [0.5, -0.9],
      type: "saddle",
    },
  ];
  for (const { name, A, start, type } of linearCases) {
    const window = { x: [-2, 2], y: [-2, 2] } as Record<string, [number, number]>;
    const results = analyzeFixture(
      { equations: { x: `${A[0][0]}*x + ${A[0][1]}*y`, y: `${A[1][0]}*x + ${A[1][1]}*y` }, window },
      [{ name, initial: { x: start[0], y: start[1] }, horizon: 50 }],
    );
    const exact = (t: number) =>
      multiply(expm(matrix(A.map((row) => row.map((a) => a * t)))), start).toArray() as [number, number];
    const ofWindow = (): [number, number] => [4, 4];

    it(`integrateScenarios(linear ${name}) equals e^{At} x0 (mathjs expm) to 1e-7 of the window`, () => {
      const sc = results.scenarios[0];
      expect(results.equilibria.map((e) => e.type)).toEqual([type]);
      // inside the window only: beyond it the state grows without bound and only relative error is meaningful
      const inside = (p: ScenarioResult["path"]) => {
        const keep = p.t.map((_, i) => i).filter((i) => Math.abs(p.x[i]) <= 2 && Math.abs(p.y[i]) <= 2);
        return { t: keep.map((i) => p.t[i]), x: keep.map((i) => p.x[i]), y: keep.map((i) => p.y[i]) };
      };
      expect(inside(sc.path).t.length).toBeGreaterThan(5);
      expect(worstError(inside(sc.path), exact, ofWindow)).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
      expect(worstError(inside(sc.series), exact, ofWindow)).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    });
  }

  it("integrateScenarios(linear saddle) calls the exponential escape left-window, not blow-up", () => {
    // solutions of a linear system exist for all time (Hirsch, Smale and Devaney, 3rd ed., chapter 3),
    // so growing past any bound is not a finite-time blow-up
    const results = analyzeFixture(
      { equations: { x: "x + 2*y", y: "3*x - y" }, window: { x: [-2, 2], y: [-2, 2] } },
      [{ name: "escape", initial: { x: 1, y: -0.9 }, horizon: 50 }],
    );
    const sc = results.scenarios[0];
    expect(sc.fate.kind).toBe("left-window");
    // the run did go on far past the window, where the old rule (distance alone) called it a blow-up
    expect(Math.abs(sc.end.x)).toBeGreaterThan(1e6 * 4);
    expect(sc.fate).toMatchObject({ t: sc.exit!.t, edge: sc.exit!.edge });
  });

  // x' = x² has x(t) = x0 / (1 − x0 t), which blows up at t = 1/x0 and crosses x = 10 at
  // t = 1/x0 − 1/10 (closed form, solved by hand; common textbook fact).
  for (const xStart of [1, 2]) {
    it(`integrateScenarios(x' = x^2 from ${xStart}) blows up at t = 1/x0 after leaving through x = 10 at 1/x0 - 1/10`, () => {
      const results = analyzeFixture(
        { equations: { x: "x^2", y: "-y" }, window: { x: [0, 10], y: [0, 10] } },
        [{ name: "blow-up", initial: { x: xStart, y: 0.5 }, horizon: 10 }],
      );
      const sc = results.scenarios[0];
      expect(sc.fate.kind).toBe("blow-up");
      expect(Math.abs(sc.fate.t - 1 / xStart)).toBeLessThanOrEqual(BLOWUP_TIME_TOL);
      expect(sc.exit).not.toBeNull();
      expect(sc.exit!.edge).toEqual({ state: "x", value: 10 });
      expect(Math.abs(sc.exit!.t - (1 / xStart - 1 / 10))).toBeLessThanOrEqual(EXIT_TIME_TOL);
      expect(Math.abs(sc.exit!.point.y - 0.5 * Math.exp(-sc.exit!.t))).toBeLessThanOrEqual(EXIT_TIME_TOL);
      // below the window edge the path still follows the closed form
      const exact = (t: number): [number, number] => [xStart / (1 - xStart * t), 0.5 * Math.exp(-t)];
      const keep = sc.path.t.map((_, i) => i).filter((i) => sc.path.x[i] <= 10);
      const inside = {
        t: keep.map((i) => sc.path.t[i]),
        x: keep.map((i) => sc.path.x[i]),
        y: keep.map((i) => sc.path.y[i]),
      };
      expect(worstError(inside, exact, (v) => [Math.abs(v[0]), Math.abs(v[1])])).toBeLessThanOrEqual(
        CLOSED_FORM_REL_TOL,
      );
    });
  }

  it("integrateScenarios(x' = 1, y' = 0 from (0.2, 0.5)) leaves the unit square through x = 1 at t = 0.8", () => {
    // closed form x = 0.2 + t (common practice)
    const results = analyzeFixture({ equations: { x: "1", y: "0" }, window: { x: [0, 1], y: [0, 1] } }, [
      { name: "drift", initial: { x: 0.2, y: 0.5 }, horizon: 5 },
    ]);
    const fate = results.scenarios[0].fate;
    expect(fate.kind).toBe("left-window");
    if (fate.kind !== "left-window") return;
    expect(fate.edge).toEqual({ state: "x", value: 1 });
    expect(Math.abs(fate.t - 0.8)).toBeLessThanOrEqual(EXIT_TIME_TOL);
    expect(Math.abs(fate.point.x - 1)).toBeLessThanOrEqual(EXIT_TIME_TOL);
    expect(Math.abs(fate.point.y - 0.5)).toBeLessThanOrEqual(EXIT_TIME_TOL);
  });

  // x' = −x³ has x(t) = x0 / sqrt(1 + 2 x0² t) (closed form, solved by hand): the approach to the
  // non-hyperbolic origin is algebraic, so no finite horizon reaches a linear capture region.
  it("integrateScenarios(x' = -x^3, y' = -y) converges to the origin algebraically, long before the horizon", () => {
    const horizon = 1e4;
    const results = analyzeFixture(
      { equations: { x: "-x^3", y: "-y" }, window: { x: [-1, 1], y: [-1, 1] } },
      [{ name: "slow", initial: { x: 0.8, y: 0.5 }, horizon }],
    );
    const sc = results.scenarios[0];
    expect(results.equilibria.map((e) => e.type)).toEqual(["non-hyperbolic"]);
    expect(sc.fate).toMatchObject({
      kind: "equilibrium",
      target: equilibriumAt(results, { x: 0, y: 0 }),
      approach: "algebraic",
    });
    expect(sc.fate.t).toBeLessThan(horizon / 10);
    const exact = (t: number): [number, number] => [0.8 / Math.sqrt(1 + 2 * 0.64 * t), 0.5 * Math.exp(-t)];
    // x relative; y, which decays to 1e-10 where the absolute tolerance takes over, relative to the window
    expect(worstError(sc.path, exact, (v) => [Math.abs(v[0]), 2])).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
  });
});

describe("scenario fates that cannot be decided", () => {
  // common practice: a right-hand side that turns NaN (log or square root of a negative state)
  // ends the trajectory with a reason, never an exception
  const cases: {
    name: string;
    equations: Record<string, string>;
    window: Record<string, [number, number]>;
    start: Record<string, number>;
  }[] = [
    {
      name: "log",
      equations: { x: "log(x)", y: "-y" },
      window: { x: [0, 3], y: [-1, 1] },
      start: { x: 0.5, y: 0.5 },
    },
    {
      name: "sqrt",
      equations: { x: "-sqrt(x)", y: "-y" },
      window: { x: [-1, 3], y: [-1, 1] },
      start: { x: 1, y: 0.5 },
    },
  ];
  for (const c of cases) {
    it(`integrateScenarios(x' = ${c.equations.x}) reports a non-finite right-hand side as undecided`, () => {
      // x' = log x reaches x = 0 in finite time (t = ∫ dx / |log x| ≈ 0.29); x' = −√x at t = 2
      const results = analyzeFixture({ equations: c.equations, window: c.window }, [
        { name: c.name, initial: c.start, horizon: 10 },
      ]);
      const fate = results.scenarios[0].fate;
      expect(fate.kind).toBe("undecided");
      if (fate.kind === "undecided") expect(fate.reason).toBe("non-finite-rhs");
      expect(fate.t).toBeLessThan(2.001);
      expect(Number.isFinite(results.scenarios[0].end.x)).toBe(true);
    });
  }
});

describe("scenario trajectories on the example specs", () => {
  it("integrateScenarios(grazer-forage from (300, 0)) ends at the saddle (K, 0) along its stable manifold", () => {
    // on the invariant axis G = 0 the forage grows logistically to K = 800 (Murray, Mathematical
    // Biology I, 3rd ed., section 1.1), and (K, 0) is a saddle whose stable manifold is that axis
    const results = analyzeExample("grazer-forage.json", [
      { name: "no grazers", initial: { V: 300, G: 0 }, horizon: 100 },
    ]);
    const target = equilibriumAt(results, { V: 800, G: 0 });
    expect(results.equilibria.find((e) => e.id === target)?.type).toBe("saddle");
    const sc = results.scenarios.find((s) => s.name === "no grazers")!;
    expect(sc.fate).toMatchObject({ kind: "equilibrium", target, approach: "stable-manifold" });
    expect(sc.path.y.every((g) => g === 0)).toBe(true);
  });

  it("runPipeline twice on the same spec gives deep-equal results (determinism)", () => {
    // common practice: the same spec must give identical results, cycles and separatrices included
    const vanDerPol: ModelFixture = {
      equations: { x: "y", y: "mu*(1 - x^2)*y - x" },
      parameters: { mu: 1 },
      window: { x: [-3, 3], y: [-4, 4] },
    };
    const scenario = [{ name: "inside", initial: { x: 0.5, y: 0 }, horizon: 100 }];
    const first = analyzeFixture(vanDerPol, scenario);
    expect(first.cycles.length).toBeGreaterThan(0);
    expect(analyzeFixture(vanDerPol, scenario)).toEqual(first);
    const grazer = analyzeExample("grazer-forage.json");
    expect(grazer.separatrices.length).toBeGreaterThan(0);
    expect(analyzeExample("grazer-forage.json")).toEqual(grazer);
  });
});

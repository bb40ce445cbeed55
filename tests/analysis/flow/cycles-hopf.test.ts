import { describe, expect, it } from "vitest";
import type { CycleResult, Results } from "../../../src/analysis/types.js";
import { solvePeriodicOrbit } from "../../../src/analysis/flow/cycles.js";
import { classifyOutcome } from "../../../src/analysis/parameters/outcomes.js";
import { windowOf } from "../../../src/analysis/numeric/window.js";
import { withParameters } from "../../../src/model/parameters.js";
import { compileModel } from "../../../src/model/compile.js";
import { parseSpecValue } from "../../../src/spec/parse.js";
import {
  analyzeFixture,
  buildModel,
  fixtureSpec,
  relative,
  type FixtureScenario,
  type ModelFixture,
} from "../../fixtures/models.js";
import { findScipyPython, runReference } from "../../fixtures/scipy.js";

/** Shooting reports the period and multiplier to ~1e-9; 1e-7 is the check's own precision. */
const CYCLE_REL_TOL = 1e-7;

/** A compiled fixture with scenarios (buildModel compiles none). */
function modelWithScenarios(fixture: ModelFixture, scenarios: FixtureScenario[]) {
  const spec = parseSpecValue({ ...fixtureSpec(fixture), scenarios });
  if (!spec.ok) throw new Error(JSON.stringify(spec.issues));
  const model = compileModel(spec.value);
  if (!model.ok) throw new Error(JSON.stringify(model.issues));
  return model.value;
}

function onlyCycle(results: Results): CycleResult {
  expect(results.cycles.map((c) => c.stability)).toEqual(["stable"]);
  return results.cycles[0];
}

describe("a slowly damped linear focus has no periodic orbit", () => {
  // x' = −εx − ωy, y' = ωx − εy: eigenvalues −ε ± iω, every orbit a spiral r = r0 e^{−εt}
  // into the origin (closed form). The horizon ends mid-spiral: the recurrence seen there must
  // not be taken for a cycle, and the trajectory is followed on until it arrives.
  const eps = 0.005,
    omega = 1;
  const focus: ModelFixture = {
    equations: { x: "-eps*x - w*y", y: "w*x - eps*y" },
    parameters: { eps, w: omega },
    window: { x: [-1, 1], y: [-1, 1] },
  };
  const horizon = 40;
  const results = analyzeFixture(focus, [{ name: "spiral", initial: { x: 0.9, y: 0 }, horizon }]);

  it("findEquilibria(slow focus) has the closed-form eigenvalues −ε ± iω", () => {
    expect(results.equilibria).toHaveLength(1);
    const e = results.equilibria[0];
    expect(e.type).toBe("stable-focus");
    for (const ev of e.eigenvalues) {
      expect(Math.abs(ev.re + eps)).toBeLessThan(1e-12);
      expect(Math.abs(Math.abs(ev.im) - omega)).toBeLessThan(1e-12);
    }
  });

  it("analyze(slow focus) reports no cycle, and the scenario arrives at the focus after its horizon", () => {
    expect(results.cycles).toEqual([]);
    const fate = results.scenarios[0].fate;
    expect(fate).toMatchObject({ kind: "equilibrium", target: results.equilibria[0].id });
    expect(fate.t).toBeGreaterThan(horizon);
    // the path shown still ends at the horizon, on the closed-form spiral
    const sc = results.scenarios[0];
    expect(sc.tEnd).toBe(horizon);
    expect(relative(Math.hypot(sc.end.x, sc.end.y), 0.9 * Math.exp(-eps * horizon))).toBeLessThan(1e-7);
  });

  it("solvePeriodicOrbit(slow focus) rejects a recurrence as an equilibrium's neighbourhood", () => {
    const model = buildModel(focus);
    const period = (2 * Math.PI) / omega;
    const solved = solvePeriodicOrbit(
      model,
      windowOf(model),
      { around: "E1", sense: 1, point: [0.5, 0], period, t: 0 },
      [0, 0],
      1,
    );
    expect(solved).toEqual({ ok: false, reason: "equilibrium-neighbourhood" });
  });
});

describe("the Hopf normal form r' = r(μ − r²), θ' = ω", () => {
  // In Cartesian form x' = μx − ωy − x(x² + y²), y' = ωx + μy − y(x² + y²) (Strogatz, Nonlinear
  // Dynamics and Chaos, 2nd ed., section 8.2; Kuznetsov, Elements of Applied Bifurcation Theory,
  // 3rd ed., section 3.4; from memory). For μ > 0 the circle r = √μ is a stable cycle of period
  // 2π/ω; linearising r' about √μ gives ρ' = −2μρ, so the multiplier is exp(−2μ · 2π/ω). The
  // return map is closed form too: r(t)² = μ / (1 + (μ/r0² − 1) e^{−2μt}).
  const omega = 1;
  const normalForm = (mu: number): ModelFixture => ({
    equations: { x: "mu*x - w*y - x*(x^2 + y^2)", y: "w*x + mu*y - y*(x^2 + y^2)" },
    parameters: { mu, w: omega },
    window: { x: [-0.5, 0.5], y: [-0.5, 0.5] },
  });
  const scenarios = [
    { name: "inside", initial: { x: 0.02, y: 0 }, horizon: 200 },
    { name: "outside", initial: { x: 0.4, y: 0.1 }, horizon: 200 },
  ];
  const mu = 0.01;
  const above = analyzeFixture(normalForm(mu), scenarios);
  const below = analyzeFixture(normalForm(-mu), scenarios);
  const period = (2 * Math.PI) / omega;
  const returnRadius = (r0: number) =>
    Math.sqrt(mu / (1 + (mu / (r0 * r0) - 1) * Math.exp(-2 * mu * period)));

  it("analyze(μ = 0.01) finds one stable cycle of radius √μ, period 2π/ω and multiplier exp(−2μT)", () => {
    const cycle = onlyCycle(above);
    expect(relative(cycle.period, period)).toBeLessThan(CYCLE_REL_TOL);
    expect(relative(cycle.floquetMultiplier, Math.exp(-2 * mu * period))).toBeLessThan(CYCLE_REL_TOL);
    expect(relative(cycle.returnMapSlope, Math.exp(-2 * mu * period))).toBeLessThan(1e-5);
    for (const k of ["x", "y"]) {
      expect(relative(cycle.extent[k][1], Math.sqrt(mu))).toBeLessThan(CYCLE_REL_TOL);
      expect(relative(-cycle.extent[k][0], Math.sqrt(mu))).toBeLessThan(CYCLE_REL_TOL);
    }
    expect(above.scenarios.map((s) => s.fate)).toMatchObject([
      { kind: "cycle", target: cycle.id },
      { kind: "cycle", target: cycle.id },
    ]);
  });

  it("analyze(μ = 0.01) gives the cycle a capture on its section where the closed-form return map moves towards √μ", () => {
    const cycle = onlyCycle(above);
    expect(cycle.capture?.kind).toBe("attracting");
    const [lo, hi] = cycle.capture!.radii; // window width 1: scaled radius = radius
    expect(lo).toBeLessThan(0.01);
    expect(hi).toBeGreaterThan(0.25);
    // a circle of radius above 0.5 leaves the window; inside it every return closes in on √μ
    expect(hi).toBeLessThanOrEqual(0.5);
    for (const r of [lo, (lo + Math.sqrt(mu)) / 2, (hi + Math.sqrt(mu)) / 2, hi]) {
      expect(Math.abs(returnRadius(r) - Math.sqrt(mu))).toBeLessThan(Math.abs(r - Math.sqrt(mu)));
    }
  });

  it("analyze(μ = −0.01) finds no cycle: both scenarios go to the focus", () => {
    expect(below.cycles).toEqual([]);
    expect(below.scenarios.map((s) => s.fate.kind)).toEqual(["equilibrium", "equilibrium"]);
  });

  it("classifyOutcome finds the cycle as the only attractor above μ = 0 and none below, with or without scenarios", () => {
    const model = buildModel(normalForm(mu));
    const j = model.parameterNames.indexOf("mu");
    for (const value of [-0.01, -0.002, 0.002, 0.01]) {
      const p = Float64Array.from(model.parameterValues);
      p[j] = value;
      for (const withScenarios of [false, true]) {
        const { attractors } = classifyOutcome(withParameters(model, p), withScenarios);
        expect(
          attractors.map((a) => a.kind),
          `mu = ${value}`,
        ).toEqual(value > 0 ? ["cycle"] : ["equilibrium"]);
      }
    }
  });
});

describe("the Rosenzweig–MacArthur predator–prey model beyond its Hopf point", () => {
  // x' = x(1 − x/K) − xy/(1 + x), y' = y(βx/(1 + x) − δ): the coexistence equilibrium has
  // x* = δ/(β − δ), y* = (1 − x*/K)(1 + x*), and there J22 = 0 and J11 = x*(−1/K + y*/(1 + x*)²),
  // which vanishes where 1 + x* = K − x*: the Hopf point K_H = 1 + 2x* (derived by hand here;
  // supercritical, the paradox of enrichment). Beyond it a stable cycle; its period is checked
  // against scipy's DOP853 by Poincaré section (tests/reference/poincare_period.py).
  const beta = 1,
    delta = 0.4;
  const xStar = delta / (beta - delta);
  const hopfK = 1 + 2 * xStar;
  const fixture = (K: number): ModelFixture => ({
    equations: { x: "x*(1 - x/K) - x*y/(1 + x)", y: "y*(b*x/(1 + x) - d)" },
    parameters: { K, b: beta, d: delta },
    window: { x: [0, 5], y: [0, 4] },
    bounds: { x: [0, 100], y: [0, 100] },
  });
  const K = 3;
  const results = analyzeFixture(fixture(K), [{ name: "start", initial: { x: 1, y: 1 }, horizon: 200 }]);

  it.skipIf(!findScipyPython())(
    "solvePeriodicOrbit(K = 3) has the period scipy's DOP853 measures on the same section",
    () => {
      const cycle = onlyCycle(results);
      const yStar = (1 - xStar / K) * (1 + xStar);
      const reference = runReference<{ periods: number[]; points: number[] }>("poincare_period.py", {
        rhs: ["x*(1 - x/K) - x*y/(1 + x)", "y*(b*x/(1 + x) - d)"],
        parameters: { K, b: beta, d: delta },
        start: [1, 1],
        section: [xStar, yStar],
        transient: 2000,
        span: 100,
      });
      expect(reference.periods.length).toBeGreaterThan(2);
      for (const p of reference.periods) expect(relative(cycle.period, p)).toBeLessThan(CYCLE_REL_TOL);
      // keel's section is the same ray, crossed with y increasing (J21 = βy*/(1 + x*)² > 0)
      expect(cycle.section.sense).toBe(1);
      expect(relative(cycle.section.point.x, reference.points[0])).toBeLessThan(CYCLE_REL_TOL);
      expect(results.scenarios[0].fate).toMatchObject({ kind: "cycle", target: cycle.id });
    },
  );

  it("classifyOutcome has one attractor either side of K_H: the equilibrium below, the cycle above", () => {
    const model = modelWithScenarios(fixture(K), [{ name: "start", initial: { x: 1, y: 1 }, horizon: 200 }]);
    const j = model.parameterNames.indexOf("K");
    for (const value of [2, 2.2, 2.3, 2.4, 3, 4]) {
      const p = Float64Array.from(model.parameterValues);
      p[j] = value;
      const { attractors, scenarios } = classifyOutcome(withParameters(model, p), true);
      expect(
        attractors.map((a) => a.kind),
        `K = ${value}`,
      ).toEqual(value > hopfK ? ["cycle"] : ["equilibrium"]);
      expect(scenarios[0].fate.kind, `K = ${value}`).toBe(value > hopfK ? "cycle" : "attractor");
    }
  });
});

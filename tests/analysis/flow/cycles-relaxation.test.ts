/**
 * A relaxation cycle that runs far outside the drawn window but inside the feasible region: the
 * trajectories reach it, so the cycle search must find it, at every parameter value near by.
 *
 * The model: the trimolecular reaction scheme u' = a − u + u²v, v' = b − u²v (J. Schnakenberg,
 * "Simple chemical reaction systems with limit cycle behaviour", J. Theor. Biol. 81 (1979)
 * 389–400, from memory), with invented values a = 0.04, b = 0.5. Its one equilibrium
 * (a + b, b/(a + b)²) is an unstable focus (trace −1 + 2b/(a + b) − (a + b)² > 0, closed form),
 * surrounded by a strongly attracting cycle whose spike in u passes twice the window's width.
 * The period is checked against successive section crossings of scipy's DOP853
 * (tests/reference/poincare_period.py), which shares no code with keel.
 */
import { describe, expect, it } from "vitest";
import { classifyOutcome } from "../../../src/analysis/parameters/outcomes.js";
import { withParameters } from "../../../src/model/parameters.js";
import { analyzeFixture, buildModel, relative, type ModelFixture } from "../../fixtures/models.js";
import { findScipyPython, runReference } from "../../fixtures/scipy.js";

const A = 0.04,
  B = 0.5;
const fixture = (a: number): ModelFixture => ({
  equations: { u: "a - u + u^2*v", v: "b - u^2*v" },
  parameters: { a, b: B },
  window: { u: [0, 4], v: [0, 7] },
  bounds: { u: [0, 40], v: [0, 70] },
});
/** The period from shooting is good to ~1e-9; scipy's crossings at rtol 1e-12 agree far closer than this. */
const PERIOD_REL_TOL = 1e-6;

describe.skipIf(findScipyPython() === null)(
  "a relaxation cycle beyond the window (Schnakenberg scheme)",
  () => {
    const results = analyzeFixture(fixture(A), [
      { name: "near-focus", initial: { u: 1, v: 0.5 }, horizon: 200 },
      { name: "high", initial: { u: 2.5, v: 4.5 }, horizon: 200 },
    ]);
    const ue = A + B,
      ve = B / (A + B) ** 2;
    const reference = runReference<{ periods: number[]; points: number[] }>("poincare_period.py", {
      // in (u, −v): the orbit turns clockwise in (u, v), so it crosses the ray to the right of the
      // focus with v falling, which the script's section (y rising) sees with y = −v
      rhs: ["a - x - x**2*y", "-b - x**2*y"],
      parameters: { a: A, b: B },
      start: [1, -0.5],
      section: [ue, -ve],
      transient: 400,
      span: 200,
    });

    it("findEquilibria finds the closed-form unstable focus (a + b, b/(a + b)²)", () => {
      expect(results.equilibria).toHaveLength(1);
      const e = results.equilibria[0];
      expect(e.type).toBe("unstable-focus");
      expect(relative(e.point.u, ue)).toBeLessThan(1e-12);
      expect(relative(e.point.v, ve)).toBeLessThan(1e-12);
      expect(e.trace).toBeGreaterThan(0);
      expect(relative(e.trace, -1 + (2 * B) / (A + B) - (A + B) ** 2)).toBeLessThan(1e-10);
    });

    it("analyze finds one stable cycle with scipy's period, reaching past the window by more than its width", () => {
      expect(results.cycles.map((c) => c.stability)).toEqual(["stable"]);
      const cycle = results.cycles[0];
      const periods = reference.periods;
      expect(periods.length).toBeGreaterThan(3);
      // settled: the crossings' periods agree among themselves
      expect(Math.max(...periods) - Math.min(...periods)).toBeLessThan(1e-8 * periods[0]);
      expect(relative(cycle.period, periods[periods.length - 1])).toBeLessThan(PERIOD_REL_TOL);
      expect(cycle.floquetMultiplier).toBeLessThan(1e-10);
      expect(cycle.extent.u[1]).toBeGreaterThan(4 + 4);
      expect(results.scenarios.map((s) => s.fate)).toMatchObject([
        { kind: "cycle", target: cycle.id },
        { kind: "cycle", target: cycle.id },
      ]);
    });

    it("classifyOutcome finds the same cycle as the only attractor at neighbouring values of a", () => {
      const model = buildModel(fixture(A));
      const j = model.parameterNames.indexOf("a");
      for (const value of [0.038, 0.0415, 0.041536, 0.045]) {
        const p = Float64Array.from(model.parameterValues);
        p[j] = value;
        const { attractors } = classifyOutcome(withParameters(model, p), false);
        expect(
          attractors.map((a) => a.kind),
          `a = ${value}`,
        ).toEqual(["cycle"]);
      }
    });
  },
);

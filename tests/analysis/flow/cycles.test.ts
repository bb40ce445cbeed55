import { describe, expect, it } from "vitest";
import type { CycleResult, Results } from "../../../src/analysis/types.js";
import { analyzeFixture, type ModelFixture } from "../../fixtures/models.js";
import { rk4Step, type Field, type Point } from "../../fixtures/reference-integrators.js";

/**
 * Scenario paths hold about nine digits (1e-9 relative steps); 1e-7 leaves two for drift over a few periods.
 */
const FIRST_INTEGRAL_REL_TOL = 1e-7;
/**
 * Shooting integrates at 1e-12 relative and reports the period to about 1e-9; 1e-6 is the check's own
 * precision.
 */
const PERIOD_REL_TOL = 1e-6;
/**
 * The Floquet multiplier (trace quadrature) and the return-map slope (central differences, h = 1e-6) are
 * independent estimates.
 */
const MULTIPLIER_REL_TOL = 1e-5;

function cycleOf(results: Results, scenario: number): CycleResult {
  const fate = results.scenarios[scenario].fate;
  expect(fate.kind).toBe("cycle");
  const cycle = results.cycles.find((c) => fate.kind === "cycle" && c.id === fate.target);
  if (!cycle) throw new Error(`scenario ${scenario} names no known cycle`);
  return cycle;
}

const relativeGap = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/**
 * Steps of the reference RK4 over one period for the trace integral: h ≈ 3e-4 on the van der Pol
 * cycle, where RK4's and composite Simpson's errors (both O(h⁴)) are far below MULTIPLIER_REL_TOL.
 */
const TRACE_STEPS = 20_000;

/**
 * The Floquet multiplier of a planar cycle as exp(∮ div f dt) over one period (Liouville's
 * formula; Perko, Differential Equations and Dynamical Systems, 3rd ed., section 3.4, from
 * memory): the reference RK4 carries the orbit and composite Simpson's rule the integral.
 */
function traceMultiplier(
  f: Field,
  divergence: (x: number, y: number) => number,
  start: Point,
  period: number,
): number {
  const h = period / TRACE_STEPS;
  let p = start;
  let sum = divergence(p[0], p[1]);
  for (let k = 1; k <= TRACE_STEPS; k++) {
    p = rk4Step(f, p, h);
    const weight = k === TRACE_STEPS ? 1 : k % 2 === 1 ? 4 : 2;
    sum += weight * divergence(p[0], p[1]);
  }
  return Math.exp((h / 3) * sum);
}

describe("solvePeriodicOrbit on the Lotka–Volterra predator–prey model", () => {
  // x' = a x − b x y, y' = c x y − d y conserves H = c x − d ln x + b y − a ln y, and every orbit
  // around the centre (d/c, a/b) is closed (Murray, Mathematical Biology I, 3rd ed., section 3.1).
  const p = { a: 1, b: 0.5, c: 0.25, d: 0.75 };
  const centre = { x: p.d / p.c, y: p.a / p.b };
  const H = (x: number, y: number) => p.c * x - p.d * Math.log(x) + p.b * y - p.a * Math.log(y);
  const lotkaVolterra: ModelFixture = {
    equations: { x: "a*x - b*x*y", y: "c*x*y - d*y" },
    parameters: p,
    window: { x: [0, 10], y: [0, 8] },
  };
  const offsets = [1.5, 0.1, 0.05];
  const results = analyzeFixture(
    lotkaVolterra,
    offsets.map((dx, k) => ({
      name: `orbit ${k + 1}`,
      initial: { x: centre.x + dx, y: centre.y },
      horizon: 100,
    })),
  );

  it("integrateScenarios(Lotka–Volterra) conserves the first integral H along each path to 1e-7 relative", () => {
    results.scenarios.forEach((sc) => {
      const h0 = H(sc.start.x, sc.start.y);
      expect(sc.path.t.length).toBeGreaterThan(10);
      for (const path of [sc.path, sc.series]) {
        const worst = Math.max(...path.x.map((x, i) => relativeGap(H(x, path.y[i]), h0)));
        expect(worst, sc.name).toBeLessThanOrEqual(FIRST_INTEGRAL_REL_TOL);
      }
    });
  });

  it("integrateScenarios(Lotka–Volterra) ends on a neutral cycle through the start, on its level set of H", () => {
    results.scenarios.forEach((sc, k) => {
      const cycle = cycleOf(results, k);
      expect(cycle.stability).toBe("neutral");
      expect(Math.abs(cycle.floquetMultiplier - 1)).toBeLessThanOrEqual(1e-6);
      const h0 = H(sc.start.x, sc.start.y);
      const worst = Math.max(...cycle.orbit.x.map((x, i) => relativeGap(H(x, cycle.orbit.y[i]), h0)));
      expect(worst, sc.name).toBeLessThanOrEqual(FIRST_INTEGRAL_REL_TOL);
    });
    // three orbits of one family, three distinct cycles
    expect(new Set(results.scenarios.map((s) => s.fate.kind === "cycle" && s.fate.target)).size).toBe(3);
  });

  it("solvePeriodicOrbit(Lotka–Volterra, small orbit) has period 2π/√(ad) in the small-amplitude limit", () => {
    // textbook linearisation at the centre: eigenvalues ±i√(ad), so the period tends to 2π/√(ad)
    // (Murray, 3rd ed., section 3.1); the correction is of second order in the amplitude
    const limit = (2 * Math.PI) / Math.sqrt(p.a * p.d);
    const gapWide = relativeGap(cycleOf(results, 1).period, limit);
    const gapNarrow = relativeGap(cycleOf(results, 2).period, limit);
    expect(gapNarrow).toBeLessThanOrEqual(1e-4);
    // halving the amplitude quarters the gap (second order)
    expect(gapWide / gapNarrow).toBeGreaterThan(3.5);
    expect(gapWide / gapNarrow).toBeLessThan(4.5);
    // a large orbit is slower than the linear limit
    expect(cycleOf(results, 0).period).toBeGreaterThan(limit * 1.01);
  });
});

describe("solvePeriodicOrbit on the van der Pol oscillator (mu = 1)", () => {
  // Period 6.663286859323 and amplitude max x = 2.00862 of the limit cycle at mu = 1: the
  // standard values of this reference problem, from memory.
  const PERIOD = 6.663286859323;
  const AMPLITUDE = 2.00862;
  const window = { x: [-3, 3], y: [-4, 4] } as Record<string, [number, number]>;
  const forward = analyzeFixture(
    { equations: { x: "y", y: "mu*(1 - x^2)*y - x" }, parameters: { mu: 1 }, window },
    [
      { name: "inside", initial: { x: 0.5, y: 0 }, horizon: 200 },
      { name: "outside", initial: { x: 2.5, y: 2 }, horizon: 200 },
    ],
  );
  // the same orbit with time reversed repels; keel finds it by integrating backward from around the stable
  // focus
  const reversed = analyzeFixture(
    { equations: { x: "-y", y: "-(mu*(1 - x^2)*y - x)" }, parameters: { mu: 1 }, window },
    [{ name: "inside", initial: { x: 0.5, y: 0 }, horizon: 200 }],
  );

  it("solvePeriodicOrbit(van der Pol) finds the stable limit cycle's published period and amplitude", () => {
    expect(forward.cycles).toHaveLength(1);
    const cycle = cycleOf(forward, 0);
    expect(cycleOf(forward, 1).id).toBe(cycle.id); // from outside too
    expect(cycle.stability).toBe("stable");
    expect(relativeGap(cycle.period, PERIOD)).toBeLessThanOrEqual(PERIOD_REL_TOL);
    // the published amplitude has six digits
    expect(Math.abs(cycle.extent.x[1] - AMPLITUDE)).toBeLessThanOrEqual(5e-6);
    expect(Math.abs(cycle.extent.x[0] + AMPLITUDE)).toBeLessThanOrEqual(5e-6); // the orbit is symmetric under (x, y) → (−x, −y)
  });

  it("solvePeriodicOrbit(van der Pol) has the Floquet multiplier exp(∮ μ(1 − x²) dt), and a return-map slope equal to it", () => {
    const cycle = forward.cycles[0];
    // the field and its divergence typed out by hand (mu = 1)
    const f: Field = (x, y) => [y, (1 - x * x) * y - x];
    const reference = traceMultiplier(f, (x) => 1 - x * x, [cycle.orbit.x[0], cycle.orbit.y[0]], PERIOD);
    expect(reference).toBeGreaterThan(0);
    expect(reference).toBeLessThan(1);
    expect(relativeGap(cycle.floquetMultiplier, reference)).toBeLessThanOrEqual(MULTIPLIER_REL_TOL);
    expect(relativeGap(cycle.returnMapSlope, reference)).toBeLessThanOrEqual(MULTIPLIER_REL_TOL);
  });

  it("solvePeriodicOrbit(time-reversed van der Pol) finds an unstable cycle with the same period", () => {
    expect(reversed.equilibria.map((e) => e.type)).toEqual(["stable-focus"]);
    expect(reversed.cycles).toHaveLength(1);
    const cycle = reversed.cycles[0];
    expect(cycle.stability).toBe("unstable");
    expect(relativeGap(cycle.period, PERIOD)).toBeLessThanOrEqual(PERIOD_REL_TOL);
    // reversing time inverts the multiplier (Liouville: the trace changes sign)
    expect(relativeGap(cycle.floquetMultiplier, 1 / forward.cycles[0].floquetMultiplier)).toBeLessThanOrEqual(
      MULTIPLIER_REL_TOL,
    );
    expect(relativeGap(cycle.returnMapSlope, cycle.floquetMultiplier)).toBeLessThanOrEqual(
      MULTIPLIER_REL_TOL,
    );
    // inside the unstable cycle, the scenario goes to the stable focus
    expect(reversed.scenarios[0].fate).toMatchObject({
      kind: "equilibrium",
      target: reversed.equilibria[0].id,
    });
  });
});

import { describe, expect, it } from "vitest";
import { findEquilibriumCandidates } from "../../../src/analysis/phase/equilibria.js";
import { findSingularities, type SingularityResult } from "../../../src/analysis/phase/singularities.js";
import { serializeResults } from "../../../src/report/archive/serialize.js";
import { buildModel, runOrThrow, fixtureSpec, type ModelFixture } from "../../fixtures/models.js";

/** Equilibria and singularities as analyze() finds them (step 1). */
function analyzeStep1(fixture: ModelFixture) {
  const model = buildModel(fixture);
  const { equilibria, singular } = findEquilibriumCandidates(model);
  return { model, equilibria, singularities: findSingularities(model, singular) };
}

const near = (p: Record<string, number>, q: Record<string, number>, tol: number) =>
  Object.keys(q).every((k) => Math.abs(p[k] - q[k]) <= tol);

const rayAlong = (s: SingularityResult, direction: Record<string, number>) =>
  s.rays.find((r) => Object.keys(direction).every((k) => r.direction[k] === direction[k]));

/**
 * A ratio-dependent predator–prey model (invented values): x' = x(1 − x) − a x y/(x + y),
 * y' = y(−d + b x/(x + y)). Ratio dependence after Arditi and Ginzburg, J. Theor. Biol. 139
 * (1989) 311–326; the origin's singular behaviour after Kuang and Beretta, J. Math. Biol. 36
 * (1998) 389–406 (both from memory). The origin is 0/0 and has no linearisation.
 */
const [a, b, d] = [0.8, 0.9, 0.4];
const ratioDependent: ModelFixture = {
  equations: { x: "x*(1 - x) - a*x*y/(x + y)", y: "y*(-d + b*x/(x + y))" },
  window: { x: [0, 1.2], y: [0, 1.2] },
  parameters: { a, b, d },
};

describe("findSingularities(ratio-dependent predator–prey)", () => {
  // Interior equilibrium by hand: y' = 0 gives b x/(x + y) = d, so y = x (b − d)/d and
  // y/(x + y) = (b − d)/b; then x' = 0 gives 1 − x = a (b − d)/b, so x* = 1 − a (b − d)/b.
  const xStar = 1 - (a * (b - d)) / b;
  const yStar = (xStar * (b - d)) / d;
  const { equilibria, singularities } = analyzeStep1(ratioDependent);

  it("findEquilibria finds the interior equilibrium in closed form and (1, 0), and nothing at the origin", () => {
    expect(equilibria).toHaveLength(2);
    expect(near(equilibria.find((e) => e.point.y > 0)!.point, { x: xStar, y: yStar }, 1e-10)).toBe(true);
    // y = 0 and 1 − x = 0: prey at its capacity, no predator
    expect(near(equilibria.find((e) => e.point.y === 0)!.point, { x: 1, y: 0 }, 1e-12)).toBe(true);
    for (const e of equilibria) expect(Math.hypot(e.point.x, e.point.y)).toBeGreaterThan(1e-3);
  });

  it("findSingularities reports the origin as 0/0, with the denominator x + y, never with a type", () => {
    expect(singularities).toHaveLength(1);
    const [origin] = singularities;
    expect(origin).toMatchObject({
      id: "X1",
      point: { x: 0, y: 0 },
      reason: "indeterminate",
      shape: "point",
      fromEquilibriumSearch: true,
    });
    // 0/0 in both components and in the Jacobian: NaN as compiled (IEEE 754: 0/0 is NaN)
    expect(Object.values(origin.field).every(Number.isNaN)).toBe(true);
    expect(origin.jacobian.flat().some(Number.isNaN)).toBe(true);
    expect(origin).not.toHaveProperty("type");
    expect(origin.factors).toEqual([
      expect.objectContaining({ role: "denominator", expression: "x + y", equations: ["x", "y"] }),
    ]);
  });

  it("findSingularities reads the limits along rays: f → 0, the Jacobian's limit depends on the direction", () => {
    const [origin] = singularities;
    // |x y/(x + y)| ≤ min(x, y) and |x/(x + y)| ≤ 1, so both components tend to 0 at the origin
    expect(origin.fieldLimit).toBe("zero");
    // ∂/∂x [x y/(x + y)] = y²/(x + y)²: 0 along the x-axis, 1 along the y-axis, so
    // J₁₁ = 1 − 2x − a y²/(x + y)² tends to 1 on the x-axis ray and to 1 − a on the y-axis ray
    expect(origin.jacobianLimit).toBe("direction-dependent");
    const alongX = rayAlong(origin, { x: 1, y: 0 })!;
    const alongY = rayAlong(origin, { x: 0, y: 1 })!;
    expect(Math.abs(alongX.jacobian![0][0] - 1)).toBeLessThan(1e-5);
    expect(Math.abs(alongY.jacobian![0][0] - (1 - a))).toBeLessThan(1e-5);
    // on the y-axis x' = 0 and y' = −d y < 0: toward the origin; on the x-axis x' = x(1 − x) > 0: away
    expect(alongY.toward).toBe(true);
    expect(alongX.toward).toBe(false);
    // the corner admits the rays from 0° to 90° only (every 22.5°)
    expect(origin.rays).toHaveLength(5);
  });

  it("runPipeline lists the origin under singularities, not equilibria, and serializeResults keeps its evidence", () => {
    const out = runOrThrow(
      JSON.stringify({ ...fixtureSpec(ratioDependent), analysis: { basins: { resolution: 16, coarse: 8 } } }),
    );
    const results = out.results;
    expect(results.singularities.map((s) => [s.point, s.reason])).toEqual([
      [{ x: 0, y: 0 }, "indeterminate"],
    ]);
    expect(results.equilibria.some((e) => e.point.x === 0 && e.point.y < 1e-6)).toBe(false);
    // serializeResults writes the NaN evidence as null and names each path
    const doc = JSON.parse(serializeResults(results)) as { singularities: unknown[]; nonFinite: string[] };
    expect(doc.singularities[0]).toMatchObject({ id: "X1", field: { x: null, y: null } });
    expect(doc.nonFinite).toEqual(
      expect.arrayContaining(["singularities[0].field.x: NaN", "singularities[0].field.y: NaN"]),
    );
  });
});

describe("findSingularities: lines and kinks", () => {
  const strip: Record<string, [number, number]> = { x: [0, 2], y: [-1, 1] };

  it("findSingularities(x' = (y − 0.5)/(x − 1)) reports the pole line x = 1 as unbounded", () => {
    const { singularities } = analyzeStep1({ equations: { x: "(y - 0.5)/(x - 1)", y: "-y" }, window: strip });
    expect(singularities).toHaveLength(1);
    const [line] = singularities;
    expect(line).toMatchObject({ shape: "line", reason: "unbounded", rays: [], fieldLimit: null });
    expect(Math.abs(line.extent!.x[0] - 1)).toBeLessThan(1e-12);
    expect(Math.abs(line.extent!.x[1] - 1)).toBeLessThan(1e-12);
    expect(line.extent!.y).toEqual([-1, 1]);
  });

  it("findSingularities(x' = x y/y) reports y = 0 as a 0/0 line", () => {
    // the numerator x y vanishes wherever the denominator y does
    const { singularities } = analyzeStep1({ equations: { x: "x*y/y - x", y: "-y" }, window: strip });
    expect(singularities.map((s) => [s.shape, s.reason, s.extent])).toEqual([
      ["line", "indeterminate", { x: [0, 2], y: [0, 0] }],
    ]);
  });

  it("findSingularities(x' = −|x − 1|) reports the rest point at the kink, unclassified, and the kink line", () => {
    // d|u|/du = sign(u): J₁₁ = +1 for x < 1 and −1 for x > 1, so J has no limit at x = 1
    const { equilibria, singularities } = analyzeStep1({
      equations: { x: "-abs(x - 1)", y: "-y" },
      window: strip,
    });
    expect(equilibria).toEqual([]);
    const [point, line] = singularities;
    expect(point).toMatchObject({
      point: { x: 1, y: 0 },
      shape: "point",
      reason: "not-differentiable",
      fromEquilibriumSearch: true,
      fieldLimit: "zero",
      jacobianLimit: "direction-dependent",
    });
    expect(rayAlong(point, { x: 1, y: 0 })!.jacobian![0][0]).toBe(-1);
    expect(rayAlong(point, { x: -1, y: 0 })!.jacobian![0][0]).toBe(1);
    expect(line).toMatchObject({
      shape: "line",
      reason: "not-differentiable",
      extent: { x: [1, 1], y: [-1, 1] },
    });
  });

  it("findSingularities((x − 1)|x − 1|) reports nothing: the kink is smoothed, d/dx = 2|x − 1| is continuous", () => {
    const { equilibria, singularities } = analyzeStep1({
      equations: { x: "(x - 1)*abs(x - 1)", y: "-y" },
      window: strip,
    });
    expect(singularities).toEqual([]);
    expect(equilibria.map((e) => [e.point, e.type])).toEqual([[{ x: 1, y: 0 }, "non-hyperbolic"]]);
  });

  it("findSingularities(x' = √x (1 − x)) reports x = 0, where d√x/dx = 1/(2√x) is unbounded", () => {
    const { equilibria, singularities } = analyzeStep1({
      equations: { x: "sqrt(x)*(1 - x)", y: "-y" },
      window: strip,
    });
    // at x = 1: d/dx = (1 − x)/(2√x) − √x = −1, and y' = −y: J = −I, a stable star (common practice)
    expect(equilibria.map((e) => [e.point, e.type])).toEqual([[{ x: 1, y: 0 }, "stable-star"]]);
    expect(singularities.map((s) => [s.shape, s.reason, s.point])).toEqual([
      ["point", "not-differentiable", { x: 0, y: 0 }],
      ["line", "not-differentiable", { x: 0, y: -1 }],
    ]);
    expect(singularities[0].jacobianLimit).toBe("unbounded");
    // with negative x in the window the root is not defined there
    const wider = analyzeStep1({
      equations: { x: "sqrt(x)*(1 - x)", y: "-y" },
      window: { x: [-1, 2], y: [-1, 1] },
    });
    expect(wider.singularities.find((s) => s.shape === "line")!.reason).toBe("undefined-beyond");
  });

  it("findSingularities(Holling type II predator–prey) reports nothing: 0.2 + x never vanishes in the window", () => {
    // Rosenzweig–MacArthur form (Murray, Mathematical Biology I, 3rd ed., section 3.4; from memory)
    const { singularities } = analyzeStep1({
      equations: { x: "x*(1 - x) - x*y/(0.2 + x)", y: "y*(-0.3 + 0.6*x/(0.2 + x))" },
      window: { x: [0, 2], y: [0, 2] },
    });
    expect(singularities).toEqual([]);
  });
});

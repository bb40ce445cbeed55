import { describe, expect, it } from "vitest";
import { buildModel } from "../../fixtures/models.js";
import { traceThresholdCurve } from "../../../src/analysis/parameters/curves.js";

/**
 * Threshold curves with closed forms (hand-derived, common practice): in each model the
 * threshold in p sits at p = −q for every q, so the continued curve must be the line p + q = 0.
 */
describe("traceThresholdCurve", () => {
  it("traceThresholdCurve(x' = p + q − x², y' = −y) follows the saddle-node line p = −q", () => {
    // saddle-node at x = 0 where p + q = 0 (det J = 2x vanishes there)
    const model = buildModel({
      equations: { x: "p + q - x^2", y: "-y" },
      window: { x: [-2, 2], y: [-1, 1] },
      parameters: { p: -0.5, q: 0.5 },
    });
    const points = traceThresholdCurve(
      model,
      [0, 1],
      [
        [-1, 1],
        [-0.9, 0.9],
      ],
      {
        value: -0.5,
        point: { x: 0, y: 0 },
        kind: "saddle-node",
        bound: null,
      },
    );
    expect(points.length).toBeGreaterThan(100);
    expect(points[0][1]).toBeCloseTo(-0.9, 12);
    expect(points[points.length - 1][1]).toBeCloseTo(0.9, 12);
    for (const [p, q] of points) expect(Math.abs(p + q)).toBeLessThan(1e-10);
  });

  it("traceThresholdCurve(normal form of a Hopf point, μ = p + q) follows the Hopf line p = −q", () => {
    // x' = μx − y − x(x² + y²), y' = x + μy − y(x² + y²): Hopf at the origin where μ = 0 (trace J = 2μ)
    const model = buildModel({
      equations: { x: "(p + q) * x - y - x * (x^2 + y^2)", y: "x + (p + q) * y - y * (x^2 + y^2)" },
      window: { x: [-1, 1], y: [-1, 1] },
      parameters: { p: 0.2, q: -0.2 },
    });
    const points = traceThresholdCurve(
      model,
      [0, 1],
      [
        [-1, 1],
        [-0.5, 0.5],
      ],
      {
        value: 0.2,
        point: { x: 0, y: 0 },
        kind: "hopf",
        bound: null,
      },
    );
    expect(points.length).toBeGreaterThan(100);
    for (const [p, q] of points) expect(Math.abs(p + q)).toBeLessThan(1e-10);
  });

  it("traceThresholdCurve(invasion of y on the axis y = 0) follows the line where y's growth rate vanishes", () => {
    // on y = 0 the resident x sits at 1; y invades when p·x − 1 + q > 0, so the threshold is p = 1 − q
    const model = buildModel({
      equations: { x: "x * (1 - x) - x * y", y: "y * (p * x - 1 + q)" },
      window: { x: [0, 2], y: [0, 2] },
      parameters: { p: 1, q: 0 },
    });
    const points = traceThresholdCurve(
      model,
      [0, 1],
      [
        [0, 2],
        [-0.5, 0.5],
      ],
      {
        value: 1,
        point: { x: 1, y: 0 },
        kind: "transcritical",
        bound: { state: "y", value: 0 },
      },
    );
    expect(points.length).toBeGreaterThan(100);
    for (const [p, q] of points) expect(Math.abs(p - (1 - q))).toBeLessThan(1e-10);
  });
});

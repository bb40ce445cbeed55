import { describe, expect, it } from "vitest";
import { modelOf } from "../../fixtures/models.js";
import { serializeResults } from "../../../src/report/archive/serialize.js";
import { computeDirectionField } from "../../../src/analysis/phase/field.js";
import { DEFAULT_DIRECTION_FIELD_OPTIONS } from "../../../src/analysis/constants.js";

// Logistic prey with a saturating response on a window of unequal widths (5 by 300), so the
// window scaling matters; the right-hand side is written out again here, independently.
const window: Record<string, [number, number]> = { x: [0, 5], y: [0, 300] };
const model = modelOf({ x: "x*(1 - x/4) - x*y/(100 + 100*x)", y: "y*(2*x/(1 + x) - 1)" }, window);
const rhs = (x: number, y: number) => [
  x * (1 - x / 4) - (x * y) / (100 + 100 * x),
  y * ((2 * x) / (1 + x) - 1),
];

describe("computeDirectionField", () => {
  const field = computeDirectionField(model);

  it("computeDirectionField(predator-prey) places a 21 × 21 grid at cell centres, row-major", () => {
    const { nx, ny } = DEFAULT_DIRECTION_FIELD_OPTIONS;
    expect([field.nx, field.ny, field.x.length, field.y.length, field.u.length]).toEqual([
      nx,
      ny,
      nx,
      ny,
      nx * ny,
    ]);
    expect(field.x[0]).toBeCloseTo(5 / 42, 14);
    expect(field.y[ny - 1]).toBeCloseTo(300 - 300 / 42, 10);
    // entry j * nx + i belongs to (x[i], y[j]): the magnitude there is |f(x[i], y[j])|
    const [i, j] = [3, 17];
    const [f0, f1] = rhs(field.x[i], field.y[j]);
    expect(field.magnitude[j * nx + i]).toBeCloseTo(Math.hypot(f0, f1), 12);
  });

  it("computeDirectionField(predator-prey) gives unit vectors parallel to (f0/width0, f1/width1)", () => {
    // common practice: a direction field drawn on a plot of the window shows f scaled by the axes
    let checked = 0;
    field.y.forEach((y, j) =>
      field.x.forEach((x, i) => {
        const k = j * field.nx + i;
        const [f0, f1] = rhs(x, y);
        const [s0, s1] = [f0 / 5, f1 / 300];
        const u = field.u[k]!,
          v = field.v[k]!;
        expect(Math.hypot(u, v)).toBeCloseTo(1, 14);
        const norm = Math.hypot(s0, s1);
        expect(Math.abs(u * s1 - v * s0) / norm).toBeLessThan(1e-12);
        expect(u * s0 + v * s1).toBeGreaterThan(0);
        expect(field.magnitude[k]).toBeCloseTo(Math.hypot(f0, f1), 10);
        checked++;
      }),
    );
    expect(checked).toBe(441);
    expect(field.missing).toEqual([]);
  });

  it("computeDirectionField(hole) gives null and a reason where the model is undefined", () => {
    // sqrt(x) is NaN for x < 0: the left 10 of 21 columns
    const hole = computeDirectionField(
      modelOf({ x: "y - sqrt(x)", y: "x - 0.5" }, { x: [-1, 1], y: [-1, 1] }),
    );
    const undefinedAt = hole.x
      .flatMap((x, i) => (x < 0 ? hole.y.map((_, j) => j * hole.nx + i) : []))
      .sort((a, b) => a - b);
    expect(hole.missing).toEqual(undefinedAt.map((index) => ({ index, reason: "non-finite" })));
    for (const index of undefinedAt)
      expect([hole.u[index], hole.v[index], hole.magnitude[index]]).toEqual([null, null, null]);
    expect(serializeResults({ field: hole })).not.toContain("nonFinite");
  });

  it("computeDirectionField(rest point at a cell centre) gives no direction there and magnitude 0", () => {
    // (10 + 0.5)/21 = 0.5 exactly: the centre cell sits on the equilibrium (0.5, 0.5)
    const rest = computeDirectionField(modelOf({ x: "x - 0.5", y: "0.5 - y" }, { x: [0, 1], y: [0, 1] }));
    const centre = 10 * 21 + 10;
    expect(rest.missing).toEqual([{ index: centre, reason: "rest" }]);
    expect([rest.u[centre], rest.v[centre], rest.magnitude[centre]]).toEqual([null, null, 0]);
  });

  it("computeDirectionField(predator-prey, 5 × 3) follows the options and is deterministic", () => {
    const small = computeDirectionField(model, { nx: 5, ny: 3 });
    expect([small.x.length, small.y.length, small.u.length]).toEqual([5, 3, 15]);
    expect(JSON.stringify(computeDirectionField(model, { nx: 5, ny: 3 }))).toBe(JSON.stringify(small));
  });
});

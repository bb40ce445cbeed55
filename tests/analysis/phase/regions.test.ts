import { describe, expect, it } from "vitest";
import { prepareModel } from "../../../src/pipeline.js";
import type { Model } from "../../../src/model/types.js";
import type { Diagnostic } from "../../../src/diagnostics/issue.js";
import { findEquilibria } from "../../../src/analysis/phase/equilibria.js";
import { findNullclines } from "../../../src/analysis/phase/nullclines.js";
import { findRegions, type RegionResult } from "../../../src/analysis/phase/regions.js";
import { DEFAULT_REGION_OPTIONS } from "../../../src/analysis/constants.js";
import { EXAMPLE_IDS, exampleField, exampleSpecText } from "../../fixtures/examples.js";
import { modelOf } from "../../fixtures/models.js";

function regionsOf(model: Model, diagnostics: Diagnostic[] = []): RegionResult[] {
  return findRegions(
    model,
    findNullclines(model, findEquilibria(model)),
    DEFAULT_REGION_OPTIONS,
    diagnostics,
  );
}

const sign = (v: number) => (v > 0 ? "+" : "-");

// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4 (rabbits versus sheep):
// x' = x(3 - x - 2y), y' = y(2 - x - y). Inside the quadrant x' > 0 exactly below x + 2y = 3 and
// y' > 0 exactly below x + y = 2; the lines cross at (1, 1). Elementary geometry then gives four
// regions on [0, 4]^2: (+,+) the quadrilateral (0,0) (2,0) (1,1) (0,1.5), area 1.75; (+,-) the
// triangle (2,0) (3,0) (1,1), area 0.5; (-,+) the triangle (0,1.5) (0,2) (1,1), area 0.25;
// (-,-) the rest, 13.5 (window area 16).
const competitionModel = modelOf({ x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" }, { x: [0, 4], y: [0, 4] });
const competitionRhs = (x: number, y: number) => [x * (3 - x - 2 * y), y * (2 - x - y)];

describe("findRegions", () => {
  const diagnostics: Diagnostic[] = [];
  const regions = regionsOf(competitionModel, diagnostics);

  it("findRegions(competition) finds the four sign regions with their areas", () => {
    const byPattern = Object.fromEntries(regions.map((r) => [r.signs.x + r.signs.y, r]));
    expect(Object.keys(byPattern).sort()).toEqual(["++", "+-", "-+", "--"]);
    expect(regions).toHaveLength(4);
    // a cell-counted area is off by at most about half a cell along the region's boundary
    const tol = 0.004;
    expect(Math.abs(byPattern["++"].areaFraction - 1.75 / 16)).toBeLessThan(tol);
    expect(Math.abs(byPattern["+-"].areaFraction - 0.5 / 16)).toBeLessThan(tol);
    expect(Math.abs(byPattern["-+"].areaFraction - 0.25 / 16)).toBeLessThan(tol);
    expect(Math.abs(byPattern["--"].areaFraction - 13.5 / 16)).toBeLessThan(tol);
  });

  it("findRegions(competition) puts each sample point inside its region by the closed-form lines", () => {
    for (const r of regions) {
      const { x, y } = r.point;
      const belowFirst = x + 2 * y < 3,
        belowSecond = x + y < 2;
      expect(r.signs.x).toBe(belowFirst ? "+" : "-");
      expect(r.signs.y).toBe(belowSecond ? "+" : "-");
      const [f0, f1] = competitionRhs(x, y);
      expect([sign(f0), sign(f1)]).toEqual([r.signs.x, r.signs.y]);
      // far from the nullclines: at least two cells (window-scaled) from every line, axes included
      const cell = 1 / DEFAULT_REGION_OPTIONS.nx;
      const distances = [
        x / 4,
        y / 4,
        Math.abs(x + 2 * y - 3) / Math.hypot(1, 2) / 4,
        Math.abs(x + y - 2) / Math.SQRT2 / 4,
      ];
      expect(Math.min(...distances)).toBeGreaterThan(2 * cell);
      expect(r.clearance).toBeGreaterThan(2 * cell);
    }
  });

  it("findRegions(competition) has both states growing near the origin and both declining near (4, 4)", () => {
    const nearest = (px: number, py: number) =>
      regions.reduce((best, r) =>
        Math.hypot(r.point.x - px, r.point.y - py) < Math.hypot(best.point.x - px, best.point.y - py)
          ? r
          : best,
      );
    expect(nearest(0, 0).signs).toEqual({ x: "+", y: "+" });
    expect(nearest(4, 4).signs).toEqual({ x: "-", y: "-" });
  });

  it("findRegions(competition) orders regions by sample point and numbers them R1, R2, ...", () => {
    expect(regions.map((r) => r.id)).toEqual(["R1", "R2", "R3", "R4"]);
    for (let k = 1; k < regions.length; k++) {
      const [p, q] = [regions[k - 1].point, regions[k].point];
      expect(p.x < q.x || (p.x === q.x && p.y <= q.y)).toBe(true);
    }
    const total = regions.reduce((s, r) => s + r.areaFraction, 0);
    expect(total).toBeLessThanOrEqual(1);
    expect(total).toBeGreaterThan(0.995);
  });

  it("findRegions(competition) is deterministic and JSON-clean", () => {
    const again = regionsOf(competitionModel);
    expect(JSON.stringify(again)).toBe(JSON.stringify(regions));
    expect(JSON.parse(JSON.stringify(regions))).toEqual(regions);
  });

  it.each(EXAMPLE_IDS)(
    "findRegions(%s) gives sample points whose signs match the hand-written field there",
    (id) => {
      const prepared = prepareModel(exampleSpecText(id));
      if (!prepared.ok) throw new Error("example spec does not load");
      const model = prepared.value.model;
      const found = regionsOf(model);
      expect(found.length).toBeGreaterThanOrEqual(4);
      const field = exampleField(id);
      for (const r of found) {
        const [a, b] = model.stateNames;
        const f = field(r.point[a], r.point[b]);
        expect(model.stateNames.map((n, i) => [n, sign(f[i])])).toEqual(Object.entries(r.signs));
        expect(r.clearance).toBeGreaterThan(0);
      }
    },
  );

  it("findRegions(hole) leaves out the part of the window where the model is undefined", () => {
    // sqrt(x) is NaN for x < 0, half of the window
    const model = modelOf({ x: "y - sqrt(x)", y: "x - 0.5" }, { x: [-1, 1], y: [-1, 1.5] });
    const found = regionsOf(model);
    expect(found.every((r) => r.point.x > 0)).toBe(true);
    expect(found.reduce((s, r) => s + r.areaFraction, 0)).toBeCloseTo(0.5, 2);
    // the four sign patterns around the equilibrium (0.5, √0.5)
    expect(found.map((r) => r.signs.x + r.signs.y).sort()).toEqual(["++", "+-", "-+", "--"]);
  });
});

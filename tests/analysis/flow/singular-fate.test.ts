/**
 * A trajectory that runs into a singular point (the field 0/0 there) has no fate the equations
 * decide: keel stops it there and says so, instead of integrating across the singular set and
 * reporting what the formula does beyond (a blow-up through negative populations).
 *
 * The model (invented values): ratio-dependent predation, x' = x (1 − x) − a x y/(x + y),
 * y' = y (−d + b x/(x + y)), with a = 3, b = 1.2, d = 0.5. With a > 1 the predator drives both
 * populations to the origin, reached in finite time (Kuang & Beretta, "Global qualitative analysis
 * of a ratio-dependent predator–prey system", J. Math. Biol. 36 (1998) 389–406, from memory); the
 * check here is numerical, scipy's LSODA (tests/reference/ratio_dependent.py).
 */
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline } from "../../../src/pipeline.js";
import type { Results } from "../../../src/analysis/types.js";
import { findScipyPython, runReference } from "../../fixtures/scipy.js";
import { seededUniform } from "../../fixtures/random.js";

const P = { a: 3, b: 1.2, d: 0.5 };
const HORIZON = 200;

function analyzeRatioDependent(): Results {
  const out = runPipeline(
    JSON.stringify({
      keel: 1,
      id: "ratio-dependent",
      title: "Ratio-dependent predation (invented values)",
      time: { unit: "year" },
      states: [
        { name: "x", min: 0, max: 1.5, population: true },
        { name: "y", min: 0, max: 1.5, population: true },
      ],
      parameters: Object.entries(P).map(([name, value]) => ({
        name,
        value,
        source: "invented for the test",
      })),
      equations: { x: "x*(1 - x) - a*x*y/(x + y)", y: "y*(-d + b*x/(x + y))" },
      scenarios: [
        { name: "even", initial: { x: 0.5, y: 0.5 }, horizon: HORIZON },
        { name: "few-predators", initial: { x: 1, y: 0.1 }, horizon: HORIZON },
      ],
      analysis: { basins: { resolution: 32, coarse: 8 }, parameters: [] },
    }),
  );
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return out.value.results;
}

describe.skipIf(findScipyPython() === null)(
  "trajectories into a singular point (ratio-dependent origin)",
  () => {
    let results: Results;
    beforeAll(() => {
      results = analyzeRatioDependent();
    }, 120_000);

    it("analyze(ratio-dependent) lists the origin as a singular point, not an equilibrium", () => {
      const origin = results.singularities.find((s) => s.point.x === 0 && s.point.y === 0);
      expect(origin?.shape).toBe("point");
      expect(results.equilibria.some((e) => e.point.x === 0 && e.point.y === 0)).toBe(false);
    });

    it("analyze(ratio-dependent) stops each scenario at the singular point, as scipy's LSODA reaches it", () => {
      const origin = results.singularities.find((s) => s.point.x === 0 && s.point.y === 0)!;
      const reference = runReference<{ reached: boolean; t: number }[]>("ratio_dependent.py", {
        ...P,
        horizon: HORIZON,
        starts: results.scenarios.map((s) => [s.start.x, s.start.y]),
      });
      results.scenarios.forEach((s, k) => {
        expect(reference[k].reached, s.name).toBe(true);
        expect(s.fate).toMatchObject({ kind: "undecided", reason: "singular-point", singularity: origin.id });
        // arrival is declared within 1e-6 of the window: a little before the reference's x + y = 1e-7
        expect(s.fate.t).toBeLessThanOrEqual(reference[k].t * (1 + 1e-3));
        expect(s.fate.t).toBeGreaterThan(0.5 * reference[k].t);
      });
    });

    it("analyze(ratio-dependent).basins labels the cells that run into it, as many as scipy's sample", () => {
      const origin = results.singularities.find((s) => s.point.x === 0 && s.point.y === 0)!;
      const u = seededUniform(7);
      const starts = Array.from({ length: 100 }, () => [1.5 * u(), 1.5 * u()]);
      const reference = runReference<{ reached: boolean }[]>("ratio_dependent.py", {
        ...P,
        horizon: HORIZON,
        starts,
      });
      const sampled = reference.filter((r) => r.reached).length / starts.length;
      const b = results.basins;
      expect(b.attractors).toContain(origin.id);
      expect(b.fractions["blow-up"] ?? 0).toBe(0);
      // 100 samples: a binomial share within 3 standard errors (at most 0.15), plus the map's own bound
      expect(Math.abs(b.fractions[origin.id] - sampled)).toBeLessThanOrEqual(b.errorBound + 0.15);
    });
  },
);

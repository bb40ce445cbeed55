import { describe, expect, it } from "vitest";
import { continueEquilibria } from "../../../src/analysis/parameters/continuation/index.js";
import { buildBifurcationFigure } from "../../../src/report/figures/bifurcation.js";
import { buildModel, fixtureSpec, runOrThrow, type ModelFixture } from "../../fixtures/models.js";

// Hopf normal form in Cartesian coordinates (Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed.,
// §3.4; Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §8.2): x' = mu x − w y + s x (x² + y²),
// y' = w x + mu y + s y (x² + y²). In polar coordinates r' = r (mu + s r²), θ' = w, so for mu s < 0
// the circle r = √(−mu/s) is a periodic orbit of period 2π/w, attracting when s < 0 (mu > 0) and
// repelling when s > 0 (mu < 0); its least and greatest x and y are ∓√(−mu/s) (worked by hand).
const normalForm = (s: number, w: number): ModelFixture => ({
  equations: { x: "mu*x - w*y + s*x*(x^2 + y^2)", y: "w*x + mu*y + s*y*(x^2 + y^2)" },
  window: { x: [-1, 1], y: [-1, 1] },
  parameters: { mu: 0.1, w, s },
});

/** The orbit's extent is read at its sample points (ORBIT_SAMPLES a period): within 1e-3 relative of the circle. */
const EXTENT_REL_TOL = 1e-3;
/** The period comes from the shooting's return time: to 1e-8 relative. */
const PERIOD_REL_TOL = 1e-8;

describe("continueEquilibria: the branch of cycles from a Hopf point", () => {
  for (const [s, w] of [
    [-1, 1],
    [1, 2],
  ] as const) {
    it(`continueEquilibria(normal form s = ${s}, w = ${w}, mu) follows the cycle of radius √(−mu/s) and period 2π/w on the side mu s < 0`, () => {
      const result = continueEquilibria(buildModel(normalForm(s, w)), "mu", [-0.5, 0.5]);
      expect(result.cycles).toHaveLength(1);
      const branch = result.cycles[0];
      expect(Math.abs(branch.hopf)).toBeLessThanOrEqual(1e-12);
      expect(branch.points.length).toBeGreaterThan(10);
      expect(branch.end).toBe("range");
      for (const q of branch.points) {
        expect(q.value * s).toBeLessThan(0);
        const radius = Math.sqrt(-q.value / s);
        for (const state of ["x", "y"]) {
          expect(Math.abs(q.max[state] - radius) / radius).toBeLessThanOrEqual(EXTENT_REL_TOL);
          expect(Math.abs(q.min[state] + radius) / radius).toBeLessThanOrEqual(EXTENT_REL_TOL);
        }
        expect(Math.abs(q.period - (2 * Math.PI) / w) / ((2 * Math.PI) / w)).toBeLessThanOrEqual(
          PERIOD_REL_TOL,
        );
        expect(q.stability).toBe(s < 0 ? "stable" : "unstable");
      }
    });
  }

  it("continueEquilibria(competition, a12) has no Hopf point and so no cycle branch", () => {
    // Lotka–Volterra competition has no Hopf point (Murray, Mathematical Biology I, 3rd ed., §3.5: the
    // equilibria are nodes and saddles for every parameter value)
    const result = continueEquilibria(
      buildModel({
        equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
        window: { N: [0, 160], S: [0, 160] },
        parameters: { r1: 0.8, r2: 0.5, K1: 130, K2: 90, a12: 1, a21: 0.4 },
      }),
      "a12",
      [0.5, 2.2],
    );
    expect(result.cycles).toEqual([]);
  });

  it("buildBifurcationFigure(normal form, mu) draws the amplitude ±√(mu/|s|) from the Hopf point, solid, in both panels", () => {
    const fixture = normalForm(-1, 1);
    const raw = fixtureSpec(fixture) as { parameters: { name: string; range?: number[] }[] };
    raw.parameters.find((p) => p.name === "mu")!.range = [-0.5, 0.5];
    const { results, spec } = runOrThrow(
      JSON.stringify({ ...raw, analysis: { basins: { resolution: 16, coarse: 8 }, parameters: ["mu"] } }),
    );
    const study = results.conditions.studies[0];
    type Panel = { layer: { name: string; data?: { values: { x: number; y: number; k: string }[] } }[] };
    const f = buildBifurcationFigure(results, spec, study) as { hconcat: [{ vconcat: Panel[] }, unknown] };
    const views = f.hconcat[0].vconcat;
    views.forEach((view, k) => {
      const layer = view.layer.find((l) => l.name === `cycle_amplitude_attracting_${k + 1}`);
      expect(layer, `panel ${k + 1}`).toBeDefined();
      const rows = layer!.data!.values;
      expect(new Set(rows.map((r) => r.k)).size).toBe(2);
      for (const r of rows) {
        if (Math.abs(r.x) < 1e-9)
          expect(Math.abs(r.y)).toBeLessThan(1e-9); // the Hopf point's equilibrium
        else
          expect(Math.abs(Math.abs(r.y) - Math.sqrt(r.x)) / Math.sqrt(r.x)).toBeLessThanOrEqual(
            EXTENT_REL_TOL,
          );
      }
    });
    expect(views.length).toBe(2);
  });
});

/**
 * A stiff relaxation oscillator end to end: van der Pol's equation in Liénard form,
 * u' = μ(w − (u³/3 − u)), w' = −u/μ, at μ = 1000 (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed.,
 * §7.5). Its fast direction has eigenvalues near −μ(u² − 1), so explicit steps collapse; the
 * trajectories, the shooting and the basin cells must go on with RODAS. References, none of them
 * keel's: Liénard's theorem (Strogatz §7.4) gives one stable limit cycle attracting every start
 * but the origin; the relaxation cycle runs between u = ±2 and w = ±2/3 as μ → ∞ (the cubic's
 * folds at u = ±1 jump to u = ∓2; Strogatz §7.5); its period is (3 − 2 ln 2)μ plus Dorodnitsyn's
 * correction 3|a1|μ^(−1/3) (from memory; a1 the first zero of the Airy function, −2.33810741,
 * Abramowitz and Stegun, Table 10.13).
 */
import { describe, expect, it } from "vitest";
import { analyzeFixture } from "../../fixtures/models.js";

const MU = 1000;
const AIRY_ZERO = 2.33810741;
const PERIOD_REFERENCE = (3 - 2 * Math.log(2)) * MU + 3 * AIRY_ZERO * MU ** (-1 / 3);
/** The next terms of the expansion, O(μ⁻¹ ln μ) ≈ 0.007 (4e-6 of the period), with room for them: 2e-5. */
const PERIOD_REL_TOL = 2e-5;
/** The amplitudes' limits hold to O(μ^(−2/3)) ≈ 0.01 at μ = 1000 (Strogatz §7.5, the jump's width). */
const EXTENT_TOL = 0.02;
/** Basin cells on the origin's unstable node and those the map cannot settle: at most this share. */
const UNDECIDED_SHARE_MAX = 0.02;

describe("a stiff relaxation oscillator (van der Pol, Liénard form, μ = 1000)", () => {
  const results = analyzeFixture(
    {
      equations: { u: "k*(w - (u^3/3 - u))", w: "-u/k" },
      parameters: { k: MU },
      window: { u: [-3, 3], w: [-1.5, 1.5] },
    },
    [{ name: "kick", initial: { u: 2, w: 0 }, horizon: 5000 }],
  );

  it("analyze finds one stable cycle with the relaxation period and amplitudes", () => {
    expect(results.cycles).toHaveLength(1);
    const cycle = results.cycles[0];
    expect(cycle.stability).toBe("stable");
    expect(Math.abs(cycle.period / PERIOD_REFERENCE - 1)).toBeLessThan(PERIOD_REL_TOL);
    for (const [lo, hi] of [cycle.extent.u.map((v) => v / 2), cycle.extent.w.map((v) => (3 * v) / 2)]) {
      expect(Math.abs(lo + 1)).toBeLessThan(EXTENT_TOL);
      expect(Math.abs(hi - 1)).toBeLessThan(EXTENT_TOL);
    }
  });

  it("analyze sends the scenario to that cycle", () => {
    expect(results.scenarios[0].fate).toMatchObject({ kind: "cycle", target: results.cycles[0].id });
  });

  it("analyze's basin map gives (nearly) every start to the cycle, as Liénard's theorem says", () => {
    const fractions = results.basins.fractions;
    expect(fractions[results.cycles[0].id]).toBeGreaterThan(1 - UNDECIDED_SHARE_MAX);
    expect(fractions.undecided ?? 0).toBeLessThan(UNDECIDED_SHARE_MAX);
  });
});

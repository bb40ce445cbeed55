/**
 * Curves and regions of equilibria reported as one object each, isolated equilibria beside them
 * kept and classified, and a cluster of roots around one degenerate equilibrium kept as one.
 * Every expected value is a closed form of the model's equations (solved by hand; common practice).
 */
import { describe, expect, it } from "vitest";
import { findEquilibriumCandidates } from "../../../src/analysis/phase/equilibria.js";
import type { Diagnostic } from "../../../src/diagnostics/issue.js";
import { modelOf } from "../../fixtures/models.js";

/** The field is zero at roots to 1e-9 of its scale; points of a set lie on its closed form to this. */
const ON_SET_TOL = 1e-6;

describe("findEquilibriumCandidates with sets of equilibria", () => {
  it("u' = u(1 − u − v)/2, v' = v(1 − u − v)/2: the origin (a star) and the segment u + v = 1 as one curve", () => {
    // f = 0 where u = v = 0, or on the whole line u + v = 1; J(0, 0) = I/2 (a star)
    const model = modelOf({ u: "0.5*u*(1 - u - v)", v: "0.5*v*(1 - u - v)" }, { u: [0, 2], v: [0, 2] });
    const diagnostics: Diagnostic[] = [];
    const { equilibria, sets } = findEquilibriumCandidates(model, undefined, diagnostics);
    expect(equilibria.map((e) => [e.point.u, e.point.v, e.type])).toEqual([[0, 0, "unstable-star"]]);
    expect(sets).toHaveLength(1);
    const [q] = sets;
    expect(q.kind).toBe("curve");
    for (const p of q.points) expect(Math.abs(p.u + p.v - 1)).toBeLessThan(ON_SET_TOL);
    // the segment runs from (0, 1) to (1, 0): the roots reach within one multistart cell of each end
    const cell = 2 / 16;
    expect(q.extent.u[0]).toBeLessThan(cell);
    expect(q.extent.u[1]).toBeGreaterThan(1 - cell);
    expect(diagnostics.map((d) => d.code)).toContain("equilibrium-set");
    expect(diagnostics.map((d) => d.code)).not.toContain("too-many-equilibria");
  });

  it("u' = max(0, u − 1)(1.5 − u), v' = −max(0, u − 1)v: a region of rest u ≤ 1 and the stable star (1.5, 0)", () => {
    // for u < 1 both rates are 0; for u > 1 they vanish only at u = 1.5, v = 0, where J = −I/2
    const model = modelOf({ u: "max(0, u - 1)*(1.5 - u)", v: "-max(0, u - 1)*v" }, { u: [0, 2], v: [0, 1] });
    const { equilibria, sets } = findEquilibriumCandidates(model);
    const star = equilibria.filter((e) => e.point.u > 1 + 1e-6);
    expect(star).toHaveLength(1);
    expect(Math.abs(star[0].point.u - 1.5)).toBeLessThan(1e-9);
    expect(Math.abs(star[0].point.v)).toBeLessThan(1e-9);
    expect(star[0].type).toBe("stable-star");
    expect(sets.map((q) => q.kind)).toEqual(["region"]);
    for (const p of sets[0].points) expect(p.u).toBeLessThanOrEqual(1 + ON_SET_TOL);
  });

  it("u' = (u − 1)², v' = −v: the one degenerate equilibrium (1, 0) stays one equilibrium, not a set", () => {
    // a double root in u: Newton converges to it slowly from many starts, to points near it
    const model = modelOf({ u: "(u - 1)^2", v: "-v" }, { u: [0, 2], v: [-1, 1] });
    const { equilibria, sets } = findEquilibriumCandidates(model);
    expect(sets).toEqual([]);
    expect(equilibria).toHaveLength(1);
    expect(Math.abs(equilibria[0].point.u - 1)).toBeLessThan(1e-3);
    expect(equilibria[0].type).toBe("non-hyperbolic");
  });

  it("u' = sin(3πu), v' = sin(3πv) on [0.1, 2.9]²: 81 hyperbolic equilibria at (j/3, k/3), no set, the first 50 listed", () => {
    const model = modelOf(
      { u: `sin(${3 * Math.PI}*u)`, v: `sin(${3 * Math.PI}*v)` },
      { u: [0.1, 2.9], v: [0.1, 2.9] },
    );
    const diagnostics: Diagnostic[] = [];
    const { equilibria, sets } = findEquilibriumCandidates(model, undefined, diagnostics);
    expect(sets).toEqual([]);
    expect(equilibria).toHaveLength(50);
    for (const e of equilibria) {
      expect(Math.abs(3 * e.point.u - Math.round(3 * e.point.u))).toBeLessThan(1e-9);
      expect(Math.abs(3 * e.point.v - Math.round(3 * e.point.v))).toBeLessThan(1e-9);
      expect(e.hyperbolic).toBe(true);
    }
    expect(diagnostics.map((d) => d.code)).toContain("too-many-equilibria");
  });
});

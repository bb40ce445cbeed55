import { describe, expect, it } from "vitest";
import { classifyOutcome } from "../../../src/analysis/parameters/outcomes.js";
import { analyzeFixture, buildModel, type ModelFixture } from "../../fixtures/models.js";

describe("the Lotka–Volterra centre: a family of closed orbits, recognised once", () => {
  // x' = a x − b x y, y' = c x y − d y conserves H = c x − d ln x + b y − a ln y, and every orbit
  // around the centre (d/c, a/b) is closed (Murray, Mathematical Biology I, 3rd ed., section 3.1).
  const p = { a: 1, b: 0.5, c: 0.25, d: 0.75 };
  const centre = { x: p.d / p.c, y: p.a / p.b };
  const H = (x: number, y: number) => p.c * x - p.d * Math.log(x) + p.b * y - p.a * Math.log(y);
  const window = { x: [0, 10], y: [0, 8] } as Record<string, [number, number]>;
  const lotkaVolterra: ModelFixture = {
    equations: { x: "a*x - b*x*y", y: "c*x*y - d*y" },
    parameters: p,
    window,
  };
  const results = analyzeFixture(lotkaVolterra, [
    { name: "small", initial: { x: centre.x + 0.3, y: centre.y }, horizon: 100 },
    { name: "large", initial: { x: centre.x + 4, y: centre.y }, horizon: 100 },
  ]);

  /**
   * The largest orbit inside the window, from H alone: on the ray y = a/b, x > d/c the orbit is at
   * its largest x (x' = 0 there), and at x = d/c at its largest y. So the orbit through x0 on the
   * ray stays inside while x0 ≤ 10 and the level set H(d/c, y) = H(x0, a/b) has its upper root
   * y ≤ 8; H(x0, a/b) grows with x0 > d/c, so bisection on x0 finds where either bound is met.
   */
  function outermostRadius(): number {
    const level = Math.min(H(window.x[1], centre.y), H(centre.x, window.y[1]));
    let lo = centre.x,
      hi = window.x[1];
    for (let k = 0; k < 200 && hi - lo > 1e-14; k++) {
      const m = 0.5 * (lo + hi);
      if (H(m, centre.y) < level) lo = m;
      else hi = m;
    }
    return (lo - centre.x) / (window.x[1] - window.x[0]);
  }

  it("analyze(Lotka–Volterra) records the family once: every neutral cycle shares one family capture", () => {
    const neutral = results.cycles.filter((c) => c.stability === "neutral");
    expect(neutral.length).toBe(results.cycles.length);
    expect(neutral.length).toBeGreaterThan(0);
    const families = new Set(neutral.map((c) => JSON.stringify(c.capture)));
    expect(families.size).toBe(1);
    expect(neutral[0].capture?.kind).toBe("family");
  });

  it("analyze(Lotka–Volterra) bounds the family by the largest orbit H allows inside the window", () => {
    const capture = results.cycles[0].capture!;
    const [lo, hi] = capture.radii;
    expect(lo).toBeLessThan(1e-3);
    // 16 halvings of the last probe gap (a few hundredths) and shooting's 1e-8: 1e-5 is ample
    expect(Math.abs(hi - outermostRadius())).toBeLessThan(1e-5);
  });

  it("analyze(Lotka–Volterra) sends each scenario to a neutral cycle on its own level set of H", () => {
    results.scenarios.forEach((sc) => {
      expect(sc.fate.kind).toBe("cycle");
      const cycle = results.cycles.find((c) => sc.fate.kind === "cycle" && c.id === sc.fate.target)!;
      const h0 = H(sc.start.x, sc.start.y);
      const worst = Math.max(
        ...cycle.orbit.x.map((x, i) => Math.abs(H(x, cycle.orbit.y[i]) - h0) / Math.abs(h0)),
      );
      expect(worst, sc.name).toBeLessThan(1e-7);
    });
  });

  /**
   * The share of the window whose orbit stays inside it, from H alone: H is convex with its
   * minimum at the centre, so the orbit through (x, y) stays inside the window (here also the
   * feasible region) exactly when H(x, y) is below H's minimum over the window's edges. The share
   * is H's sublevel set measured on a 2000 × 2000 midpoint grid, sharing nothing with the map.
   */
  function familyShare(): number {
    const [x1, y1] = [window.x[1], window.y[1]];
    let level = Infinity;
    for (let k = 1; k <= 100_000; k++) {
      const t = k / 100_000;
      level = Math.min(level, H(x1 * t, y1), H(x1, y1 * t));
    }
    // towards the axes H grows without bound: the lower edges never set the level
    const n = 2000;
    let inside = 0;
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) if (H(((i + 0.5) / n) * x1, ((j + 0.5) / n) * y1) < level) inside++;
    return inside / (n * n);
  }

  it("analyze(Lotka–Volterra).basins labels every cell of the family with the family, within errorBound of H's sublevel area", () => {
    const b = results.basins;
    const family = results.cycles[0].id;
    expect(b.attractors).toEqual([family]);
    expect(b.fractions.undecided ?? 0).toBeLessThanOrEqual(b.errorBound);
    expect(Math.abs(b.fractions[family] - familyShare())).toBeLessThanOrEqual(b.errorBound);
    expect(Math.abs(b.fractions[family] + (b.fractions["left-window"] ?? 0) - 1)).toBeLessThanOrEqual(
      b.errorBound,
    );
  });

  it("classifyOutcome(Lotka–Volterra) has no attractor: a neutral family is none", () => {
    expect(classifyOutcome(buildModel(lotkaVolterra), false).attractors).toEqual([]);
  });
});

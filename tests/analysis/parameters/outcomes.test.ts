/**
 * Outcome breaks no local bifurcation marks, located by keel's break search (parameters/breaks.ts)
 * and checked against an independent integration with bisection on the fate: scipy's DOP853 at
 * rtol 1e-10 (tests/reference/fate_bisection.py), sharing no code with keel.
 */
import { describe, expect, it } from "vitest";
import { prepareModel } from "../../../src/pipeline.js";
import { studyParameter } from "../../../src/analysis/parameters/study.js";
import type { OutcomeResult, ParameterStudyResult } from "../../../src/analysis/types.js";
import { runReference } from "../../fixtures/scipy.js";
import { FATE_HORIZON_DOUBLINGS } from "../../../src/analysis/constants.js";

/** Required agreement of a located break with the reference bisection, relatively (the search bisects to 1e-6 of the range). */
const BREAK_REL_TOL = 1e-5;

/**
 * The invented model: a ball in a double well with friction, x' = y, y' = x − x³ − c y (the
 * potential −x²/2 + x⁴/4; common textbook example, e.g. Strogatz, Nonlinear Dynamics and Chaos,
 * 2nd ed., section 6.5, from memory). For every c > 0: a saddle at the origin and two stable
 * equilibria at (±1, 0) (Jacobian [[0, 1], [−2, −c]]: trace −c, determinant 2), so varying c
 * crosses no local bifurcation. Which well the kicked ball ends in switches each time its start
 * lies on the saddle's stable manifold: a separatrix crossing, a break that only a fate shows.
 */
const WELL_RHS = ["y", "x - x**3 - c*y"];
const KICK: [number, number] = [-1.8, 0.5];
/** Arrival within 1e-3 of a well's bottom decides the fate: the energy there is below the saddle's, and friction only lowers it. */
const WELLS = [
  { name: "left", point: [-1, 0] },
  { name: "right", point: [1, 0] },
];

function wellSpec(c: number, range: [number, number], horizon: number): string {
  return JSON.stringify({
    keel: 1,
    id: "double-well",
    title: "Ball in a double well with friction (invented)",
    time: { unit: "s" },
    states: [
      { name: "x", min: -2, max: 2 },
      { name: "y", min: -2, max: 2 },
    ],
    parameters: [{ name: "c", value: c, unit: "1/s", range, source: "invented for the test" }],
    equations: { x: "y", y: "x - x^3 - c*y" },
    scenarios: [{ name: "kick", initial: { x: KICK[0], y: KICK[1] }, horizon }],
    analysis: { basins: { resolution: 32, coarse: 8 }, parameters: ["c"] },
  });
}

/** The study of c alone: the other passes of the analysis (portrait, basins) have nothing to say here. */
function studyOf(specText: string): ParameterStudyResult {
  const out = prepareModel(specText);
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  const { model } = out.value;
  return studyParameter(model, "c", model.spec.parameters[0].range!, [], []);
}

/** Which well an outcome's one scenario reaches ("left", "right"), or its fate's kind. */
function wellOf(o: OutcomeResult): string {
  const f = o.scenarios[0].fate;
  if (f.kind !== "attractor") return f.kind;
  // both wells keep x and y present; the rank by x tells them apart
  return f.attractor.rank.index === 0 ? "left" : "right";
}

interface Bisection {
  value: number;
  bracket: [number, number];
  left: string;
  right: string;
}

function wellReference(extra: object): object {
  return {
    states: ["x", "y"],
    rhs: WELL_RHS,
    parameters: {},
    parameter: "c",
    start: KICK,
    horizon: 5000,
    attractors: WELLS,
    arrival: 1e-3,
    ...extra,
  };
}

const relative = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe("findOutcomeBreaks: a scenario crossing a separatrix (double well, c)", () => {
  it("studyParameter(double well, c in [0.3, 1.5]) puts the one break where scipy's bisection on the fate does, to 1e-5", () => {
    const st = studyOf(wellSpec(1, [0.3, 1.5], 200));
    const ref = runReference<Bisection>(
      "fate_bisection.py",
      wellReference({ mode: "bisect", bracket: [0.6, 0.8], tol: 1e-10 }),
    );
    expect([ref.left, ref.right]).toEqual(["right", "left"]);
    // no local bifurcation: continuation locates nothing, and the break is a sampled one
    expect(st.thresholds).toEqual([]);
    expect(st.intervals.map((iv) => iv.to.kind)).toEqual(["sampled-break", "range-end"]);
    const brk = st.intervals[0].to;
    expect(relative(brk.value, ref.value), `keel ${brk.value}, scipy ${ref.value}`).toBeLessThanOrEqual(
      BREAK_REL_TOL,
    );
    expect(st.intervals.map((iv) => wellOf(iv.outcome))).toEqual(["right", "left"]);
    // the margin of c = 1 to the break, against the reference: (ref − 1)/ref, above it
    expect(st.margin).toMatchObject({ side: "above", form: "relative", to: brk });
    expect(Math.abs(st.margin!.relative! - (ref.value - 1) / ref.value)).toBeLessThanOrEqual(BREAK_REL_TOL);
  });

  it("studyParameter(double well, c in [0.029, 0.12]) finds every switch scipy sees on a fine grid, several inside one sample interval", () => {
    const range: [number, number] = [0.029, 0.12];
    const st = studyOf(wellSpec(0.05, range, 1000));
    // the reference: fates on a grid of step 0.002 (the switches here lie 0.0029 or more apart)
    const grid = Array.from({ length: 47 }, (_, k) => range[0] + (k * (range[1] - range[0])) / 46);
    const { fates } = runReference<{ fates: string[] }>(
      "fate_bisection.py",
      wellReference({ mode: "fates", values: grid }),
    );
    expect(new Set(fates)).toEqual(new Set(["left", "right"]));
    const switches = grid.slice(1).flatMap((v, k) => (fates[k] !== fates[k + 1] ? [[grid[k], v]] : []));
    // far more switches than keel's 24 sample intervals could see one by one: two share an interval
    const width = (range[1] - range[0]) / 24;
    expect(switches.some(([a], k) => k > 0 && a - switches[k - 1][1] < width)).toBe(true);

    const breaks = st.intervals.slice(1).map((iv) => iv.from);
    expect(
      breaks.map((b) => b.kind),
      JSON.stringify(breaks),
    ).toEqual(switches.map(() => "sampled-break"));
    breaks.forEach((b, k) => {
      expect(b.value).toBeGreaterThan(switches[k][0]);
      expect(b.value).toBeLessThan(switches[k][1]);
    });
    // each break confirmed independently: scipy's fates 1e-5 below and above it are keel's two sides, and differ
    const probes = breaks.flatMap((b) => [b.value * (1 - BREAK_REL_TOL), b.value * (1 + BREAK_REL_TOL)]);
    const sides = runReference<{ fates: string[] }>(
      "fate_bisection.py",
      wellReference({ mode: "fates", values: probes }),
    ).fates;
    breaks.forEach((b, k) => {
      const [below, above] = [st.intervals[k].outcome, st.intervals[k + 1].outcome].map(wellOf);
      expect([sides[2 * k], sides[2 * k + 1]], `break at ${b.value}`).toEqual([below, above]);
      expect(below).not.toBe(above);
    });
    // heavy: some 300 outcomes, each a ball rolling for hundreds of seconds with little friction
  }, 300_000);

  it("studyParameter(double well, short horizon) reports where the fate is undecided as an interval, with no threshold, no break and no margin", () => {
    // followed for 12 s in all (an undecided fate is followed on to 2^FATE_HORIZON_DOUBLINGS horizons),
    // the ball settles for c above about 0.35 and is still rolling below; over the whole range it ends
    // in the right well given time (scipy, below), so nothing about the outcome changes
    const range: [number, number] = [0.25, 0.7];
    const st = studyOf(wellSpec(0.6, range, 12 / 2 ** FATE_HORIZON_DOUBLINGS));
    const grid = Array.from({ length: 21 }, (_, k) => range[0] + (k * (range[1] - range[0])) / 20);
    const { fates } = runReference<{ fates: string[] }>(
      "fate_bisection.py",
      wellReference({ mode: "fates", values: grid }),
    );
    expect(new Set(fates)).toEqual(new Set(["right"]));

    expect(st.thresholds).toEqual([]);
    expect(st.margin).toBeNull();
    const ends = st.intervals.slice(1).map((iv) => iv.from);
    expect(ends.length).toBeGreaterThan(0);
    for (const end of ends) {
      expect(end.kind).toBe("decision-limit");
      if (end.kind === "decision-limit")
        expect(end.undecided).toEqual([{ scenario: "kick", reason: "horizon" }]);
    }
    for (const iv of st.intervals) {
      const fate = iv.outcome.scenarios[0].fate;
      expect(fate.kind === "undecided" ? fate.reason : wellOf(iv.outcome)).toMatch(/^(horizon|right)$/);
    }
    // at c = 0.6 the ball has settled by 12 s (scipy: about 8 s): the current interval is decided, the light-friction end is not
    expect(wellOf(st.intervals.find((iv) => iv.containsNominal)!.outcome)).toBe("right");
    expect(st.intervals[0].outcome.scenarios[0].fate).toEqual({ kind: "undecided", reason: "horizon" });
  });
});

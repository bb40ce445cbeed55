import { beforeAll, describe, expect, it } from "vitest";
import type { OutcomeMapResult, Results } from "../../../src/analysis/types.js";
import { runPipeline } from "../../../src/pipeline.js";

/** Traced threshold curves against the textbook's lines, relatively: the tracer's Newton stops at 1e-12 scaled steps. */
const CURVE_REL_TOL = 1e-6;
/**
 * Cells whose centre is at least this many cell widths from both threshold lines lie wholly in
 * one quadrant: the adaptive map must have them right, the cells beside a line included (the
 * refinement reaches the finest level there).
 */
const CLEAR_OF_LINE_CELLS = 1;
/** The adaptive map evaluates far fewer points than the uniform grid (two straight boundaries: about a quarter, common practice for quadtree refinement). */
const MAX_EVALUATION_SHARE = 0.4;

// Two-species Lotka–Volterra competition (Murray, Mathematical Biology I, 3rd ed., section 3.5;
// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4; from memory):
// N' = r1 N (1 − (N + a12 S)/K1), S' = r2 S (1 − (S + a21 N)/K2). In the (a12, a21) plane the lines
// a12 = K1/K2 and a21 = K2/K1 (straight: neither threshold depends on the other parameter) cut four
// quadrants: coexistence (both below), N wins (a21 above only), S wins (a12 above only), and
// bistability between N alone and S alone (both above). Invented values: K1/K2 = 1.25, K2/K1 = 0.8.
const BASE = { r1: 1.1, r2: 0.7, K1: 100, K2: 80 };
const A12_LINE = BASE.K1 / BASE.K2;
const A21_LINE = BASE.K2 / BASE.K1;
const A12_RANGE: [number, number] = [0.5, 2];
const A21_RANGE: [number, number] = [0.4, 1.3];

const SPEC = JSON.stringify({
  keel: 1,
  id: "competition-map",
  title: "Lotka–Volterra competition (invented values)",
  time: { unit: "year" },
  states: [
    { name: "N", min: 0, max: 120 },
    { name: "S", min: 0, max: 120 },
  ],
  parameters: [
    ...Object.entries(BASE).map(([name, value]) => ({ name, value })),
    { name: "a12", value: 0.6, range: A12_RANGE },
    { name: "a21", value: 0.5, range: A21_RANGE },
  ],
  equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
  window: { N: [0, 120], S: [0, 120] },
  analysis: {
    basins: { resolution: 64, coarse: 16 },
    parameters: ["a12", "a21"],
    parameterPairs: [["a12", "a21"]],
  },
});

/** The textbook outcome in each quadrant: the stable equilibria, each by the states it keeps present. */
function textbookOutcome(a12: number, a21: number): string[][] {
  if (a12 < A12_LINE && a21 < A21_LINE) return [["N", "S"]];
  if (a12 < A12_LINE) return [["N"]];
  if (a21 < A21_LINE) return [["S"]];
  return [["N"], ["S"]];
}

/** Sorts by JSON text, code point by code point. */
const byText = (x: unknown, y: unknown) =>
  JSON.stringify(x) < JSON.stringify(y) ? -1 : JSON.stringify(x) > JSON.stringify(y) ? 1 : 0;

/** A legend entry as its attractors' presence patterns, sorted; no other attractor (a cycle) may appear. */
function presencePatterns(outcome: OutcomeMapResult["legend"][number]): string[][] {
  return outcome.attractors.map((a) => (a.kind === "equilibrium" ? a.present : ["a cycle"])).sort(byText);
}

describe("buildOutcomeMap(competition, a12 × a21)", () => {
  let results: Results;
  let map: OutcomeMapResult;
  beforeAll(() => {
    const out = runPipeline(SPEC);
    if (!out.ok) throw new Error(JSON.stringify(out.issues));
    results = out.value.results;
    if (results.conditions.maps.length !== 1)
      throw new Error(`expected one map, got ${results.conditions.maps.length}`);
    map = results.conditions.maps[0];
  });

  it("buildOutcomeMap(competition) labels the four quadrants with the textbook's four outcomes", () => {
    expect(map.parameters).toEqual(["a12", "a21"]);
    expect(map.ranges).toEqual([A12_RANGE, A21_RANGE]);
    expect(map.nominal).toEqual([0.6, 0.5]);
    expect(map.cells).toHaveLength(map.nx * map.ny);
    expect(map.legend.map(presencePatterns).sort(byText)).toEqual([
      [["N", "S"]],
      [["N"], ["S"]],
      [["N"]],
      [["S"]],
    ]);
    // attractors only: the map does not follow scenarios
    for (const outcome of map.legend) expect(outcome.scenarios).toEqual([]);
    const counts = new Map<string, number>();
    for (let b = 0; b < map.ny; b++) {
      for (let a = 0; a < map.nx; a++) {
        // cells are row-major from the lowest a21, sampled at their centres
        const a12 = A12_RANGE[0] + ((A12_RANGE[1] - A12_RANGE[0]) * (a + 0.5)) / map.nx;
        const a21 = A21_RANGE[0] + ((A21_RANGE[1] - A21_RANGE[0]) * (b + 0.5)) / map.ny;
        const cellA12 = (A12_RANGE[1] - A12_RANGE[0]) / map.nx,
          cellA21 = (A21_RANGE[1] - A21_RANGE[0]) / map.ny;
        if (
          Math.abs(a12 - A12_LINE) < CLEAR_OF_LINE_CELLS * cellA12 ||
          Math.abs(a21 - A21_LINE) < CLEAR_OF_LINE_CELLS * cellA21
        )
          continue;
        const want = textbookOutcome(a12, a21);
        expect(
          presencePatterns(map.legend[map.cells[b * map.nx + a]]),
          `cell a12 = ${a12}, a21 = ${a21}`,
        ).toEqual(want);
        counts.set(JSON.stringify(want), (counts.get(JSON.stringify(want)) ?? 0) + 1);
      }
    }
    // every quadrant was checked on many cells, not a handful
    expect(counts.size).toBe(4);
    for (const n of counts.values()) expect(n).toBeGreaterThan(20);
  });

  it("buildOutcomeMap(competition) refines from the coarse pass only along the two boundaries", () => {
    console.info(
      `competition map: ${map.evaluations} outcomes evaluated for ${map.nx} x ${map.ny} cells (share ${(map.evaluations / (map.nx * map.ny)).toFixed(3)}), ${map.uncertainCells} uncertain cells`,
    );
    expect(map.evaluations).toBeGreaterThanOrEqual(map.coarse * map.coarse);
    expect(map.evaluations).toBeLessThan(MAX_EVALUATION_SHARE * map.nx * map.ny);
    // the uncertain cells are those beside a boundary: two lines across the map, a few cells wide
    expect(map.uncertainCells).toBeGreaterThan(map.nx + map.ny);
    expect(map.uncertainCells).toBeLessThan(8 * (map.nx + map.ny));
  });

  it("buildOutcomeMap(competition) traces the two transcriticals along the lines a12 = K1/K2 and a21 = K2/K1 across the other range", () => {
    expect(map.curves.map((c) => c.kind)).toEqual(["transcritical", "transcritical"]);
    const [alongA21, alongA12] = map.curves;
    // the a12 threshold, traced in a21: points (K1/K2, a21) from one end of a21's range to the other
    expect(alongA21.points.length).toBeGreaterThan(10);
    for (const [a12] of alongA21.points)
      expect(Math.abs(a12 - A12_LINE) / A12_LINE).toBeLessThanOrEqual(CURVE_REL_TOL);
    const a21s = alongA21.points.map((p) => p[1]);
    expect(Math.min(...a21s)).toBeCloseTo(A21_RANGE[0], 9);
    expect(Math.max(...a21s)).toBeCloseTo(A21_RANGE[1], 9);
    // the a21 threshold, traced in a12
    expect(alongA12.points.length).toBeGreaterThan(10);
    for (const [, a21] of alongA12.points)
      expect(Math.abs(a21 - A21_LINE) / A21_LINE).toBeLessThanOrEqual(CURVE_REL_TOL);
    const a12s = alongA12.points.map((p) => p[0]);
    expect(Math.min(...a12s)).toBeCloseTo(A12_RANGE[0], 9);
    expect(Math.max(...a12s)).toBeCloseTo(A12_RANGE[1], 9);
    // each curve starts from the threshold its one-parameter study located
    for (const { origin } of map.curves)
      expect(
        results.thresholds.some((t) => t.parameter === origin.parameter && t.value === origin.value),
        JSON.stringify(origin),
      ).toBe(true);
    expect(map.curves.map((c) => c.origin.parameter)).toEqual(["a12", "a21"]);
  });
});

import { describe, expect, it } from "vitest";
import { Matrix, solve } from "ml-matrix";
import { bisect, bisectPredicate } from "../../../src/analysis/numeric/roots.js";
import { solve2, solveSmall, spectralRadius } from "../../../src/analysis/numeric/linear.js";
import { newtonSolve } from "../../../src/analysis/numeric/newton.js";
import {
  scaledDistance,
  scaledMaxDistance,
  segmentDistance,
} from "../../../src/analysis/numeric/distance.js";

/** Deterministic uniform numbers in [-1, 1) (a linear congruential generator, common practice). */
function seeded(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return (s / 2 ** 32) * 2 - 1;
  };
}

describe("numeric toolbox", () => {
  it("bisect(x² − 2 on [1, 2]) brackets √2 between adjacent doubles", () => {
    const { lo, hi } = bisect(1, 2, (m) => (m * m - 2 < 0 ? "upper" : "lower"), 200);
    expect(lo).toBeLessThanOrEqual(Math.SQRT2);
    expect(hi).toBeGreaterThanOrEqual(Math.SQRT2);
    // adjacent doubles: no double lies strictly between them
    expect(0.5 * (lo + hi) === lo || 0.5 * (lo + hi) === hi).toBe(true);
  });

  it("bisect stops at an exact root and honours the step cap", () => {
    expect(bisect(0, 4, (m) => (m === 2 ? "root" : m < 2 ? "upper" : "lower"), 10)).toEqual({ lo: 2, hi: 2 });
    // three halvings of [0, 1] towards 0: the bracket is [0, 1/8]
    expect(bisect(0, 1, () => "lower", 3)).toEqual({ lo: 0, hi: 0.125 });
  });

  it("bisectPredicate(t ≥ ln 3 on [0, 2]) finds ln 3 to rounding, the upper end on the true side", () => {
    const { lo, hi } = bisectPredicate(0, 2, (t) => Math.exp(t) >= 3, 80);
    expect(Math.exp(hi)).toBeGreaterThanOrEqual(3);
    expect(Math.exp(lo)).toBeLessThan(3);
    expect(hi).toBeCloseTo(Math.log(3), 15);
  });

  it("solve2 and solveSmall agree with ml-matrix's LU solve on seeded random systems", () => {
    const rand = seeded(14);
    for (let trial = 0; trial < 50; trial++) {
      const n = 2 + (trial % 3);
      const m = Array.from({ length: n * n }, rand);
      const r = Array.from({ length: n }, rand);
      const rows = Array.from({ length: n }, (_, i) => m.slice(i * n, i * n + n));
      const reference = solve(new Matrix(rows), Matrix.columnVector(r)).to1DArray();
      const x = solveSmall(m, r)!;
      x.forEach((v, k) => expect(v).toBeCloseTo(reference[k], 8));
      if (n === 2) {
        const y = solve2(m[0], m[1], m[2], m[3], r[0], r[1])!;
        y.forEach((v, k) => expect(v).toBeCloseTo(reference[k], 8));
      }
    }
  });

  it("solve2 and solveSmall return null for a singular matrix", () => {
    expect(solve2(1, 2, 2, 4, 1, 1)).toBeNull();
    expect(solveSmall([1, 2, 3, 2, 4, 6, 0, 1, 1], [1, 2, 3])).toBeNull();
  });

  it("spectralRadius({±2i, 1}) is 2", () => {
    expect(
      spectralRadius([
        { re: 0, im: 2 },
        { re: 0, im: -2 },
        { re: 1, im: 0 },
      ]),
    ).toBe(2);
  });

  it("newtonSolve(x² + y² = 4, y = x) converges to (√2, √2)", () => {
    const u = newtonSolve(
      (v, r, jac) => {
        r[0] = v[0] * v[0] + v[1] * v[1] - 4;
        r[1] = v[1] - v[0];
        jac.set([2 * v[0], 2 * v[1], -1, 1]);
        return true;
      },
      [1, 2],
      [1, 1],
      { maxIterations: 30, stepTol: 1e-14 },
    )!;
    expect(u[0]).toBeCloseTo(Math.SQRT2, 14);
    expect(u[1]).toBeCloseTo(Math.SQRT2, 14);
  });

  it("newtonSolve gives up (null) where the system has no root, x² + 1 = 0", () => {
    const u = newtonSolve(
      (v, r, jac) => {
        r[0] = v[0] * v[0] + 1;
        jac[0] = 2 * v[0];
        return true;
      },
      [0.5],
      [1],
      { maxIterations: 40, stepTol: 1e-14 },
    );
    expect(u).toBeNull();
  });

  it("scaled distances divide each component by its span (hand-worked, common practice)", () => {
    expect(scaledDistance([3, 40], [0, 0], [1, 10])).toBe(5);
    expect(scaledDistance([3, 40, 0], [0, 0, 12], [1, 10, 1])).toBe(13);
    expect(scaledMaxDistance([3, 40, 0], [0, 0, 12], [1, 10, 1])).toBe(12);
  });

  it("segmentDistance projects onto the segment and clamps to its ends", () => {
    // (1, 1) above the segment (0, 0) → (2, 0): nearest point (1, 0), t = 1/2
    expect(segmentDistance([1, 1], [0, 0], [2, 0], [1, 1])).toEqual({ d: 1, t: 0.5 });
    // beyond the end: the distance to (2, 0), t clamped to 1
    expect(segmentDistance([5, 4], [0, 0], [2, 0], [1, 1])).toEqual({ d: 5, t: 1 });
    // max norm of the offset
    expect(segmentDistance([1, 3, 4], [0, 0, 0], [2, 0, 0], [1, 1, 1], "max")).toEqual({ d: 4, t: 0.5 });
  });
});

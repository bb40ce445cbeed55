/**
 * The pieces rule 3 (an exit from the feasible region within a step) and rule 7 (a section
 * crossing within a step) are read with, against closed forms: the kernel's cubic Hermite
 * helpers, and the follower's search of a dense output (numeric/excursion.ts).
 */
import { describe, expect, it } from "vitest";
import { KERNEL_HERMITE_HELPERS } from "../../../src/analysis/flow/rules.js";
import { firstExit } from "../../../src/analysis/numeric/excursion.js";

interface Helpers {
  hermiteAt: (y0: number, y1: number, d0: number, d1: number, s: number) => number;
  stepOvershoot: (
    y0: number,
    y1: number,
    d0: number,
    d1: number,
    lo: number,
    hi: number,
    inv: number,
  ) => number;
  crossingAt: (y0: number, y1: number, d0: number, d1: number, c: number, sense: number) => number;
}

function helpers(): Helpers {
  // the kernel's own source, instantiated as the kernel instantiates it

  return new Function(
    `${KERNEL_HERMITE_HELPERS}\nreturn { hermiteAt, stepOvershoot, crossingAt };`,
  )() as Helpers;
}

const TOL = 1e-12;

describe("the basin kernel's Hermite helpers (closed-form cubics)", () => {
  const { hermiteAt, stepOvershoot, crossingAt } = helpers();
  // q(s) = 1 + 3s − 4s³: q(0) = 1, q(1) = 0, q'(0) = 3, q'(1) = −9; q' = 0 at s = 1/2, where q = 2 (by hand)
  const q = [1, 0, 3, -9] as const;

  it("hermiteAt reproduces the cubic from its end values and slopes", () => {
    for (const s of [0, 0.2, 0.5, 0.9, 1]) expect(hermiteAt(...q, s)).toBeCloseTo(1 + 3 * s - 4 * s ** 3, 12);
  });

  it("stepOvershoot finds the interior maximum 2 at s = 1/2 past a bound at 1.9 the end values never reach", () => {
    expect(Math.abs(stepOvershoot(...q, -10, 1.9, 1 / 4) - 0.1 / 4)).toBeLessThan(TOL);
    // and the minimum of −q past a lower bound at −1.5: overshoot 0.5
    expect(Math.abs(stepOvershoot(-1, 0, -3, 9, -1.5, 10, 1) - 0.5)).toBeLessThan(TOL);
  });

  it("stepOvershoot is negative for a step that stays inside (the chord bound clears it)", () => {
    expect(stepOvershoot(...q, -10, 2.5, 1)).toBeLessThan(0);
    expect(stepOvershoot(0.1, 0.2, 0.1, 0.1, 0, 1, 1)).toBeLessThan(0);
  });

  it("crossingAt finds where s³ − 1/8 crosses zero: s = 1/2", () => {
    // p(0) = −1/8, p(1) = 7/8, p'(0) = 0, p'(1) = 3
    expect(Math.abs(crossingAt(-0.125, 0.875, 0, 3, 0, 1) - 0.5)).toBeLessThan(1e-15);
    expect(Math.abs(crossingAt(0.125, -0.875, 0, -3, 0, -1) - 0.5)).toBeLessThan(1e-15);
  });
});

describe("firstExit on a step's dense output (closed forms)", () => {
  // v(s) = p cos(2(s − 0.3)): peaks at s = 0.3 (between the samples 0.25 and 0.375), v(s) = 1 at
  // s = 0.3 − acos(1/p)/2 (by hand)
  const bump = (p: number) => (s: number) => p * Math.cos(2 * (s - 0.3));

  it("firstExit(peak 1.006 between samples, hi = 1) returns the first crossing of 1", () => {
    const hit = firstExit(bump(1.006), -1, 1);
    expect(hit?.side).toBe("hi");
    expect(Math.abs(hit!.s - (0.3 - Math.acos(1 / 1.006) / 2))).toBeLessThan(1e-12);
  });

  it("firstExit(peak 1.0001) still finds it; peak 0.9999 stays inside", () => {
    const hit = firstExit(bump(1.0001), -1, 1);
    expect(hit?.side).toBe("hi");
    expect(Math.abs(hit!.s - (0.3 - Math.acos(1 / 1.0001) / 2))).toBeLessThan(1e-9);
    expect(firstExit(bump(0.9999), -1, 1)).toBeNull();
  });

  it("firstExit(a dip below lo) names the lower end; a start outside exits at s = 0", () => {
    const dip = (s: number) => -bump(1.006)(s);
    expect(firstExit(dip, -1, 1)?.side).toBe("lo");
    expect(firstExit(() => 2, -1, 1)).toEqual({ s: 0, side: "hi" });
  });

  it("firstExit(the monotone line 0.2 + s, hi = 1) crosses at s = 0.8", () => {
    const hit = firstExit((s) => 0.2 + s, 0, 1);
    expect(hit?.side).toBe("hi");
    expect(Math.abs(hit!.s - 0.8)).toBeLessThan(1e-15);
  });
});

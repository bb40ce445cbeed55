/**
 * The fate rules on the edge of the feasible region, against a closed form: a linear stable
 * focus x' = −εx − (ω/c) y, y' = cωx − εy, whose solution from (0, −cA) is
 * x = A e^{−εt} sin ωt, y = −cA e^{−εt} cos ωt (substitute; common practice). x first peaks at
 * t* = (π/2 − atan(ε/ω))/ω with x(t*) = A e^{−εt*} ω/√(ε² + ω²), so A sets how far past x = 1
 * the trajectory goes, and for how short a time, before it spirals into the origin.
 */
import { describe, expect, it } from "vitest";
import { buildFlowContext, followTrajectory, type FollowResult } from "../../../src/analysis/flow/follow.js";
import { findEquilibria } from "../../../src/analysis/phase/equilibria.js";
import { planBasins } from "../../../src/analysis/basins/index.js";
import { instantiateBasinKernel } from "../../../src/analysis/basins/kernel.js";
import { labelName } from "../../../src/analysis/basins/labels.js";
import { windowOf } from "../../../src/analysis/numeric/window.js";
import { DEFAULT_EQUILIBRIUM_OPTIONS } from "../../../src/analysis/constants.js";
import { buildModel } from "../../fixtures/models.js";

const EPS = 0.05,
  OMEGA = 1,
  C = 4;
const T_PEAK = (Math.PI / 2 - Math.atan(EPS / OMEGA)) / OMEGA;
/** The amplitude whose first peak of x is `peak`. */
const amplitudeFor = (peak: number) => (peak * Math.hypot(EPS, OMEGA)) / (Math.exp(-EPS * T_PEAK) * OMEGA);
const exactX = (A: number, t: number) => A * Math.exp(-EPS * t) * Math.sin(OMEGA * t);
const exactY = (A: number, t: number) => -C * A * Math.exp(-EPS * t) * Math.cos(OMEGA * t);
/** The exit time and point agree with the closed form to this (the integrator's tolerance is 1e-9 relative). */
const EXIT_TOL = 1e-6;
const HORIZON = 200;

/** The focus with window x ∈ [−1, 1], y ∈ [−10, 10] and x bounded by `xBound` (the window's own by default). */
function focus(xBound = 1) {
  const model = buildModel({
    id: "focus",
    equations: { x: "-ep*x - (om/c)*y", y: "c*om*x - ep*y" },
    parameters: { ep: EPS, om: OMEGA, c: C },
    window: { x: [-1, 1], y: [-10, 10] },
    bounds: { x: [-xBound, xBound], y: [-10, 10] },
  });
  const equilibria = findEquilibria(model, DEFAULT_EQUILIBRIUM_OPTIONS);
  const box = windowOf(model);
  return { model, equilibria, box, ctx: buildFlowContext(model, equilibria, box, 1) };
}

function follow(xBound: number, peak: number, sign = 1): FollowResult {
  const { ctx } = focus(xBound);
  return followTrajectory(ctx, [0, -sign * C * amplitudeFor(peak)], {
    horizon: HORIZON,
    maxPathPoints: 100_000,
    detectRecurrence: false,
  });
}

/** First t in (0, t*) with |x(t)| = level, by bisection on the closed form (x rises monotonically there). */
function crossingTime(A: number, level: number): number {
  let lo = 0,
    hi = T_PEAK;
  for (let k = 0; k < 200; k++) {
    const m = 0.5 * (lo + hi);
    if (Math.abs(exactX(A, m)) >= level) hi = m;
    else lo = m;
  }
  return hi;
}

describe("followTrajectory on a linear focus that grazes the window edge between two steps (closed form)", () => {
  it("followTrajectory(peak 0.6 % past x = 1, bounds = window) leaves through x = 1 where the closed form crosses it, though no step point lies outside", () => {
    const result = follow(1, 1.006);
    // the excursion falls between two accepted steps: the step points alone never leave
    expect(Math.max(...result.path.x.map(Math.abs))).toBeLessThan(1);
    expect(result.fate.kind).toBe("left-window");
    if (result.fate.kind !== "left-window") return;
    const A = amplitudeFor(1.006);
    const t = crossingTime(A, 1);
    expect(result.fate.edge).toEqual({ state: "x", value: 1 });
    expect(result.fate.bound).toBe("max");
    expect(Math.abs(result.fate.t - t)).toBeLessThan(EXIT_TOL);
    expect(Math.abs(result.fate.point.x - 1)).toBeLessThan(EXIT_TOL);
    expect(Math.abs(result.fate.point.y - exactY(A, t))).toBeLessThan(EXIT_TOL);
  });

  it("followTrajectory(peak 0.6 % past x = −1) leaves through the lower bound of x", () => {
    const result = follow(1, 1.006, -1);
    expect(result.fate).toMatchObject({ kind: "left-window", edge: { state: "x", value: -1 }, bound: "min" });
  });

  it("followTrajectory(peak 0.01 % past x = 1) still leaves, where the closed form crosses x = 1", () => {
    const result = follow(1, 1.0001);
    expect(result.fate).toMatchObject({ kind: "left-window", edge: { state: "x", value: 1 }, bound: "max" });
    if (result.fate.kind === "left-window")
      expect(Math.abs(result.fate.t - crossingTime(amplitudeFor(1.0001), 1))).toBeLessThan(EXIT_TOL);
  });

  it("followTrajectory(peak 0.1 % short of x = 1) reaches the focus", () => {
    expect(follow(1, 0.999).fate).toMatchObject({ kind: "equilibrium", target: "E1" });
  });

  it("followTrajectory(peak past the window, bounds at x = ±2) follows it out of the window and back to the focus", () => {
    const result = follow(2, 1.5);
    expect(Math.max(...result.path.x)).toBeGreaterThan(1);
    expect(result.fate).toMatchObject({ kind: "equilibrium", target: "E1" });
    expect(result.exit).toBeNull();
  });

  it("followTrajectory(peak 0.6 % past the bound x = 2) leaves through that bound, not the window's edge", () => {
    const result = follow(2, 2 * 1.006);
    expect(result.fate).toMatchObject({ kind: "left-window", edge: { state: "x", value: 2 }, bound: "max" });
    if (result.fate.kind === "left-window")
      expect(Math.abs(result.fate.t - crossingTime(amplitudeFor(2 * 1.006), 2))).toBeLessThan(EXIT_TOL);
  });
});

describe("basin kernel on the same focus: the same fates as the follower", () => {
  /** The kernel's label of each start (0, −cA) for the given peaks of x. */
  function kernelLabels(xBound: number, peaks: number[]): string[] {
    const { model, equilibria, box } = focus(xBound);
    const plan = planBasins(model, equilibria, [], box, HORIZON, 1 / EPS, { resolution: 8, coarse: 8 }, []);
    const kernel = instantiateBasinKernel(plan.kernelSource);
    const starts = Float64Array.from(peaks.flatMap((p) => [0, -C * amplitudeFor(p)]));
    const out = new Int32Array(peaks.length);
    kernel(starts, out);
    return Array.from(out, (l) => labelName(l, plan.targets.attractors));
  }

  it("kernel(bounds = window) labels peaks 0.6 %, 0.1 % and 0.01 % past x = 1 left-window and 0.1 % short of it E1", () => {
    // the shorter excursions last under a kernel step: their step points stay inside
    expect(kernelLabels(1, [1.006, 1.001, 1.0001, 0.999])).toEqual([
      "left-window",
      "left-window",
      "left-window",
      "E1",
    ]);
  });

  it("kernel(bounds x = ±2) labels a start that leaves the window and comes back E1, one past the bound left-window", () => {
    expect(kernelLabels(2, [1.5, 1.994, 2.012])).toEqual(["E1", "E1", "left-window"]);
  });
});

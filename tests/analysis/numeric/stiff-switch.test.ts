/**
 * integrateFlow's stiffness switch (src/analysis/numeric/stiff-switch.ts): given the Jacobian,
 * odex hands a stiff stretch over to RODAS. Checked against scipy's Radau on the van der Pol
 * relaxation oscillator (tests/reference/van_der_pol_radau.py), against closed forms, and for
 * leaving a non-stiff integration untouched.
 */
import { describe, expect, it } from "vitest";
import { integrateFlow, type FlowOptions, type StepInfo } from "../../../src/analysis/numeric/integrate.js";
import { MAX_STEP_OF_HORIZON, TRAJECTORY_MAX_STEPS } from "../../../src/analysis/constants.js";
import { findScipyPython, runReference } from "../../fixtures/scipy.js";

/** van der Pol in Liénard's form at μ = 1000 (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §7.5). */
const MU = 1000;
const rhs = (y: ArrayLike<number>, out: Float64Array) => {
  out[0] = y[1];
  out[1] = MU * (1 - y[0] * y[0]) * y[1] - y[0];
};
const jacobian = (y: ArrayLike<number>, out: Float64Array) =>
  out.set([0, 1, -2 * MU * y[0] * y[1] - 1, MU * (1 - y[0] * y[0])]);
const START = [2, 0];
const HORIZON = 2500;
const TIMES = [1000, 2000, 2500];
/** keel's trajectory tolerances for a window of width 4 × 4 (tolerancesFor's defaults: rtol 1e-9, atol 1e-11 of the width). */
const TOLERANCES = { relative: 1e-9, absolute: [4e-11, 4e-11] };
/**
 * Agreement with Radau at rtol 1e-10: a run held to 1e-9 per step keeps its global error within
 * tens of times that through the three fast jumps (rosenbrock.test.ts measures 1e-7 at 1e-7).
 */
const STATE_TOL = 1e-7;
/** The hand-over must save at least this factor in right-hand side evaluations (measured: several hundred). */
const SAVING = 50;

/** Options as the trajectory follower sets them (maxStep a 64th of the horizon), recording the outputs. */
function followerOptions(
  withJacobian: boolean,
  maxSteps: number,
  outputs: number[][],
  steps: StepInfo[] = [],
): FlowOptions {
  return {
    direction: 1,
    tolerances: TOLERANCES,
    maxStep: HORIZON * MAX_STEP_OF_HORIZON,
    maxSteps,
    jacobian: withJacobian ? jacobian : undefined,
    onStep: (step) => {
      steps.push(step);
      for (const t of TIMES)
        if (t > step.t0 && t <= step.t1) outputs.push([step.dense(0, t), step.dense(1, t)]);
    },
  };
}

describe.skipIf(findScipyPython() === null)(
  "integrateFlow with the stiffness switch (van der Pol, μ = 1000)",
  () => {
    const reference = runReference<{ y: number[][] }>("van_der_pol_radau.py", {
      mu: MU,
      start: START,
      times: TIMES,
      rtol: 1e-10,
    });
    const switched: number[][] = [];
    const switchedSteps: StepInfo[] = [];
    const withSwitch = integrateFlow(
      rhs,
      START,
      HORIZON,
      followerOptions(true, TRAJECTORY_MAX_STEPS, switched, switchedSteps),
    );

    it("hands over to RODAS and agrees with scipy's Radau at t = 1000, 2000, 2500", () => {
      expect(withSwitch.method).toBe("odex+rodas");
      expect(withSwitch.status).toBe("finished");
      expect(withSwitch.tEnd).toBe(HORIZON);
      expect(switched).toHaveLength(TIMES.length);
      switched.forEach(([y1, y2], k) => {
        expect(Math.abs(y1 - reference.y[k][0])).toBeLessThan(STATE_TOL);
        expect(Math.abs(y2 - reference.y[k][1])).toBeLessThan(STATE_TOL);
      });
      // one time line: each step starts where the last ended, across the hand-over too
      for (let k = 1; k < switchedSteps.length; k++)
        expect(switchedSteps[k].t0).toBe(switchedSteps[k - 1].t1);
    });

    it("odex alone runs out of steps, and needs far more evaluations with an unlimited budget", () => {
      const capped = integrateFlow(rhs, START, HORIZON, followerOptions(false, TRAJECTORY_MAX_STEPS, []));
      expect(capped.method).toBe("odex");
      expect(capped.status).toBe("step-limit");
      expect(capped.tEnd).toBeLessThan(HORIZON);
      const alone: number[][] = [];
      const unlimited = integrateFlow(
        rhs,
        START,
        HORIZON,
        followerOptions(false, 100 * TRAJECTORY_MAX_STEPS, alone),
      );
      expect(unlimited.status).toBe("finished");
      expect(unlimited.evaluations).toBeGreaterThan(SAVING * withSwitch.evaluations);
      // the explicit run is right too, only slow
      alone.forEach(([y1], k) => expect(Math.abs(y1 - reference.y[k][0])).toBeLessThan(STATE_TOL));
    });
  },
);

describe("integrateFlow's stiffness switch on closed forms", () => {
  it("a quadrature rides through the hand-over: ∫ y1·y2 dt = (y1² − y1(0)²)/2 on van der Pol", () => {
    // y2 = y1', so the integral has a closed form; the integrand is nonlinear, so RODAS's
    // Jacobian row for it (central differences) matters
    const exact = (y1: number) => 0.5 * (y1 * y1 - START[0] * START[0]);
    let worst = 0;
    const result = integrateFlow(rhs, START, HORIZON, {
      direction: 1,
      tolerances: TOLERANCES,
      maxStep: HORIZON * MAX_STEP_OF_HORIZON,
      maxSteps: TRAJECTORY_MAX_STEPS,
      jacobian,
      quadrature: { integrand: (y) => y[0] * y[1], absolute: TOLERANCES.relative },
      onStep: ({ t0, t1, y, dense }) => {
        const mid = 0.5 * (t0 + t1);
        worst = Math.max(worst, Math.abs(y[2] - exact(y[0])), Math.abs(dense(2, mid) - exact(dense(0, mid))));
      },
    });
    expect(result.method).toBe("odex+rodas");
    expect(result.y).toHaveLength(3);
    expect(Math.abs(result.y[2] - exact(result.y[0]))).toBeLessThan(STATE_TOL);
    expect(worst).toBeLessThan(STATE_TOL);
  });

  it("a non-stiff damped oscillator with its Jacobian runs odex alone, step for step as without it", () => {
    // x'' + 0.1x' + x = 0 over 400 time units (common practice): odex's steps never collapse
    const field = (y: ArrayLike<number>, out: Float64Array) => {
      out[0] = y[1];
      out[1] = -y[0] - 0.1 * y[1];
    };
    const run = (withJacobian: boolean) => {
      const steps: number[] = [];
      const result = integrateFlow(field, [1, 0], 400, {
        direction: 1,
        tolerances: TOLERANCES,
        maxStep: 400 * MAX_STEP_OF_HORIZON,
        maxSteps: TRAJECTORY_MAX_STEPS,
        jacobian: withJacobian ? (_y, out) => out.set([0, 1, -1, -0.1]) : undefined,
        onStep: ({ t1, y }) => void steps.push(t1, ...y),
      });
      return { result, steps };
    };
    const a = run(true);
    const b = run(false);
    expect(a.result.method).toBe("odex");
    expect(a.steps).toEqual(b.steps);
    expect(a.result).toEqual(b.result);
  });

  it("a stiff linear decay, backward in time: the directed field is not stiff, and odex keeps it", () => {
    // y' = −1e4 (y − cos t) forward is stiff; backward it is unstable, which no implicit method cures
    const field = (y: ArrayLike<number>, out: Float64Array) => void (out[0] = -1e4 * y[0]);
    const result = integrateFlow(field, [1e-300], 1, {
      direction: -1,
      tolerances: { relative: 1e-9, absolute: [1e-300] },
      maxStep: 1 / 64,
      maxSteps: 4096,
      jacobian: (_y, out) => void (out[0] = -1e4),
      onStep: () => undefined,
    });
    expect(result.method).toBe("odex");
  });
});

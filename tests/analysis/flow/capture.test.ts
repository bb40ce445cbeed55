import { add, multiply, transpose } from "mathjs";
import { describe, expect, it } from "vitest";
import { findCaptureRegions, isCaptured, type CaptureRegion } from "../../../src/analysis/flow/capture.js";
import { findEquilibria, type EquilibriumResult } from "../../../src/analysis/phase/equilibria.js";
import { buildFlowContext, followTrajectory } from "../../../src/analysis/flow/follow.js";
import { windowOf, type Box } from "../../../src/analysis/numeric/window.js";
import { prepareModel } from "../../../src/pipeline.js";
import { EXAMPLE_IDS, exampleField, exampleSpecText } from "../../fixtures/examples.js";
import { buildModel } from "../../fixtures/models.js";
import { rk4Step, type Field } from "../../fixtures/reference-integrators.js";

/** Directions sampled around each region (keel itself checks 72), and the fractions of its level. */
const ANGLES = 180;
const SHELLS = [0.999, 0.6, 0.2, 0.01];
/**
 * The reference RK4 (tests/fixtures/reference-integrators.ts), fixed step: a twentieth of the
 * fastest time scale 1/|λ|max, for up to 60 slowest time scales 1/|Re λ|min, enough to shrink V
 * from the level to V_FLOOR of it.
 */
const RK4_STEPS_PER_FAST_SCALE = 20;
const RK4_SLOW_SCALES = 60;
/** Converged: V below this fraction of the level (the point is ~1e-10 of the region's size away). */
const V_FLOOR = 1e-20;
/** The Lyapunov equation AᵀP + PA = −I is solved by a 3 × 3 linear solve: entries to 1e-10. */
const LYAPUNOV_TOL = 1e-10;

/** V(x) = zᵀ P z with z the window-scaled offset from the region's centre. */
function lyapunov(region: CaptureRegion, box: Box, x: [number, number]): number {
  const z0 = (x[0] - region.center[0]) / box.width[0],
    z1 = (x[1] - region.center[1]) / box.width[1];
  const p = region.p;
  return p[0] * z0 * z0 + 2 * p[1] * z0 * z1 + p[3] * z1 * z1;
}

/** Sample points of a region: ANGLES directions on each shell {V = shell · level}. */
function samplesOf(region: CaptureRegion, box: Box): [number, number][] {
  const out: [number, number][] = [];
  for (const shell of SHELLS)
    for (let k = 0; k < ANGLES; k++) {
      const th = (2 * Math.PI * (k + 0.5)) / ANGLES;
      const u = [Math.cos(th), Math.sin(th)];
      const quad = region.p[0] * u[0] * u[0] + 2 * region.p[1] * u[0] * u[1] + region.p[3] * u[1] * u[1];
      const s = Math.sqrt((shell * region.level) / quad);
      out.push([region.center[0] + u[0] * s * box.width[0], region.center[1] + u[1] * s * box.width[1]]);
    }
  return out;
}

/**
 * Integrates each sample forward (sign 1) or backward (−1) by RK4 and checks that V decreases at
 * every step until it falls below V_FLOOR of the level: the point has converged to the centre.
 */
function expectEverySampleConverges(
  f: Field,
  region: CaptureRegion,
  e: EquilibriumResult,
  box: Box,
  sign: 1 | -1,
) {
  const fastest = Math.max(...e.eigenvalues.map((l) => Math.hypot(l.re, l.im)));
  const slowest = Math.min(...e.eigenvalues.map((l) => Math.abs(l.re)));
  const h = sign / (RK4_STEPS_PER_FAST_SCALE * fastest);
  const steps = Math.ceil((RK4_SLOW_SCALES / slowest) * RK4_STEPS_PER_FAST_SCALE * fastest);
  for (const start of samplesOf(region, box)) {
    expect(isCaptured(region, start, box)).toBe(true);
    let x = start;
    let v = lyapunov(region, box, x);
    let k = 0;
    for (; k < steps && v > V_FLOOR * region.level; k++) {
      x = rk4Step(f, x, h);
      const next = lyapunov(region, box, x);
      if (!(next < v))
        throw new Error(`${region.equilibrium}: V rose from ${v} to ${next} at step ${k} from (${start})`);
      v = next;
    }
    expect(v / region.level, `${region.equilibrium} from (${start}) after ${k} steps`).toBeLessThanOrEqual(
      V_FLOOR,
    );
  }
}

/** The scaled, direction-signed Jacobian A of a region's equilibrium, which P was built from. */
function scaledJacobian(e: EquilibriumResult, box: Box, sign: 1 | -1): number[][] {
  const [[a, b], [c, d]] = e.jacobian;
  const [w0, w1] = box.width;
  return [
    [sign * a, (sign * b * w1) / w0],
    [(sign * c * w0) / w1, sign * d],
  ];
}

function expectLyapunovEquation(region: CaptureRegion, e: EquilibriumResult, box: Box, sign: 1 | -1) {
  // independently, with mathjs: AᵀP + PA = −I, and P positive definite
  const A = scaledJacobian(e, box, sign);
  const P = [
    [region.p[0], region.p[1]],
    [region.p[2], region.p[3]],
  ];
  const residual = add(multiply(transpose(A), P), multiply(P, A)) as number[][];
  residual
    .flat()
    .forEach((v, k) =>
      expect(Math.abs(v - (k === 0 || k === 3 ? -1 : 0))).toBeLessThanOrEqual(
        LYAPUNOV_TOL * Math.max(1, ...P.flat().map(Math.abs)),
      ),
    );
  expect(P[0][0]).toBeGreaterThan(0);
  expect(P[0][0] * P[1][1] - P[0][1] * P[1][0]).toBeGreaterThan(0);
}

describe("findCaptureRegions(competition)", () => {
  // Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4: stable nodes at (0, 2) and (3, 0),
  // an unstable node at (0, 0) and a saddle at (1, 1). The field is written out here by hand.
  const f: Field = (x, y) => [x * (3 - x - 2 * y), y * (2 - x - y)];
  const model = buildModel({
    equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
    window: { x: [0, 4], y: [0, 4] },
  });
  const equilibria = findEquilibria(model);
  const box = windowOf(model);
  const regions = findCaptureRegions(model, equilibria, box, 1);
  const idAt = (x: number, y: number) =>
    equilibria.find((e) => Math.abs(e.point.x - x) < 1e-9 && Math.abs(e.point.y - y) < 1e-9)!.id;

  it("findCaptureRegions(competition) gives one region for each stable node, none for the saddle or the source", () => {
    expect(regions.map((r) => r.equilibrium)).toEqual([idAt(0, 2), idAt(3, 0)]);
    for (const r of regions) expect(r.radius).toBeGreaterThan(1e-4);
  });

  it("findCaptureRegions(competition) regions solve the Lyapunov equation of the scaled linearisation", () => {
    for (const r of regions)
      expectLyapunovEquation(
        r,
        equilibria.find((e) => e.id === r.equilibrium)!,
        box,
        1,
      );
  });

  it("findCaptureRegions(competition) every sampled point converges, with V decreasing along the way (RK4)", () => {
    for (const r of regions)
      expectEverySampleConverges(
        f,
        r,
        equilibria.find((e) => e.id === r.equilibrium)!,
        box,
        1,
      );
  });

  it("findCaptureRegions(competition, backward) captures the source (0, 0) in reversed time", () => {
    const backward = findCaptureRegions(model, equilibria, box, -1);
    expect(backward.map((r) => r.equilibrium)).toEqual([idAt(0, 0)]);
    expectLyapunovEquation(backward[0], equilibria[0], box, -1);
    expectEverySampleConverges(f, backward[0], equilibria[0], box, -1);
  });

  it("followTrajectory(competition) from inside a capture region has arrived at t = 0", () => {
    const ctx = buildFlowContext(model, equilibria, box, 1);
    const inside = samplesOf(regions[1], box)[0];
    const follow = followTrajectory(ctx, inside, {
      horizon: 10,
      maxPathPoints: 100,
      detectRecurrence: false,
    });
    expect(follow.fate).toEqual({
      kind: "equilibrium",
      target: regions[1].equilibrium,
      t: 0,
      approach: "linear",
    });
  });
});

describe("findCaptureRegions on the example specs", () => {
  // common practice: every hyperbolic attractor (forward) and repeller (backward) gets a region
  for (const file of EXAMPLE_IDS) {
    const prepared = prepareModel(exampleSpecText(file));
    if (!prepared.ok) throw new Error(JSON.stringify(prepared.issues));
    const model = prepared.value.model;
    const equilibria = findEquilibria(model);
    const box = windowOf(model);

    for (const sign of [1, -1] as const) {
      const attracting = equilibria.filter(
        (e) => e.hyperbolic && e.type !== "saddle" && e.stable === (sign === 1),
      );
      it(`findCaptureRegions(${file}, ${sign === 1 ? "forward" : "backward"}) covers every ${sign === 1 ? "stable" : "unstable"} hyperbolic equilibrium, and its samples converge`, () => {
        if (sign === 1) expect(attracting.length).toBeGreaterThan(0);
        const regions = findCaptureRegions(model, equilibria, box, sign);
        expect(regions.map((r) => r.equilibrium)).toEqual(attracting.map((e) => e.id));
        for (const r of regions) {
          const e = equilibria.find((q) => q.id === r.equilibrium)!;
          expectLyapunovEquation(r, e, box, sign);
          // the field typed out by hand from the spec, not keel's compiled one
          expectEverySampleConverges(exampleField(file), r, e, box, sign);
        }
      });
    }
  }
});

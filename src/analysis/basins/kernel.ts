import type { Model } from "../../model/types.js";
import { emitExpression, literal, PRELUDE } from "../../model/codegen.js";
import type { Box } from "../numeric/window.js";
import type { CaptureRegion } from "../flow/capture.js";
import { LABEL_BLOW_UP, LABEL_LEFT_WINDOW, LABEL_UNDECIDED } from "./labels.js";
import {
  KERNEL_MIN_STEP,
  MAX_STEP_OF_HORIZON,
  NAN_STEP_SHRINK,
  SINGULAR_ARRIVAL_DISTANCE,
  STEP_ERROR_EXPONENT,
  STEP_MAX_GROWTH,
  STEP_MIN_SHRINK,
  STEP_SAFETY,
  ROSENBROCK_MAX_GROWTH,
  ROSENBROCK_MIN_SHRINK,
  ROSENBROCK_SAFETY,
  ROSENBROCK_SINGULAR_SHRINK,
  RODAS_MIN_RELATIVE_TOL,
  STIFFNESS_RATIO,
  STIFF_WINDOW_STEPS,
} from "../constants.js";
import { RODAS_A, RODAS_C, RODAS_GAMMA } from "../numeric/rosenbrock.js";
import {
  emitAlgebraicStep,
  emitCaptureTest,
  emitCycleCapture,
  emitHasLeftWindow,
  emitIsBlowUp,
  emitIsFarOutside,
  emitStepOutside,
  KERNEL_HERMITE_HELPERS,
  type CycleTarget,
} from "../flow/rules.js";

/**
 * The basin kernel: a Dormand–Prince 5(4) integrator generated for this model, with the
 * right-hand side inlined as straight-line scalar code (no arrays inside the step) and the fate
 * rules (flow/rules.ts) inlined with their constants: starts lie in the window, trajectories are
 * followed inside the feasible region. Written by hand because the general integrators
 * allocate per step and dominate the basin map's cost; it is validated against odex in tests.
 * A start whose steps collapse in a stiff stretch (as numeric/stiff-switch.ts decides: a window
 * of STIFF_WINDOW_STEPS accepted steps advancing less than one longest step, and the Jacobian's
 * most negative eigenvalue at least STIFFNESS_RATIO over that step) goes on with RODAS
 * (numeric/rosenbrock.ts's coefficients), generated here the same way, to its fate.
 *
 * The generated function has the signature (starts: Float64Array, out: Int32Array) => number,
 * labelling starts[2k], starts[2k+1] into out[k] and returning the total number of steps.
 */
export interface BasinTargets {
  /** Attractor ids in label order (label k is attractors[k]). */
  attractors: string[];
  sinks: { label: number; region: CaptureRegion }[];
  slowSinks: { label: number; center: [number, number] }[];
  cycles: CycleTarget[];
  /** Singular points: a step that passes within SINGULAR_ARRIVAL_DISTANCE ends there (rule 0, as the follower). */
  singular: { label: number; center: [number, number] }[];
}

export interface KernelSettings {
  horizon: number;
  initialStep: number;
  relativeTolerance: number;
  /** Absolute tolerance as a fraction of each window width. */
  absoluteOfWidth: number;
  maxSteps: number;
  /** Steps allowed outside the window to tell a blow-up from a plain exit. */
  maxStepsOutside: number;
}

// Dormand & Prince (1980), "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6(1): 19–26.
const A = [
  [],
  [1 / 5],
  [3 / 40, 9 / 40],
  [44 / 45, -56 / 15, 32 / 9],
  [19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729],
  [9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656],
  [35 / 384, 0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84],
];
const E = [71 / 57600, 0, -71 / 16695, 71 / 1920, -17253 / 339200, 22 / 525, -1 / 40];

/** Kernel code testing each attractor of `targets` after a step inside the window (fate rules 4, 6, 7), and the per-start state they keep. */
function emitAttractorTests(
  box: Box,
  targets: BasinTargets,
): { sinkTests: string; slowTests: string; cycleTests: string; perStart: string } {
  const L = literal;
  const sinkTests = targets.sinks
    .map(({ label, region }) => {
      const { setup, test } = emitCaptureTest(region, box);
      return `{ ${setup}
        if (${test}) { label = ${label}; break; } }`;
    })
    .join("\n      ");
  const slowTests = targets.slowSinks
    .map(
      ({ label, center }, i) => `{
        const q0 = (${L(center[0])} - x) * ${L(1 / box.width[0])}, q1 = (${L(center[1])} - y) * ${L(1 / box.width[1])};
        const d = Math.sqrt(q0 * q0 + q1 * q1);
        const v0 = k1a * ${L(1 / box.width[0])}, v1 = k1b * ${L(1 / box.width[1])};
        const heading = (v0 * q0 + v1 * q1) / ((Math.sqrt(v0 * v0 + v1 * v1) * d) || 1);
        ${emitAlgebraicStep(i, label)} }`,
    )
    .join("\n      ");
  const cycleTests = targets.cycles.map((c) => emitCycleCapture(c, box.width)).join("\n      ");
  const perStart = targets.slowSinks
    .map((_, i) => `let slowCount${i} = 0, slowLast${i} = Infinity;`)
    .join(" ");
  return { sinkTests, slowTests, cycleTests, perStart };
}

/** Kernel code for rule 0: the accepted step's chord passes within SINGULAR_ARRIVAL_DISTANCE (scaled) of a singular point. */
function emitSingularTests(points: BasinTargets["singular"], width: number[]): string {
  const L = literal;
  const [i0, i1] = [1 / width[0], 1 / width[1]];
  return points
    .map(
      ({ label, center }) => `if (outside === 0) {
        const ax = (xPrev - ${L(center[0])}) * ${L(i0)}, ay = (yPrev - ${L(center[1])}) * ${L(i1)};
        const dx = (x - xPrev) * ${L(i0)}, dy = (y - yPrev) * ${L(i1)}, len = dx * dx + dy * dy;
        let s = len > 0 ? -(ax * dx + ay * dy) / len : 0; s = s < 0 ? 0 : s > 1 ? 1 : s;
        const ex = ax + s * dx, ey = ay + s * dy;
        if (ex * ex + ey * ey <= ${L(SINGULAR_ARRIVAL_DISTANCE * SINGULAR_ARRIVAL_DISTANCE)}) { label = ${label}; break; } }`,
    )
    .join("\n      ");
}

/** Σ c_j k_j of one component ("a": first state, "b": second), zero coefficients left out. */
function combination(coefficients: number[], comp: "a" | "b"): string {
  return coefficients
    .map((c, j) => (c === 0 ? "" : `${literal(c)} * k${j + 1}${comp}`))
    .filter(Boolean)
    .join(" + ");
}

/**
 * Kernel code for one trial step of size h from (x, y): the Dormand–Prince stages, the 5th-order
 * solution (xn, yn), its derivative k7, and the scaled error components sa, sb.
 */
function emitTrialStep(f0: string, f1: string, atol: [number, number], rtol: number): string {
  const L = literal;
  const stage = (k: number) => {
    // stage k (1-based, k ≥ 2): s = y + h Σ a_kj k_j, then k_k = f(s)
    const terms = (comp: "a" | "b") =>
      A[k - 1].map((a, j) => (a === 0 ? "" : ` + h * ${L(a)} * k${j + 1}${comp}`)).join("");
    return `{ const s0 = x${terms("a")}, s1 = y${terms("b")}; k${k}a = ${f0}; k${k}b = ${f1}; }`;
  };
  return `${[2, 3, 4, 5, 6].map(stage).join("\n      ")}
      const xn = x + h * (${combination(A[6], "a")});
      const yn = y + h * (${combination(A[6], "b")});
      { const s0 = xn, s1 = yn; k7a = ${f0}; k7b = ${f1}; }
      const ea = h * (${combination(E, "a")});
      const eb = h * (${combination(E, "b")});
      const sa = ea / (${L(atol[0])} + ${L(rtol)} * Math.max(Math.abs(x), Math.abs(xn)));
      const sb = eb / (${L(atol[1])} + ${L(rtol)} * Math.max(Math.abs(y), Math.abs(yn)));`;
}

/**
 * Kernel code for one RODAS trial step of size h from (x, y) (numeric/rosenbrock.ts: stages
 * (I/(hγ) − J) u_i = f(y + Σ a_ij u_j) + Σ (c_ij/h) u_j, the 2×2 systems solved by Cramer's rule),
 * giving (xn, yn), k7 = f there and the scaled error of u_6; a singular or non-finite system
 * shrinks h and tries again.
 */
function emitRodasStep(f0: string, f1: string, jac: string[], atol: [number, number], rtol: number): string {
  const L = literal;
  const solve = (i: number, ra: string, rb: string) =>
    `{ const q0 = ${ra}, q1 = ${rb}; u${i}a = (m11 * q0 - m01 * q1) * idet; u${i}b = (m00 * q1 - m10 * q0) * idet; }`;
  const lines: string[] = [];
  lines.push(`const diag = 1 / (h * ${L(RODAS_GAMMA)});`);
  lines.push(
    `let j00, j01, j10, j11; { const s0 = x, s1 = y; j00 = ${jac[0]}; j01 = ${jac[1]}; j10 = ${jac[2]}; j11 = ${jac[3]}; }`,
  );
  lines.push(`const m00 = diag - j00, m01 = -j01, m10 = -j10, m11 = diag - j11;`);
  lines.push(`const det = m00 * m11 - m01 * m10;`);
  lines.push(
    `if (!(det !== 0 && det - det === 0)) { h *= ${L(ROSENBROCK_SINGULAR_SHRINK)}; if (h < ${L(KERNEL_MIN_STEP)}) { label = ${LABEL_UNDECIDED}; break; } continue; }`,
  );
  lines.push(`const idet = 1 / det;`);
  lines.push(`let u0a, u0b, u1a, u1b, u2a, u2b, u3a, u3b, u4a, u4b, u5a, u5b, pa = x, pb = y;`);
  for (let st = 0; st < 6; st++) {
    const c = RODAS_C[st];
    const cTerms = (comp: "a" | "b") => c.map((cj, j) => ` + ${L(cj)} * ih * u${j}${comp}`).join("");
    if (st === 0) {
      lines.push(`const ih = 1 / h;`);
      lines.push(solve(0, "k1a", "k1b"));
      continue;
    }
    const a = RODAS_A[Math.min(st, 4)];
    const aTerms = (comp: "a" | "b") => a.map((aj, j) => ` + ${L(aj)} * u${j}${comp}`).join("");
    // the sixth stage sits at the embedded solution: the fifth's point plus u_5
    const extra = (comp: "a" | "b") => (st === 5 ? ` + u4${comp}` : "");
    lines.push(
      `{ const s0 = x${aTerms("a")}${extra("a")}, s1 = y${aTerms("b")}${extra("b")}; pa = s0; pb = s1; const g0 = ${f0}, g1 = ${f1}; ${solve(st, `g0${cTerms("a")}`, `g1${cTerms("b")}`)} }`,
    );
  }
  lines.push(`xn = pa + u5a; yn = pb + u5b;`);
  lines.push(`{ const s0 = xn, s1 = yn; k7a = ${f0}; k7b = ${f1}; }`);
  lines.push(`sa = u5a / (${L(atol[0])} + ${L(rtol)} * Math.max(Math.abs(x), Math.abs(xn)));`);
  lines.push(`sb = u5b / (${L(atol[1])} + ${L(rtol)} * Math.max(Math.abs(y), Math.abs(yn)));`);
  return lines.join("\n        ");
}

/** Kernel code: whether the Jacobian at (x, y) is stiff over a step of `span` (as StiffnessWatch.isStiff, n = 2). */
function emitStiffTest(jac: string[], span: number): string {
  const L = literal;
  return `(() => { const s0 = x, s1 = y; const a = ${jac[0]}, b = ${jac[1]}, c = ${jac[2]}, d = ${jac[3]};
        const half = 0.5 * (a + d), disc = half * half - (a * d - b * c);
        const low = disc > 0 ? half - Math.sqrt(disc) : half;
        return low === low && -low * ${L(span)} >= ${L(STIFFNESS_RATIO)}; })()`;
}

/** Kernel code for the accepted or rejected step's size factor: Dormand–Prince's, or RODAS's once stiff. */
function emitStepFactor(): string {
  const L = literal;
  return `if (!stiff) factor = err === 0 ? ${L(STEP_MAX_GROWTH)} : Math.min(${L(STEP_MAX_GROWTH)}, Math.max(${L(STEP_MIN_SHRINK)}, ${L(STEP_SAFETY)} * Math.exp(${L(STEP_ERROR_EXPONENT)} * Math.log(err))));
      else factor = err === 0 ? ${L(ROSENBROCK_MAX_GROWTH)} : Math.min(${L(ROSENBROCK_MAX_GROWTH)}, Math.max(${L(ROSENBROCK_MIN_SHRINK)}, ${L(ROSENBROCK_SAFETY)} * Math.exp(-0.25 * Math.log(err))));`;
}

/** Kernel code after an accepted explicit step: a window of STIFF_WINDOW_STEPS that advanced less than one longest step, at a stiff point, turns RODAS on. */
function emitStiffnessWatch(jac: string[], maxStep: number): string {
  return `if (!stiff && ++windowSteps >= ${STIFF_WINDOW_STEPS}) {
        if (t - windowT < ${literal(maxStep)} && ${emitStiffTest(jac, maxStep)}) stiff = true;
        windowT = t; windowSteps = 0;
      }`;
}

/** The kernel's source for the attractors `targets`: starts in the window `box`, trajectories followed inside `bounds`. */
export function generateBasinKernel(
  model: Model,
  box: Box,
  bounds: Box,
  targets: BasinTargets,
  settings: KernelSettings,
): string {
  const values = Array.from(model.parameterValues);
  const f0 = emitExpression(model.equations[0].node, { parameterValues: values });
  const f1 = emitExpression(model.equations[1].node, { parameterValues: values });
  const L = literal;
  const { sinkTests, slowTests, cycleTests, perStart } = emitAttractorTests(box, targets);
  const [w0, w1] = box.width;
  const atol0 = settings.absoluteOfWidth * w0,
    atol1 = settings.absoluteOfWidth * w1;
  const rtol = settings.relativeTolerance;
  const maxStep = settings.horizon * MAX_STEP_OF_HORIZON;
  const jac = model.jacobian.flatMap((row) =>
    row.map((e) => emitExpression(e.node, { parameterValues: values })),
  );
  // RODAS at no tighter a tolerance than it reaches economically (as integrateFlow's switch)
  const loosen = Math.max(1, RODAS_MIN_RELATIVE_TOL / rtol);
  const stiffAtol: [number, number] = [atol0 * loosen, atol1 * loosen];
  return `${PRELUDE}
${KERNEL_HERMITE_HELPERS}
return function basinKernel(starts, out) {
  let totalSteps = 0;
  const n = out.length;
  for (let idx = 0; idx < n; idx++) {
    let x = starts[2 * idx], y = starts[2 * idx + 1];
    let t = 0, h = ${L(Math.min(settings.initialStep, maxStep))}, steps = 0, outside = 0, tExit = 0, label = ${LABEL_UNDECIDED};
    let k1a, k1b, k2a, k2b, k3a, k3b, k4a, k4b, k5a, k5b, k6a, k6b, k7a, k7b;
    { const s0 = x, s1 = y; k1a = ${f0}; k1b = ${f1}; }
    let xPrev = x, yPrev = y;
    let stiff = false, windowT = 0, windowSteps = 0;
    ${perStart}
    for (;;) {
      if (!(k1a === k1a && k1b === k1b) || k1a === Infinity || k1a === -Infinity || k1b === Infinity || k1b === -Infinity) { label = outside > 0 ? ${LABEL_LEFT_WINDOW} : ${LABEL_UNDECIDED}; break; }
      if (t >= ${L(settings.horizon)} || steps >= ${settings.maxSteps}) { label = outside > 0 ? ${LABEL_LEFT_WINDOW} : ${LABEL_UNDECIDED}; break; }
      if (t + h > ${L(settings.horizon)}) h = ${L(settings.horizon)} - t;
      let xn, yn, sa, sb, factor;
      if (!stiff) {
      ${emitTrialStep(f0, f1, [atol0, atol1], rtol).replace(/const (xn|yn|sa|sb) = /g, "$1 = ")}
      } else {
        ${emitRodasStep(f0, f1, jac, stiffAtol, rtol * loosen)}
      }
      const err = Math.sqrt(0.5 * (sa * sa + sb * sb));
      if (!(err === err)) { h *= ${L(NAN_STEP_SHRINK)}; if (h < ${L(KERNEL_MIN_STEP)}) { label = ${LABEL_UNDECIDED}; break; } continue; }
      // step factor 0.9 err^(-1/5) (RODAS: -1/4) through exp and log: V8's Math.pow costs several multiplies
      ${emitStepFactor()}
      if (err > 1) { h *= Math.min(1, factor); continue; }
      xPrev = x; yPrev = y;
      const tPrev = t, hs = h, f0a = k1a, f0b = k1b;
      t += h; x = xn; y = yn; k1a = k7a; k1b = k7b; steps++;
      h = Math.min(h * factor, ${L(maxStep)});
      ${emitStiffnessWatch(jac, maxStep)}
      ${emitSingularTests(targets.singular, box.width)}
      ${emitStepOutside(bounds, box.width)}
      if (${emitHasLeftWindow("off")} && outside === 0) tExit = tPrev;
      if (${emitIsFarOutside("offEnd")}) {
        // as followTrajectory: a blow-up only if faster than exponential, else a plain exit
        const zx = x * ${L(1 / w0)}, zy = y * ${L(1 / w1)}, vx = k1a * ${L(1 / w0)}, vy = k1b * ${L(1 / w1)};
        const eFolding = Math.sqrt(zx * zx + zy * zy) / Math.sqrt(vx * vx + vy * vy);
        label = ${emitIsBlowUp("eFolding", "t - tExit")} ? ${LABEL_BLOW_UP} : ${LABEL_LEFT_WINDOW};
        break;
      }
      if (${emitHasLeftWindow("off")} || outside > 0) {
        if (++outside > ${settings.maxStepsOutside}) { label = ${LABEL_LEFT_WINDOW}; break; }
        continue;
      }
      ${sinkTests}
      ${slowTests}
      ${cycleTests}
    }
    out[idx] = label;
    totalSteps += steps;
  }
  return totalSteps;
};`;
}

export type BasinKernel = (starts: Float64Array, out: Int32Array) => number;

/** Instantiates kernel source; the source comes only from whitelisted expression trees and numbers. */
export function instantiateBasinKernel(source: string): BasinKernel {
  // eslint-disable-next-line no-new-func -- the source is generateBasinKernel's, from whitelisted trees and numbers
  return new Function(source)() as BasinKernel;
}

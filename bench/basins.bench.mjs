/**
 * The basin map's cost, as ratios measured side by side in one run:
 *  a. trajectories per second of keel's generated kernel against a plain generic Dormand–Prince
 *     5(4) integrator written by hand (and odex, for scale), same model, tolerances and stops;
 *  b. the speed-up of 2 pool workers over 1, beside the speed-up 2 plain busy processes get;
 *  c. trajectories adaptive refinement needs at 1024 x 1024 against a uniform grid.
 * Run after a build: `npm run bench` (or `npx tsc -p tsconfig.json && node bench/basins.bench.mjs`).
 */
import { spawn } from "node:child_process";
import { readFileSync } from "node:fs";
import {
  COMPETITION_SPEC,
  gridStarts,
  median,
  planFor,
  prepare,
  seconds,
  specPath,
  timeOnce,
} from "./common.mjs";
import { analyze } from "../dist/index.js";
import { instantiateBasinKernel } from "../dist/analysis/basins/kernel.js";
import {
  BASIN_ABSOLUTE_TOL_OF_WIDTH,
  BASIN_MAX_STEPS,
  BASIN_MAX_STEPS_OUTSIDE,
  BASIN_RELATIVE_TOL,
  BLOWUP_EFOLDING_FRACTION,
  BLOWUP_WINDOWS,
  MAX_STEP_OF_HORIZON as BASIN_MAX_STEP_OF_HORIZON,
  WINDOW_EXIT_SLACK,
} from "../dist/analysis/constants.js";
import { labelName } from "../dist/analysis/basins/labels.js";
import { buildFlowContext, followTrajectory } from "../dist/analysis/flow/follow.js";
import { tolerancesFor } from "../dist/analysis/numeric/integrate.js";
import { createAnalysisPool } from "../dist/cli/pool.js";

const TARGET_KERNEL_SPEEDUP = 1.2;
const TARGET_PARALLEL_EFFICIENCY = 0.85;
const TARGET_REFINEMENT_RATIO = 0.1;
/** Cells per side of the timed grid. */
const GRID = 200;
/** Timed rounds per subject, alternating who goes first; the median is kept. */
const ROUNDS = 5;
/** Every ODEX_STRIDE-th start of the grid also runs through odex, for scale (odex is several times slower). */
const ODEX_STRIDE = 20;
/** Cells per side of section b's batch: large enough that one worker needs about a second. */
const PARALLEL_GRID = 400;
/** Workers compared in section b. */
const WORKERS = 2;
/** Iterations of the busy processes' first loop; then scaled so one busy process runs as long as the 1-worker pool. */
const BUSY_FIRST_ITERATIONS = 1e8;
const LABEL_LEFT_WINDOW = -1,
  LABEL_BLOW_UP = -2,
  LABEL_UNDECIDED = -3,
  CONTINUE = -100;

// ---------------------------------------------------------------- the hand-written reference

/** Right-hand sides written by hand as f(t, y, out), parameters as closure constants (as in rhs.bench.mjs). */
const HAND_RHS = {
  "reservoir-competition": () => {
    const r1 = 0.45,
      r2 = 0.3,
      K1 = 40000,
      K2 = 60000,
      a12 = 0.5,
      a21 = 0.6;
    return (t, y, out) => {
      const N = y[0],
        S = y[1];
      out[0] = r1 * N * (1 - (N + a12 * S) / K1);
      out[1] = r2 * S * (1 - (S + a21 * N) / K2);
    };
  },
  "grazer-forage": () => {
    const r = 1.2,
      K = 800,
      c = 20,
      h2 = 60 * 60,
      yc = 0.06,
      m = 0.3,
      q = 0.075;
    return (t, y, out) => {
      const V = y[0],
        G = y[1],
        V2 = V * V;
      const intake = (c * V2) / (h2 + V2);
      out[0] = r * V * (1 - V / K) - G * intake;
      out[1] = G * (yc * intake - m - q * G);
    };
  },
};

// Dormand & Prince (1980), "A family of embedded Runge–Kutta formulae", J. Comput. Appl. Math. 6(1): 19–26.
const a21 = 1 / 5;
const a31 = 3 / 40,
  a32 = 9 / 40;
const a41 = 44 / 45,
  a42 = -56 / 15,
  a43 = 32 / 9;
const a51 = 19372 / 6561,
  a52 = -25360 / 2187,
  a53 = 64448 / 6561,
  a54 = -212 / 729;
const a61 = 9017 / 3168,
  a62 = -355 / 33,
  a63 = 46732 / 5247,
  a64 = 49 / 176,
  a65 = -5103 / 18656;
const b1 = 35 / 384,
  b3 = 500 / 1113,
  b4 = 125 / 192,
  b5 = -2187 / 6784,
  b6 = 11 / 84;
const c2 = 1 / 5,
  c3 = 3 / 10,
  c4 = 4 / 5,
  c5 = 8 / 9;
const e1 = 71 / 57600,
  e3 = -71 / 16695,
  e4 = 71 / 1920,
  e5 = -17253 / 339200,
  e6 = 22 / 525,
  e7 = -1 / 40;

/**
 * A plain generic Dormand–Prince 5(4) integrator, written the usual way (Hairer, Nørsett and
 * Wanner, Solving Ordinary Differential Equations I, 2nd ed., sections II.4–II.5, from memory): n-dimensional,
 * Float64Array work vectors allocated once, f(t, y, out) with no allocation, one loop over the
 * components per stage, FSAL, RMS error norm, and the textbook step-size factor 0.9 err^(-1/5)
 * through Math.pow, clamped to [0.2, 5], and a longest step. After each accepted step it asks
 * rules.onStep for a label; CONTINUE integrates on.
 */
function makeDormandPrince(n, f, rtol, atol) {
  let k1 = new Float64Array(n),
    k7 = new Float64Array(n);
  const k2 = new Float64Array(n),
    k3 = new Float64Array(n),
    k4 = new Float64Array(n),
    k5 = new Float64Array(n),
    k6 = new Float64Array(n);
  const ys = new Float64Array(n),
    yn = new Float64Array(n);
  return function integrate(y, horizon, h, maxStep, maxSteps, rules) {
    let t = 0,
      steps = 0;
    f(t, y, k1);
    for (;;) {
      for (let i = 0; i < n; i++) if (!Number.isFinite(k1[i])) return rules.onNonFinite();
      if (t >= horizon || steps >= maxSteps) return rules.onEnd();
      if (t + h > horizon) h = horizon - t;
      for (let i = 0; i < n; i++) ys[i] = y[i] + h * a21 * k1[i];
      f(t + c2 * h, ys, k2);
      for (let i = 0; i < n; i++) ys[i] = y[i] + h * (a31 * k1[i] + a32 * k2[i]);
      f(t + c3 * h, ys, k3);
      for (let i = 0; i < n; i++) ys[i] = y[i] + h * (a41 * k1[i] + a42 * k2[i] + a43 * k3[i]);
      f(t + c4 * h, ys, k4);
      for (let i = 0; i < n; i++) ys[i] = y[i] + h * (a51 * k1[i] + a52 * k2[i] + a53 * k3[i] + a54 * k4[i]);
      f(t + c5 * h, ys, k5);
      for (let i = 0; i < n; i++)
        ys[i] = y[i] + h * (a61 * k1[i] + a62 * k2[i] + a63 * k3[i] + a64 * k4[i] + a65 * k5[i]);
      f(t + h, ys, k6);
      for (let i = 0; i < n; i++)
        yn[i] = y[i] + h * (b1 * k1[i] + b3 * k3[i] + b4 * k4[i] + b5 * k5[i] + b6 * k6[i]);
      f(t + h, yn, k7);
      let err = 0;
      for (let i = 0; i < n; i++) {
        const e = h * (e1 * k1[i] + e3 * k3[i] + e4 * k4[i] + e5 * k5[i] + e6 * k6[i] + e7 * k7[i]);
        const scaled = e / (atol[i] + rtol * Math.max(Math.abs(y[i]), Math.abs(yn[i])));
        err += scaled * scaled;
      }
      err = Math.sqrt(err / n);
      if (Number.isNaN(err)) {
        h *= 0.25;
        if (h < 1e-300) return LABEL_UNDECIDED;
        continue;
      }
      const factor = err === 0 ? 5 : Math.min(5, Math.max(0.2, 0.9 * Math.pow(err, -0.2)));
      if (err > 1) {
        h *= Math.min(1, factor);
        continue;
      }
      const tPrev = t;
      t += h;
      steps++;
      y.set(yn);
      const swap = k1;
      k1 = k7;
      k7 = swap;
      h = Math.min(h * factor, maxStep);
      const label = rules.onStep(t, tPrev, y, k1);
      if (label !== CONTINUE) return label;
    }
  };
}

/**
 * The kernel's stopping rules, written generically: window exit, and blow-up when farther than
 * BLOWUP_WINDOWS and faster than exponential (e-folding time under BLOWUP_EFOLDING_FRACTION of
 * the time since the exit), then the capture ellipses of plan.targets.
 */
function makeStopRules(plan) {
  const { lo, hi, width } = plan.box;
  const sinks = plan.targets.sinks.map(({ label, region }) => ({ label, ...region }));
  let outside = 0,
    tExit = 0;
  const scaledNorm = (v) => {
    let sum = 0;
    for (let i = 0; i < v.length; i++) sum += (v[i] / width[i]) ** 2;
    return Math.sqrt(sum);
  };
  return {
    reset() {
      outside = 0;
      tExit = 0;
    },
    onStep(t, tPrev, y, dydt) {
      let off = -Infinity;
      for (let i = 0; i < y.length; i++)
        off = Math.max(off, (lo[i] - y[i]) / width[i], (y[i] - hi[i]) / width[i]);
      if (off > WINDOW_EXIT_SLACK && outside === 0) tExit = tPrev;
      if (off > BLOWUP_WINDOWS)
        return scaledNorm(y) / scaledNorm(dydt) < BLOWUP_EFOLDING_FRACTION * (t - tExit)
          ? LABEL_BLOW_UP
          : LABEL_LEFT_WINDOW;
      if (off > WINDOW_EXIT_SLACK || outside > 0)
        return ++outside > BASIN_MAX_STEPS_OUTSIDE ? LABEL_LEFT_WINDOW : CONTINUE;
      for (const s of sinks) {
        const z0 = (y[0] - s.center[0]) / width[0],
          z1 = (y[1] - s.center[1]) / width[1];
        if (s.p[0] * z0 * z0 + 2 * s.p[1] * z0 * z1 + s.p[3] * z1 * z1 < s.level) return s.label;
      }
      return CONTINUE;
    },
    onEnd() {
      return outside > 0 ? LABEL_LEFT_WINDOW : LABEL_UNDECIDED;
    },
    onNonFinite() {
      return outside > 0 ? LABEL_LEFT_WINDOW : LABEL_UNDECIDED;
    },
  };
}

function referenceLabeller(plan, rhs, settings) {
  const atol = Float64Array.from(plan.box.width, (w) => BASIN_ABSOLUTE_TOL_OF_WIDTH * w);
  const integrate = makeDormandPrince(2, rhs, BASIN_RELATIVE_TOL, atol);
  const rules = makeStopRules(plan);
  const maxStep = settings.horizon * BASIN_MAX_STEP_OF_HORIZON;
  const y = new Float64Array(2);
  return (starts, out) => {
    for (let k = 0; k < out.length; k++) {
      y[0] = starts[2 * k];
      y[1] = starts[2 * k + 1];
      rules.reset();
      out[k] = integrate(
        y,
        settings.horizon,
        Math.min(settings.initialStep, maxStep),
        maxStep,
        BASIN_MAX_STEPS,
        rules,
      );
    }
  };
}

// ---------------------------------------------------------------- a. one thread

function benchKernel(name) {
  const { model, results, plan, settings } = planFor(name);
  const starts = gridStarts(plan.box, GRID);
  const count = GRID * GRID;
  const kernel = instantiateBasinKernel(plan.kernelSource);
  const reference = referenceLabeller(plan, HAND_RHS[name](), settings);
  const kernelLabels = new Int32Array(count),
    referenceLabels = new Int32Array(count);
  const warm = starts.subarray(0, 2 * 2000);
  kernel(warm, new Int32Array(2000));
  reference(warm, new Int32Array(2000));
  const times = { kernel: [], reference: [] };
  for (let round = 0; round < ROUNDS; round++) {
    const order = round % 2 === 0 ? ["kernel", "reference"] : ["reference", "kernel"];
    for (const who of order) {
      times[who].push(
        who === "kernel"
          ? timeOnce(() => kernel(starts, kernelLabels))
          : timeOnce(() => reference(starts, referenceLabels)),
      );
    }
  }
  let disagree = 0;
  for (let k = 0; k < count; k++) if (kernelLabels[k] !== referenceLabels[k]) disagree++;

  // odex through followTrajectory, on a subsample, for scale, at the basin map's tolerances
  const ctx = {
    ...buildFlowContext(model, results.equilibria, plan.box, 1),
    tolerances: tolerancesFor(plan.box.width, BASIN_RELATIVE_TOL, BASIN_ABSOLUTE_TOL_OF_WIDTH),
  };
  const attractors = plan.targets.attractors;
  let odexCount = 0,
    odexDisagree = 0;
  const odexTime = timeOnce(() => {
    for (let k = 0; k < count; k += ODEX_STRIDE) {
      const { fate } = followTrajectory(ctx, [starts[2 * k], starts[2 * k + 1]], {
        horizon: settings.horizon,
        maxPathPoints: 2,
        detectRecurrence: false,
      });
      const odexName = fate.kind === "equilibrium" || fate.kind === "cycle" ? fate.target : fate.kind;
      if (odexName !== labelName(kernelLabels[k], attractors)) odexDisagree++;
      odexCount++;
    }
  });
  const kernelRate = count / median(times.kernel),
    referenceRate = count / median(times.reference);
  return {
    name,
    count,
    kernelRate,
    referenceRate,
    odexRate: odexCount / odexTime,
    speedup: kernelRate / referenceRate,
    disagree,
    odexCount,
    odexDisagree,
  };
}

// ---------------------------------------------------------------- b. parallel efficiency

/** A plain busy process: waits for a line on stdin, runs a fixed floating-point loop, prints its checksum. */
const BUSY_SOURCE = `
const iterations = Number(process.argv[1]);
process.stdin.once("data", () => {
  let x = 0;
  for (let i = 0; i < iterations; i++) x = x * 0.999999 + (i & 7);
  process.stdout.write(String(x));
  process.exit(0);
});
process.stdout.write("ready\\n");`;

function startBusy(iterations) {
  const child = spawn(process.execPath, ["-e", BUSY_SOURCE, String(iterations)], {
    stdio: ["pipe", "pipe", "inherit"],
  });
  let output = "";
  const ready = new Promise((resolve) => child.stdout.once("data", resolve));
  const done = new Promise((resolve, reject) => {
    child.stdout.on("data", (d) => {
      output += d;
    });
    child.on("exit", (code) =>
      code === 0 ? resolve(output) : reject(new Error(`busy process exit ${code}`)),
    );
  });
  return { ready, go: () => child.stdin.end("go\n"), done };
}

/** Wall time for `count` busy processes started together (start-up excluded: they wait for the go). */
async function timeBusy(count, iterations) {
  const children = Array.from({ length: count }, () => startBusy(iterations));
  await Promise.all(children.map((c) => c.ready));
  const start = process.hrtime.bigint();
  children.forEach((c) => c.go());
  await Promise.all(children.map((c) => c.done));
  return seconds(start);
}

async function timePool(pool, source, starts) {
  const start = process.hrtime.bigint();
  const labels = await pool.evaluator(source)(starts);
  return { time: seconds(start), labels };
}

async function benchParallel(name) {
  const { plan } = planFor(name);
  const starts = gridStarts(plan.box, PARALLEL_GRID);
  const single = createAnalysisPool(1),
    several = createAnalysisPool(WORKERS);
  try {
    // warm-up: threads started, kernel compiled and optimised in every worker
    await timePool(single, plan.kernelSource, starts);
    await timePool(several, plan.kernelSource, starts);
    // the busy loop lasts as long as the 1-worker batch, so both see the same stretch of machine load
    await timeBusy(1, BUSY_FIRST_ITERATIONS);
    const iterations = Math.round(
      BUSY_FIRST_ITERATIONS *
        ((await timePool(single, plan.kernelSource, starts)).time /
          (await timeBusy(1, BUSY_FIRST_ITERATIONS))),
    );
    const times = { pool1: [], poolN: [], busy1: [], busyN: [] };
    let reference = null,
      differ = 0;
    for (let round = 0; round < ROUNDS; round++) {
      const a = await timePool(single, plan.kernelSource, starts);
      const b = await timePool(several, plan.kernelSource, starts);
      times.pool1.push(a.time);
      times.poolN.push(b.time);
      reference ??= a.labels;
      for (const labels of [a.labels, b.labels])
        for (let k = 0; k < labels.length; k++) if (labels[k] !== reference[k]) differ++;
      times.busy1.push(await timeBusy(1, iterations));
      times.busyN.push(await timeBusy(WORKERS, iterations));
    }
    const poolSpeedup = median(times.pool1) / median(times.poolN);
    // N busy processes do N times the work of one
    const machineSpeedup = (WORKERS * median(times.busy1)) / median(times.busyN);
    return {
      name,
      pool1: median(times.pool1),
      poolN: median(times.poolN),
      busy1: median(times.busy1),
      busyN: median(times.busyN),
      poolSpeedup,
      machineSpeedup,
      efficiency: poolSpeedup / machineSpeedup,
      differ,
    };
  } finally {
    await single.close();
    await several.close();
  }
}

// ---------------------------------------------------------------- c. adaptive refinement

function benchRefinement() {
  const cases = [
    ["reservoir-competition", readFileSync(specPath("reservoir-competition"), "utf8")],
    ["grazer-forage", readFileSync(specPath("grazer-forage"), "utf8")],
    ["competition (Strogatz 6.4)", JSON.stringify(COMPETITION_SPEC)],
  ];
  return cases.map(([name, text]) => {
    const { basins } = analyze(prepare(name, text));
    if (basins.resolution !== 1024)
      throw new Error(`${name}: basin resolution ${basins.resolution}, expected the default 1024`);
    return {
      name,
      trajectories: basins.trajectories,
      uniform: basins.uniformTrajectories,
      ratio: basins.trajectories / basins.uniformTrajectories,
      boundary: basins.errorBound,
    };
  });
}

// ---------------------------------------------------------------- report

const verdict = (ok) => (ok ? "ok" : "SLOW");
const pad = (s, w) => String(s).padEnd(w);
const num = (v, w, digits = 0) => v.toFixed(digits).padStart(w);
let failed = false;

console.log(
  `basins bench a: ${GRID}x${GRID} grid, one thread, median of ${ROUNDS} rounds; trajectories per second; target kernel/reference >= ${TARGET_KERNEL_SPEEDUP}x`,
);
console.log(
  `${pad("spec", 24)}${"kernel".padStart(10)}${"generic".padStart(10)}${"odex".padStart(10)}${"kernel/generic".padStart(16)}${"kernel/odex".padStart(13)}  ${pad("", 5)}label disagreements`,
);
const kernelRows = [];
for (const name of ["reservoir-competition", "grazer-forage"]) {
  const r = benchKernel(name);
  kernelRows.push(r);
  console.log(
    `${pad(name, 24)}${num(r.kernelRate, 10)}${num(r.referenceRate, 10)}${num(r.odexRate, 10)}${num(r.speedup, 16, 2)}${num(r.kernelRate / r.odexRate, 13, 2)}  ${pad(verdict(r.speedup >= TARGET_KERNEL_SPEEDUP), 5)}generic ${r.disagree}/${r.count}, odex ${r.odexDisagree}/${r.odexCount}`,
  );
  if (r.disagree > 0) {
    failed = true;
    console.error(`${name}: kernel and generic reference disagree on ${r.disagree} starts`);
  }
}

console.log(
  `\nbasins bench b: ${WORKERS} pool workers against 1 on a ${PARALLEL_GRID}x${PARALLEL_GRID} batch, beside ${WORKERS} busy processes against 1; seconds, median of ${ROUNDS}; target efficiency >= ${TARGET_PARALLEL_EFFICIENCY}`,
);
console.log(
  `${pad("spec", 24)}${"pool 1".padStart(8)}${`pool ${WORKERS}`.padStart(8)}${"busy 1".padStart(8)}${`busy ${WORKERS}`.padStart(8)}${"pool speed-up".padStart(15)}${"machine".padStart(9)}${"efficiency".padStart(12)}`,
);
const parallel = await benchParallel("grazer-forage");
console.log(
  `${pad(parallel.name, 24)}${num(parallel.pool1, 8, 3)}${num(parallel.poolN, 8, 3)}${num(parallel.busy1, 8, 3)}${num(parallel.busyN, 8, 3)}${num(parallel.poolSpeedup, 15, 2)}${num(parallel.machineSpeedup, 9, 2)}${num(parallel.efficiency, 12, 2)}  ${verdict(parallel.efficiency >= TARGET_PARALLEL_EFFICIENCY)}`,
);
if (parallel.differ > 0) {
  failed = true;
  console.error(`pool labels differ between worker counts on ${parallel.differ} starts`);
}

console.log(
  `\nbasins bench c: trajectories of adaptive refinement at 1024 x 1024 against a uniform grid; target < ${TARGET_REFINEMENT_RATIO}`,
);
console.log(
  `${pad("spec", 28)}${"adaptive".padStart(10)}${"uniform".padStart(10)}${"ratio".padStart(9)}${"errorBound".padStart(12)}`,
);
const refinement = benchRefinement();
for (const r of refinement) {
  console.log(
    `${pad(r.name, 28)}${num(r.trajectories, 10)}${num(r.uniform, 10)}${num(r.ratio, 9, 4)}${num(r.boundary, 12, 5)}  ${verdict(r.ratio < TARGET_REFINEMENT_RATIO)}`,
  );
}

console.log(
  JSON.stringify({
    bench: "basins",
    targets: {
      kernelOverGeneric: TARGET_KERNEL_SPEEDUP,
      parallelEfficiency: TARGET_PARALLEL_EFFICIENCY,
      refinementRatio: TARGET_REFINEMENT_RATIO,
    },
    kernelOverGeneric: Object.fromEntries(kernelRows.map((r) => [r.name, Number(r.speedup.toFixed(3))])),
    kernelOverOdex: Object.fromEntries(
      kernelRows.map((r) => [r.name, Number((r.kernelRate / r.odexRate).toFixed(3))]),
    ),
    parallel: {
      workers: WORKERS,
      poolSpeedup: Number(parallel.poolSpeedup.toFixed(3)),
      machineSpeedup: Number(parallel.machineSpeedup.toFixed(3)),
      efficiency: Number(parallel.efficiency.toFixed(3)),
    },
    refinementRatio: Object.fromEntries(refinement.map((r) => [r.name, Number(r.ratio.toFixed(5))])),
  }),
);
if (failed) process.exit(1);

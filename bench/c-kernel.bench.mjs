/**
 * The limit, as a ratio: trajectories per second of keel's generated basin kernel against a
 * plain C Dormand–Prince 5(4) of the same model, compiled by the system's `cc -O2`, on the same
 * 200 x 200 grid of starts, horizon, tolerances and stopping rules. Both must label every start
 * the same. Skipped, with a note, when no C compiler is found.
 * Run after a build: `npm run bench` (or `npx tsc -p tsconfig.json && node bench/c-kernel.bench.mjs`).
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { COMPETITION_SPEC, gridStarts, median, planFor, timeOnce } from "./common.mjs";
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

/** Goal of the issue that asked for this bench: the kernel at least as fast as plain C. */
const TARGET = 1.0;
const GRID = 200;
const ROUNDS = 5;
const LABEL_LEFT_WINDOW = -1,
  LABEL_BLOW_UP = -2,
  LABEL_UNDECIDED = -3;

/** A double as C source: JavaScript's shortest round-trip form, which strtod reads back exactly. */
const c = (v) => {
  if (!Number.isFinite(v)) throw new Error(`not a finite constant: ${v}`);
  const s = String(v);
  return /[.eE]/.test(s) ? s : `${s}.0`;
};

/**
 * The C program: the competition model's right-hand side written by hand, the Dormand–Prince
 * 5(4) pair (Dormand & Prince 1980, J. Comput. Appl. Math. 6(1): 19–26; coefficients as in
 * Hairer, Nørsett and Wanner, Solving ODEs I, 2nd ed., §II.5, from memory) with FSAL, RMS error
 * norm, step factor 0.9 err^(-1/5) in [0.2, 5], a longest step, and the kernel's stopping rules
 * (capture ellipses, window exit, blow-up) with the plan's numbers baked in. Reads the starts
 * from stdin, labels them ROUNDS times, writes the labels to stdout and each round's seconds
 * (CLOCK_MONOTONIC, labelling only) to stderr.
 */
function cSource(plan, settings) {
  const { lo, hi, width } = plan.box;
  const sinks = plan.targets.sinks;
  const maxStep = settings.horizon * BASIN_MAX_STEP_OF_HORIZON;
  const sinkTests = sinks
    .map(({ label, region: s }) => {
      const z = `const double z0 = (x - ${c(s.center[0])}) / ${c(width[0])}, z1 = (y - ${c(s.center[1])}) / ${c(width[1])};`;
      const q = `${c(s.p[0])} * z0 * z0 + 2.0 * ${c(s.p[1])} * z0 * z1 + ${c(s.p[3])} * z1 * z1`;
      return `      { ${z} if (${q} < ${c(s.level)}) return ${label}; }`;
    })
    .join("\n");
  return `#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

static inline void rhs(double x, double y, double *fx, double *fy) {
  *fx = x * (3.0 - x - 2.0 * y);
  *fy = y * (2.0 - x - y);
}

static const double RTOL = ${c(BASIN_RELATIVE_TOL)};
static const double ATOL0 = ${c(BASIN_ABSOLUTE_TOL_OF_WIDTH * width[0])}, ATOL1 = ${c(BASIN_ABSOLUTE_TOL_OF_WIDTH * width[1])};
static const double HORIZON = ${c(settings.horizon)}, MAX_STEP = ${c(maxStep)}, H0 = ${c(Math.min(settings.initialStep, maxStep))};

static double offWindow(double x, double y) {
  double off = (${c(lo[0])} - x) / ${c(width[0])};
  off = fmax(off, (x - ${c(hi[0])}) / ${c(width[0])});
  off = fmax(off, (${c(lo[1])} - y) / ${c(width[1])});
  return fmax(off, (y - ${c(hi[1])}) / ${c(width[1])});
}

static int32_t label(double x, double y) {
  double t = 0, h = H0, tExit = 0;
  long steps = 0, outside = 0;
  double k1x, k1y, k2x, k2y, k3x, k3y, k4x, k4y, k5x, k5y, k6x, k6y, k7x, k7y;
  rhs(x, y, &k1x, &k1y);
  for (;;) {
    if (!isfinite(k1x) || !isfinite(k1y)) return outside > 0 ? ${LABEL_LEFT_WINDOW} : ${LABEL_UNDECIDED};
    if (t >= HORIZON || steps >= ${BASIN_MAX_STEPS}) return outside > 0 ? ${LABEL_LEFT_WINDOW} : ${LABEL_UNDECIDED};
    if (t + h > HORIZON) h = HORIZON - t;
    rhs(x + h * (1.0 / 5) * k1x, y + h * (1.0 / 5) * k1y, &k2x, &k2y);
    rhs(x + h * (3.0 / 40 * k1x + 9.0 / 40 * k2x), y + h * (3.0 / 40 * k1y + 9.0 / 40 * k2y), &k3x, &k3y);
    rhs(x + h * (44.0 / 45 * k1x - 56.0 / 15 * k2x + 32.0 / 9 * k3x),
        y + h * (44.0 / 45 * k1y - 56.0 / 15 * k2y + 32.0 / 9 * k3y), &k4x, &k4y);
    rhs(x + h * (19372.0 / 6561 * k1x - 25360.0 / 2187 * k2x + 64448.0 / 6561 * k3x - 212.0 / 729 * k4x),
        y + h * (19372.0 / 6561 * k1y - 25360.0 / 2187 * k2y + 64448.0 / 6561 * k3y - 212.0 / 729 * k4y), &k5x, &k5y);
    rhs(x + h * (9017.0 / 3168 * k1x - 355.0 / 33 * k2x + 46732.0 / 5247 * k3x + 49.0 / 176 * k4x - 5103.0 / 18656 * k5x),
        y + h * (9017.0 / 3168 * k1y - 355.0 / 33 * k2y + 46732.0 / 5247 * k3y + 49.0 / 176 * k4y - 5103.0 / 18656 * k5y), &k6x, &k6y);
    const double xn = x + h * (35.0 / 384 * k1x + 500.0 / 1113 * k3x + 125.0 / 192 * k4x - 2187.0 / 6784 * k5x + 11.0 / 84 * k6x);
    const double yn = y + h * (35.0 / 384 * k1y + 500.0 / 1113 * k3y + 125.0 / 192 * k4y - 2187.0 / 6784 * k5y + 11.0 / 84 * k6y);
    rhs(xn, yn, &k7x, &k7y);
    const double ex = h * (71.0 / 57600 * k1x - 71.0 / 16695 * k3x + 71.0 / 1920 * k4x - 17253.0 / 339200 * k5x + 22.0 / 525 * k6x - 1.0 / 40 * k7x);
    const double ey = h * (71.0 / 57600 * k1y - 71.0 / 16695 * k3y + 71.0 / 1920 * k4y - 17253.0 / 339200 * k5y + 22.0 / 525 * k6y - 1.0 / 40 * k7y);
    const double sx = ex / (ATOL0 + RTOL * fmax(fabs(x), fabs(xn)));
    const double sy = ey / (ATOL1 + RTOL * fmax(fabs(y), fabs(yn)));
    const double err = sqrt(0.5 * (sx * sx + sy * sy));
    if (isnan(err)) { h *= 0.25; if (h < 1e-300) return ${LABEL_UNDECIDED}; continue; }
    const double factor = err == 0 ? 5.0 : fmin(5.0, fmax(0.2, 0.9 * exp(-0.2 * log(err))));
    if (err > 1) { h *= fmin(1.0, factor); continue; }
    const double tPrev = t;
    t += h; x = xn; y = yn; k1x = k7x; k1y = k7y; steps++;
    h = fmin(h * factor, MAX_STEP);
    const double off = offWindow(x, y);
    if (off > ${c(WINDOW_EXIT_SLACK)} && outside == 0) tExit = tPrev;
    if (off > ${c(BLOWUP_WINDOWS)}) {
      const double zx = x / ${c(width[0])}, zy = y / ${c(width[1])}, vx = k1x / ${c(width[0])}, vy = k1y / ${c(width[1])};
      return sqrt(zx * zx + zy * zy) / sqrt(vx * vx + vy * vy) < ${c(BLOWUP_EFOLDING_FRACTION)} * (t - tExit)
        ? ${LABEL_BLOW_UP} : ${LABEL_LEFT_WINDOW};
    }
    if (off > ${c(WINDOW_EXIT_SLACK)} || outside > 0) {
      if (++outside > ${BASIN_MAX_STEPS_OUTSIDE}) return ${LABEL_LEFT_WINDOW};
      continue;
    }
${sinkTests}
  }
}

int main(int argc, char **argv) {
  const long n = atol(argv[1]);
  const int rounds = atoi(argv[2]);
  double *starts = malloc(sizeof(double) * 2 * n);
  int32_t *labels = malloc(sizeof(int32_t) * n);
  if (fread(starts, sizeof(double), 2 * n, stdin) != (size_t)(2 * n)) return 2;
  for (int r = 0; r < rounds; r++) {
    struct timespec a, b;
    clock_gettime(CLOCK_MONOTONIC, &a);
    for (long k = 0; k < n; k++) labels[k] = label(starts[2 * k], starts[2 * k + 1]);
    clock_gettime(CLOCK_MONOTONIC, &b);
    fprintf(stderr, "%.9f\\n", (b.tv_sec - a.tv_sec) + 1e-9 * (b.tv_nsec - a.tv_nsec));
  }
  fwrite(labels, sizeof(int32_t), n, stdout);
  return 0;
}
`;
}

function findCompiler() {
  for (const cc of [process.env.CC, "cc", "gcc", "clang"].filter(Boolean)) {
    if (spawnSync(cc, ["--version"], { encoding: "utf8" }).status === 0) return cc;
  }
  return null;
}

const cc = findCompiler();
if (!cc) {
  console.log("c-kernel bench: skipped, no C compiler found (cc, gcc, clang or $CC); apt-get install gcc");
  console.log(JSON.stringify({ bench: "c-kernel", skipped: "no C compiler" }));
  process.exit(0);
}

const { plan, settings } = planFor("competition", JSON.stringify(COMPETITION_SPEC));
const starts = gridStarts(plan.box, GRID);
const count = GRID * GRID;
const dir = mkdtempSync(join(tmpdir(), "keel-c-bench-"));
try {
  writeFileSync(join(dir, "kernel.c"), cSource(plan, settings));
  // -ffp-contract=off: no fused multiply-adds, so C rounds each operation as JavaScript does
  const build = spawnSync(
    cc,
    ["-O2", "-ffp-contract=off", "-o", join(dir, "kernel"), join(dir, "kernel.c"), "-lm"],
    {
      encoding: "utf8",
    },
  );
  if (build.status !== 0) throw new Error(`${cc} failed:\n${build.stderr}`);
  const run = spawnSync(join(dir, "kernel"), [String(count), String(ROUNDS)], {
    input: Buffer.from(starts.buffer),
    maxBuffer: 16 * count,
  });
  if (run.status !== 0) throw new Error(`the C kernel failed (exit ${run.status}): ${run.stderr}`);
  const cTimes = run.stderr.toString("utf8").trim().split("\n").map(Number);
  const cLabels = new Int32Array(run.stdout.buffer, run.stdout.byteOffset, count);

  const kernel = instantiateBasinKernel(plan.kernelSource);
  const labels = new Int32Array(count);
  kernel(starts.subarray(0, 2 * 2000), new Int32Array(2000)); // warm-up, as in basins.bench.mjs
  const times = Array.from({ length: ROUNDS }, () => timeOnce(() => kernel(starts, labels)));
  let disagree = 0;
  for (let k = 0; k < count; k++) if (labels[k] !== cLabels[k]) disagree++;

  const kernelRate = count / median(times),
    cRate = count / median(cTimes);
  const ratio = kernelRate / cRate;
  console.log(
    `c-kernel bench: competition x' = x(3 - x - 2y), y' = y(2 - x - y) (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §6.4, from memory), ${GRID}x${GRID} starts, one thread, median of ${ROUNDS}; ${cc} -O2`,
  );
  console.log(
    `kernel ${kernelRate.toFixed(0)} trajectories/s, C ${cRate.toFixed(0)} trajectories/s, label disagreements ${disagree}/${count}`,
  );
  console.log(
    `kernel/C trajectories per second: ${ratio.toFixed(2)} (goal >= ${TARGET}) ${ratio >= TARGET ? "ok" : "SLOW"}`,
  );
  console.log(
    JSON.stringify({ bench: "c-kernel", target: TARGET, ratio: Number(ratio.toFixed(3)), disagree }),
  );
  if (disagree > 0) {
    console.error(`the kernel and the C reference disagree on ${disagree} starts`);
    process.exitCode = 1;
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}

/**
 * Cost of keel's trajectory integration against a plain hand-written Dormand–Prince 5(4)
 * integrator, on the same models, starts, horizon and tolerances, measured side by side in one
 * run. Prints a table and, last, one JSON line of ratios.
 * Run after a build: `npm run bench` (or `npx tsc -p tsconfig.json && node bench/trajectories.bench.mjs`).
 */
import { readFileSync } from "node:fs";
import { COMPETITION_SPEC, specPath } from "./common.mjs";
import { Solver } from "odex";
import { prepareModel, findEquilibria } from "../dist/index.js";
import { buildFlowContext, followTrajectory } from "../dist/analysis/flow/follow.js";
import { integrateFlow } from "../dist/analysis/numeric/integrate.js";
import { windowOf } from "../dist/analysis/numeric/window.js";

/** Rounds per subject; the median of per-trajectory times shrugs off a round hit by GC or a context switch. */
const ROUNDS = 7;
/** Starts per model: a GRID x GRID lattice of cell centres over the window. */
const GRID = 20;
/**
 * End points at the fixed horizon must agree to this fraction of the window. Each integrator
 * keeps its local error near 1e-9 relative (1e-11 of the window absolute); the global error of
 * two different methods may differ by a few hundred times that where the flow stretches (near a
 * saddle), so 1e-6 is a check of "same trajectory", not of bit-equality.
 */
const AGREEMENT_OF_WINDOW = 1e-6;

const CASES = [
  // the spec's own scenario horizon (years)
  {
    name: "reservoir-competition",
    specText: () => readFileSync(specPath("reservoir-competition"), "utf8"),
    horizon: 200,
  },
  // 30 time units: about 12 e-foldings of the saddle's unstable rate (√2 − 1) and 30 of the slowest node rate (1)
  { name: "competition", specText: () => JSON.stringify(COMPETITION_SPEC), horizon: 30 },
];

// ---------------------------------------------------------------------------------------------
// Reference: Dormand–Prince 5(4) with FSAL and the usual step-size control (Hairer, Nørsett and
// Wanner, Solving Ordinary Differential Equations I, 2nd ed., section II.4 and II.5, the
// method's coefficients from Table 5.2 there; written from memory). Generic in n, all work
// arrays allocated once, f(t, y, out) writes into out.
// ---------------------------------------------------------------------------------------------

const A21 = 1 / 5;
const A31 = 3 / 40,
  A32 = 9 / 40;
const A41 = 44 / 45,
  A42 = -56 / 15,
  A43 = 32 / 9;
const A51 = 19372 / 6561,
  A52 = -25360 / 2187,
  A53 = 64448 / 6561,
  A54 = -212 / 729;
const A61 = 9017 / 3168,
  A62 = -355 / 33,
  A63 = 46732 / 5247,
  A64 = 49 / 176,
  A65 = -5103 / 18656;
const B1 = 35 / 384,
  B3 = 500 / 1113,
  B4 = 125 / 192,
  B5 = -2187 / 6784,
  B6 = 11 / 84;
const C2 = 1 / 5,
  C3 = 3 / 10,
  C4 = 4 / 5,
  C5 = 8 / 9;
/** Differences between the fifth- and fourth-order weights: the embedded error estimate. */
const E1 = 71 / 57600,
  E3 = -71 / 16695,
  E4 = 71 / 1920,
  E5 = -17253 / 339200,
  E6 = 22 / 525,
  E7 = -1 / 40;
/** Step-size controller: safety factor, and the bounds on the change of h per step (common choices). */
const SAFETY = 0.9,
  FAC_MIN = 0.2,
  FAC_MAX = 5;

function makeDormandPrince(n) {
  const k1 = new Float64Array(n),
    k2 = new Float64Array(n),
    k3 = new Float64Array(n),
    k4 = new Float64Array(n);
  const k5 = new Float64Array(n),
    k6 = new Float64Array(n),
    k7 = new Float64Array(n);
  const y = new Float64Array(n),
    yStage = new Float64Array(n),
    yNew = new Float64Array(n);
  const stats = { steps: 0, rejected: 0, evaluations: 0 };

  /** RMS norm of v scaled by atol + rtol |y| (Hairer's). */
  function norm(v, ref, rtol, atol) {
    let sum = 0;
    for (let i = 0; i < n; i++) {
      const s = v[i] / (atol[i] + rtol * Math.abs(ref[i]));
      sum += s * s;
    }
    return Math.sqrt(sum / n);
  }

  /** Hairer's starting step heuristic (HNW I, section II.4). */
  function initialStep(f, t, rtol, atol, hMax) {
    const d0 = norm(y, y, rtol, atol),
      d1 = norm(k1, y, rtol, atol);
    const h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : (0.01 * d0) / d1;
    for (let i = 0; i < n; i++) yStage[i] = y[i] + h0 * k1[i];
    f(t + h0, yStage, k2);
    stats.evaluations++;
    for (let i = 0; i < n; i++) k3[i] = k2[i] - k1[i];
    const d2 = norm(k3, y, rtol, atol) / h0;
    const big = Math.max(d1, d2);
    const h1 = big <= 1e-15 ? Math.max(1e-6, h0 * 1e-3) : Math.pow(0.01 / big, 1 / 5);
    return Math.min(100 * h0, h1, hMax);
  }

  /** Integrates y' = f(t, y) from (t0, y0) to tEnd; writes the end state into yOut. */
  function integrate(f, y0, t0, tEnd, rtol, atol, hMax, yOut) {
    stats.steps = 0;
    stats.rejected = 0;
    stats.evaluations = 0;
    for (let i = 0; i < n; i++) y[i] = y0[i];
    let t = t0;
    f(t, y, k1);
    stats.evaluations++;
    let h = initialStep(f, t, rtol, atol, hMax);
    let lastRejected = false;
    while (t < tEnd) {
      if (t + h > tEnd) h = tEnd - t;
      for (let i = 0; i < n; i++) yStage[i] = y[i] + h * A21 * k1[i];
      f(t + C2 * h, yStage, k2);
      for (let i = 0; i < n; i++) yStage[i] = y[i] + h * (A31 * k1[i] + A32 * k2[i]);
      f(t + C3 * h, yStage, k3);
      for (let i = 0; i < n; i++) yStage[i] = y[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      f(t + C4 * h, yStage, k4);
      for (let i = 0; i < n; i++)
        yStage[i] = y[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      f(t + C5 * h, yStage, k5);
      for (let i = 0; i < n; i++)
        yStage[i] = y[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      f(t + h, yStage, k6);
      for (let i = 0; i < n; i++)
        yNew[i] = y[i] + h * (B1 * k1[i] + B3 * k3[i] + B4 * k4[i] + B5 * k5[i] + B6 * k6[i]);
      f(t + h, yNew, k7);
      stats.evaluations += 6;
      let sum = 0;
      for (let i = 0; i < n; i++) {
        const e = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        const s = e / (atol[i] + rtol * Math.max(Math.abs(y[i]), Math.abs(yNew[i])));
        sum += s * s;
      }
      const err = Math.sqrt(sum / n);
      const fac = Math.min(FAC_MAX, Math.max(FAC_MIN, SAFETY * Math.pow(err, -1 / 5)));
      if (err <= 1) {
        t += h;
        for (let i = 0; i < n; i++) {
          y[i] = yNew[i];
          k1[i] = k7[i];
        } // first same as last
        stats.steps++;
        h = Math.min(hMax, h * (lastRejected ? Math.min(1, fac) : fac));
        lastRejected = false;
      } else {
        stats.rejected++;
        h *= fac;
        lastRejected = true;
      }
    }
    for (let i = 0; i < n; i++) yOut[i] = y[i];
    return stats;
  }
  return integrate;
}

// ---------------------------------------------------------------------------------------------

function compile(specText, name) {
  const prepared = prepareModel(specText);
  if (!prepared.ok) throw new Error(`${name}: spec did not compile: ${JSON.stringify(prepared.issues)}`);
  return prepared.value.model;
}

function gridStarts(box) {
  const starts = [];
  for (let i = 0; i < GRID; i++)
    for (let j = 0; j < GRID; j++) {
      starts.push([
        box.lo[0] + ((i + 0.5) / GRID) * box.width[0],
        box.lo[1] + ((j + 0.5) / GRID) * box.width[1],
      ]);
    }
  return starts;
}

const median = (values) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[(sorted.length - 1) >> 1];
};

function timeAll(run, starts) {
  const start = process.hrtime.bigint();
  for (let k = 0; k < starts.length; k++) run(k);
  return Number(process.hrtime.bigint() - start) / 1e3 / starts.length; // µs per trajectory
}

const rows = [];
const ratios = {};
for (const benchCase of CASES) {
  const model = compile(benchCase.specText(), benchCase.name);
  const box = windowOf(model);
  const ctx = buildFlowContext(model, findEquilibria(model), box, 1);
  const { relative, absolute } = ctx.tolerances;
  const atol = Float64Array.from(absolute);
  const T = benchCase.horizon;
  // keel caps the step at horizon / 64 for scenarios; the reference gets the same cap
  const hMax = T / 64;
  const starts = gridStarts(box);
  const keelEnds = starts.map(() => new Float64Array(2));
  const refEnds = starts.map(() => new Float64Array(2));
  const fates = {};
  let keelEvaluations = 0,
    refEvaluations = 0,
    followEvaluations = 0;

  // the same compiled right-hand side for both, so the integrators alone are compared
  const rhs = model.rhs;
  const f = (_t, y, out) => rhs(y, out);
  const dormandPrince = makeDormandPrince(2);
  const odexBuffer = new Float64Array(2);
  const odexRhs = (_t, y) => {
    rhs(y, odexBuffer);
    return [odexBuffer[0], odexBuffer[1]];
  };
  const odexEnds = starts.map(() => new Float64Array(2));

  const subjects = {
    keel(k) {
      const outcome = integrateFlow(rhs, starts[k], T, {
        direction: 1,
        tolerances: ctx.tolerances,
        maxStep: hMax,
        maxSteps: 200_000,
        onStep: () => true,
      });
      if (outcome.status !== "finished")
        throw new Error(
          `${benchCase.name}: keel's integration ended "${outcome.status}" from (${starts[k]})`,
        );
      keelEnds[k][0] = outcome.y[0];
      keelEnds[k][1] = outcome.y[1];
      keelEvaluations += outcome.evaluations;
    },
    // odex on its own, set up as keel sets it up (dense output on, an observer that does nothing):
    // tells the library's cost from that of keel's wrapper around it
    odex(k) {
      const solver = new Solver(2);
      solver.denseOutput = true;
      solver.relativeTolerance = relative;
      solver.absoluteTolerance = absolute;
      solver.maxStepSize = hMax;
      solver.maxSteps = 200_000;
      const result = solver.solve(odexRhs, 0, [starts[k][0], starts[k][1]], T, () => undefined);
      odexEnds[k][0] = result.y[0];
      odexEnds[k][1] = result.y[1];
    },
    reference(k) {
      const stats = dormandPrince(f, starts[k], 0, T, relative, atol, hMax, refEnds[k]);
      refEvaluations += stats.evaluations;
    },
    follow(k) {
      const result = followTrajectory(ctx, starts[k], {
        horizon: T,
        maxPathPoints: 200_000,
        detectRecurrence: true,
      });
      fates[result.fate.kind] = (fates[result.fate.kind] ?? 0) + 1;
      followEvaluations += result.evaluations;
    },
  };
  const names = Object.keys(subjects);
  const times = Object.fromEntries(names.map((s) => [s, []]));
  // warm-up round, then interleaved rounds, rotating who goes first
  for (const s of names) timeAll(subjects[s], starts);
  for (let round = 0; round < ROUNDS; round++) {
    for (let j = 0; j < names.length; j++) {
      const s = names[(round + j) % names.length];
      times[s].push(timeAll(subjects[s], starts));
    }
  }
  const per = Object.fromEntries(names.map((s) => [s, median(times[s])]));
  const evaluationsPer = (total) => total / (starts.length * (ROUNDS + 1));

  // correctness: the two fixed-horizon integrations end at the same point
  let worst = 0,
    worstAt = null;
  starts.forEach((p, k) => {
    const d = Math.max(
      ...[0, 1].map(
        (c) =>
          Math.max(Math.abs(keelEnds[k][c] - refEnds[k][c]), Math.abs(odexEnds[k][c] - refEnds[k][c])) /
          box.width[c],
      ),
    );
    if (d > worst) {
      worst = d;
      worstAt = p;
    }
  });
  if (!(worst <= AGREEMENT_OF_WINDOW)) {
    throw new Error(
      `${benchCase.name}: keel and the reference end ${worst.toExponential(2)} of the window apart from (${worstAt}), over ${AGREEMENT_OF_WINDOW}`,
    );
  }
  const keelRatio = per.keel / per.reference;
  const odexRatio = per.odex / per.reference;
  const followRatio = per.follow / per.reference;
  ratios[benchCase.name] = {
    fixedHorizon: Number(keelRatio.toFixed(3)),
    odexAlone: Number(odexRatio.toFixed(3)),
    withFates: Number(followRatio.toFixed(3)),
  };
  rows.push({
    name: benchCase.name,
    T,
    per,
    keelRatio,
    odexRatio,
    followRatio,
    worst,
    fates,
    evals: {
      keel: evaluationsPer(keelEvaluations),
      reference: evaluationsPer(refEvaluations),
      follow: evaluationsPer(followEvaluations),
    },
  });
}

const pad = (s, w) => String(s).padEnd(w);
const num = (v, w, digits) => v.toFixed(digits).padStart(w);
console.log(
  `trajectories bench: ${GRID * GRID} starts per model, ${ROUNDS} interleaved rounds, median µs per trajectory, ratio = time / ref`,
);
console.log(
  "  ref: hand-written Dormand-Prince 5(4); keel: integrateFlow (odex, dense output) to the horizon; odex: the odex",
);
console.log(
  "  solver alone as keel configures it; follow: followTrajectory with fate detection (stops once decided)",
);
console.log(
  `${pad("model", 23)}${"T".padStart(5)}${"ref".padStart(8)}${"keel".padStart(8)}${"ratio".padStart(7)}${"odex".padStart(8)}${"ratio".padStart(7)}${"follow".padStart(8)}${"ratio".padStart(7)}  ${"f-evals ref/keel/follow".padStart(23)}  ${"end diff".padStart(8)}  fates`,
);
for (const r of rows) {
  const evals = `${r.evals.reference.toFixed(0)}/${r.evals.keel.toFixed(0)}/${r.evals.follow.toFixed(0)}`;
  const fates = Object.entries(r.fates)
    .map(([k, v]) => `${k} ${v / (ROUNDS + 1)}`)
    .join(", ");
  console.log(
    `${pad(r.name, 23)}${num(r.T, 5, 0)}${num(r.per.reference, 8, 1)}${num(r.per.keel, 8, 1)}${num(r.keelRatio, 7, 2)}${num(r.per.odex, 8, 1)}${num(r.odexRatio, 7, 2)}${num(r.per.follow, 8, 1)}${num(r.followRatio, 7, 2)}  ${evals.padStart(23)}  ${r.worst.toExponential(1).padStart(8)}  ${fates}`,
  );
}
console.log(JSON.stringify({ bench: "trajectories", ratios }));

/**
 * Cost of the compiled right-hand side and Jacobian against hand-written JavaScript of the same
 * model, measured side by side in one run. Prints a table and, last, one JSON line of ratios.
 * Run after a build: `npm run bench` (or `npx tsc -p tsconfig.json && node bench/rhs.bench.mjs`).
 */
import { readFileSync } from "node:fs";
import { COMPETITION_SPEC, specPath } from "./common.mjs";
import { prepareModel } from "../dist/index.js";

/** Target for compiled / hand-written per-call time; the bench reports, it never fails on speed. */
const TARGET_RATIO = 1.2;
/** Rounds per subject; the median of per-call times shrugs off a round hit by GC or a context switch. */
const ROUNDS = 7;
const CALLS_PER_ROUND = 2e6;
/** Warm-up calls per subject, enough for V8 to optimise the loop and inline the function. */
const WARMUP_CALLS = 3e5;
/** Sample points cycled through by the loop (a power of two, so the index is a mask). */
const POINT_COUNT = 1024;
/** Compiled and hand-written outputs must agree to this, relative (both are double arithmetic). */
const AGREEMENT_TOLERANCE = 1e-12;

/** Hand-written versions: parameters as closure constants, as someone would write them by hand. */
function handReservoir() {
  const r1 = 0.45,
    r2 = 0.3,
    K1 = 40000,
    K2 = 60000,
    a12 = 0.5,
    a21 = 0.6;
  return {
    rhs(y, out) {
      const N = y[0],
        S = y[1];
      out[0] = r1 * N * (1 - (N + a12 * S) / K1);
      out[1] = r2 * S * (1 - (S + a21 * N) / K2);
    },
    jacobian(y, out) {
      const N = y[0],
        S = y[1];
      out[0] = r1 * (1 - (2 * N + a12 * S) / K1);
      out[1] = (-r1 * a12 * N) / K1;
      out[2] = (-r2 * a21 * S) / K2;
      out[3] = r2 * (1 - (2 * S + a21 * N) / K2);
    },
  };
}

function handGrazer() {
  const r = 1.2,
    K = 800,
    c = 20,
    h = 60,
    yc = 0.06,
    m = 0.3,
    q = 0.075;
  const h2 = h * h;
  return {
    rhs(y, out) {
      const V = y[0],
        G = y[1];
      const V2 = V * V;
      const intake = (c * V2) / (h2 + V2);
      out[0] = r * V * (1 - V / K) - G * intake;
      out[1] = G * (yc * intake - m - q * G);
    },
    jacobian(y, out) {
      const V = y[0],
        G = y[1];
      const d = h2 + V * V;
      const intake = (c * V * V) / d;
      const intakeSlope = (2 * c * V * h2) / (d * d);
      out[0] = r * (1 - (2 * V) / K) - G * intakeSlope;
      out[1] = -intake;
      out[2] = G * yc * intakeSlope;
      out[3] = yc * intake - m - 2 * q * G;
    },
  };
}

function handCompetition() {
  return {
    rhs(y, out) {
      const x = y[0],
        v = y[1];
      out[0] = x * (3 - x - 2 * v);
      out[1] = v * (2 - x - v);
    },
    jacobian(y, out) {
      const x = y[0],
        v = y[1];
      out[0] = 3 - 2 * x - 2 * v;
      out[1] = -2 * x;
      out[2] = -v;
      out[3] = 2 - x - 2 * v;
    },
  };
}

const CASES = [
  {
    name: "reservoir-competition",
    specText: () => readFileSync(specPath("reservoir-competition"), "utf8"),
    hand: handReservoir,
  },
  {
    name: "grazer-forage",
    specText: () => readFileSync(specPath("grazer-forage"), "utf8"),
    hand: handGrazer,
  },
  { name: "competition", specText: () => JSON.stringify(COMPETITION_SPEC), hand: handCompetition },
];

function compile(specText, name) {
  const prepared = prepareModel(specText);
  if (!prepared.ok) throw new Error(`${name}: spec did not compile: ${JSON.stringify(prepared.issues)}`);
  return prepared.value.model;
}

/** Deterministic varied points over the spec's window (a fixed LCG: same points every run). */
function samplePoints(model) {
  const window = model.spec.window;
  const [xLo, xHi] = window[model.stateNames[0]];
  const [yLo, yHi] = window[model.stateNames[1]];
  let seed = 0x2545f491;
  const unit = () => (seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 2 ** 32;
  return Array.from({ length: POINT_COUNT }, () =>
    Float64Array.of(xLo + (xHi - xLo) * unit(), yLo + (yHi - yLo) * unit()),
  );
}

/**
 * Outputs agree when |a - b| <= tol * max(|a|, |b|, scale), scale being the largest |b| of that
 * component over the sample: near a nullcline a component cancels to almost nothing, and the two
 * groupings of the same sum then differ by rounding of the terms, not of the result.
 */
function checkAgreement(label, compiled, hand, points, width) {
  const outA = new Float64Array(width),
    outB = new Float64Array(width);
  const scale = new Float64Array(width);
  for (const p of points) {
    hand(p, outB);
    for (let k = 0; k < width; k++) scale[k] = Math.max(scale[k], Math.abs(outB[k]));
  }
  let worst = 0;
  for (const p of points) {
    compiled(p, outA);
    hand(p, outB);
    for (let k = 0; k < width; k++) {
      const a = outA[k],
        b = outB[k];
      const error = Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), scale[k], Number.MIN_VALUE);
      if (!(error <= AGREEMENT_TOLERANCE)) {
        throw new Error(
          `${label}: compiled and hand-written disagree at (${p[0]}, ${p[1]}), out[${k}]: ${a} vs ${b}`,
        );
      }
      worst = Math.max(worst, error);
    }
  }
  return worst;
}

let loopsMade = 0;

/**
 * A fresh timing loop per subject, built from its own source text so each has its own feedback:
 * the call site sees one target only and V8 can inline it, for the compiled and hand-written
 * functions alike. The source must differ (a numbered comment), since V8 caches `new Function`
 * by source and reuses the feedback with it; shared feedback would make later cases megamorphic.
 * Outputs go into a checksum the caller prints, so no work can be dropped.
 */
function makeLoop(width) {
  const sum = Array.from({ length: width }, (_, k) => `out[${k}]`).join(" + ");
  return new Function(
    "fn",
    "points",
    "out",
    "calls",
    `// timing loop ${++loopsMade}
     const mask = points.length - 1;
     let checksum = 0;
     for (let i = 0; i < calls; i++) {
       fn(points[i & mask], out);
       checksum += ${sum};
     }
     return checksum;`,
  );
}

function subject(fn, points, width) {
  const loop = makeLoop(width);
  const out = new Float64Array(width);
  return {
    checksum: 0,
    nsPerCall: [],
    warm() {
      this.checksum += loop(fn, points, out, WARMUP_CALLS);
    },
    time() {
      const start = process.hrtime.bigint();
      this.checksum += loop(fn, points, out, CALLS_PER_ROUND);
      this.nsPerCall.push(Number(process.hrtime.bigint() - start) / CALLS_PER_ROUND);
    },
  };
}

const median = (values) => {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[(sorted.length - 1) >> 1];
};

/** Interleaves the two subjects round by round, alternating who goes first, and returns medians. */
function race(compiled, hand) {
  for (let i = 0; i < 3; i++) {
    compiled.warm();
    hand.warm();
  }
  for (let round = 0; round < ROUNDS; round++) {
    if (round % 2 === 0) {
      compiled.time();
      hand.time();
    } else {
      hand.time();
      compiled.time();
    }
  }
  const c = median(compiled.nsPerCall),
    h = median(hand.nsPerCall);
  return { compiledNs: c, handNs: h, ratio: c / h, checksum: compiled.checksum + hand.checksum };
}

const rows = [];
const ratios = {};
for (const benchCase of CASES) {
  const model = compile(benchCase.specText(), benchCase.name);
  const hand = benchCase.hand();
  const points = samplePoints(model);
  const n = model.dimension;
  const kinds = [
    { kind: "rhs", compiled: model.rhs, hand: hand.rhs, width: n },
    { kind: "jacobian", compiled: model.jacobianAt, hand: hand.jacobian, width: n * n },
  ];
  ratios[benchCase.name] = {};
  for (const k of kinds) {
    const label = `${benchCase.name} ${k.kind}`;
    const worst = checkAgreement(label, k.compiled, k.hand, points, k.width);
    const result = race(subject(k.compiled, points, k.width), subject(k.hand, points, k.width));
    ratios[benchCase.name][k.kind] = Number(result.ratio.toFixed(3));
    rows.push({ label, ...result, worst });
  }
}

const pad = (s, w) => String(s).padEnd(w);
const num = (v, w, digits) => v.toFixed(digits).padStart(w);
console.log(
  `rhs bench: ${ROUNDS} rounds x ${CALLS_PER_ROUND} calls, median ns per call; target compiled/hand <= ${TARGET_RATIO}x`,
);
console.log(
  `${pad("model", 32)}${"compiled".padStart(10)}${"hand".padStart(10)}${"ratio".padStart(8)}  ${pad("", 6)}${"max rel diff".padStart(13)}  checksum`,
);
for (const r of rows) {
  const verdict = r.ratio <= TARGET_RATIO ? "ok" : "SLOW";
  console.log(
    `${pad(r.label, 32)}${num(r.compiledNs, 10, 2)}${num(r.handNs, 10, 2)}${num(r.ratio, 8, 2)}  ${pad(verdict, 6)}${r.worst.toExponential(1).padStart(13)}  ${r.checksum.toPrecision(12)}`,
  );
}
console.log(JSON.stringify({ bench: "rhs", target: TARGET_RATIO, ratios }));

/**
 * The whole pipeline's time, as ratios measured side by side in one run, through the built CLI
 * with --profile, on the example specs and the invented host–parasitoid spec with one outcome
 * map (bench/specs/host-parasitoid.json):
 *  - all parameter studies and maps together over the nominal analysis (goal ≤ 2);
 *  - `check --claims` over `analyze` (goal ≤ 1.1);
 *  - outcome evaluations of the maps over a uniform map at the same resolution (goal ≤ 0.1);
 *  - `analyze --jobs 2` over `--jobs 1`, as a speed-up (goal ≥ 1.7);
 * and each run's stage profile. Run after a build: `npm run bench`.
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { specPath } from "./common.mjs";

const GOALS = {
  studiesOverNominal: 2,
  claimsOverAnalyze: 1.1,
  mapEvaluationsOverUniform: 0.1,
  jobsSpeedup: 1.7,
};
const ROOT = join(dirname(fileURLToPath(import.meta.url)), "..");
const CLI = join(ROOT, "dist", "cli", "bin.js");
const SPECS = [
  ["reservoir-competition", specPath("reservoir-competition")],
  ["grazer-forage", specPath("grazer-forage")],
  ["host-parasitoid (invented, one map)", join(ROOT, "bench", "specs", "host-parasitoid.json")],
];

const work = mkdtempSync(join(tmpdir(), "keel-pipeline-bench-"));

/** One CLI run with --profile: its wall time by stage (seconds), as the profile prints it. */
function profiled(args, label) {
  const run = spawnSync(process.execPath, [CLI, "--quiet", "--profile", ...args], {
    cwd: work,
    encoding: "utf8",
  });
  if (run.status !== 0 && run.status !== 3) throw new Error(`${label}: exit ${run.status}\n${run.stderr}`);
  const stages = {};
  for (const m of run.stderr.matchAll(/^ {2}(\S.*?) +(\d+\.\d\d) s/gm)) stages[m[1]] = Number(m[2]);
  return { stages, text: run.stderr };
}

/** The spec with its parameter studies and maps switched off: the nominal analysis alone. */
function nominalOnly(file) {
  const spec = JSON.parse(readFileSync(file, "utf8"));
  delete spec.$schema;
  spec.analysis = { ...(spec.analysis ?? {}), parameters: [], parameterPairs: [] };
  const path = join(work, `nominal-${spec.id}.json`);
  writeFileSync(path, JSON.stringify(spec));
  return path;
}

const rows = [];
const profiles = [];
try {
  for (const [name, file] of SPECS) {
    const nominal = profiled(["--jobs", "1", "analyze", nominalOnly(file), "--out", "nominal"], name);
    const one = profiled(["--jobs", "1", "analyze", file, "--out", "one"], name);
    const two = profiled(["--jobs", "2", "analyze", file, "--out", "two"], name);
    const claims = profiled(["--jobs", "1", "check", "--claims", file], name);
    const results = JSON.parse(readFileSync(join(work, "one", "results.json"), "utf8"));
    const maps = results.conditions.maps;
    const cells = maps.reduce((s, m) => s + m.nx * m.ny, 0);
    const evaluated = maps.reduce((s, m) => s + (m.evaluations ?? m.nx * m.ny), 0);
    const studies = one.stages.thresholds ?? 0;
    rows.push({
      name,
      nominal: nominal.stages.total,
      analyze: one.stages.total,
      studiesOverNominal: studies / nominal.stages.total,
      claimsOverAnalyze: claims.stages.total / one.stages.total,
      mapEvaluationsOverUniform: cells ? evaluated / cells : null,
      jobsSpeedup: one.stages.total / two.stages.total,
    });
    profiles.push([name, one.text]);
  }
} finally {
  rmSync(work, { recursive: true, force: true });
}

const mark = (v, goal, atMost) => (v === null ? "-" : (atMost ? v <= goal : v >= goal) ? "ok" : "SLOW");
const f = (v, w) => (v === null ? "n/a" : v.toFixed(2)).padStart(w);
console.log("pipeline bench: the built CLI with --profile, one run each; seconds and ratios");
console.log(
  `${"spec".padEnd(38)}${"nominal".padStart(9)}${"analyze".padStart(9)}  studies/nominal  claims/analyze  map evals/uniform  jobs 2 speed-up`,
);
for (const r of rows)
  console.log(
    `${r.name.padEnd(38)}${f(r.nominal, 9)}${f(r.analyze, 9)}  ${f(r.studiesOverNominal, 9)} ${mark(r.studiesOverNominal, GOALS.studiesOverNominal, true).padEnd(5)}  ${f(r.claimsOverAnalyze, 8)} ${mark(r.claimsOverAnalyze, GOALS.claimsOverAnalyze, true).padEnd(5)}  ${f(r.mapEvaluationsOverUniform, 11)} ${mark(r.mapEvaluationsOverUniform, GOALS.mapEvaluationsOverUniform, true).padEnd(5)}  ${f(r.jobsSpeedup, 9)} ${mark(r.jobsSpeedup, GOALS.jobsSpeedup, false)}`,
  );
console.log(
  `goals: studies/nominal <= ${GOALS.studiesOverNominal}, claims/analyze <= ${GOALS.claimsOverAnalyze}, map evaluations/uniform <= ${GOALS.mapEvaluationsOverUniform}, jobs 2 speed-up >= ${GOALS.jobsSpeedup}`,
);
for (const [name, text] of profiles) console.log(`\n${name}, analyze --jobs 1:\n${text.trimEnd()}`);
console.log(JSON.stringify({ bench: "pipeline", goals: GOALS, rows }));

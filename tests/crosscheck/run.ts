/**
 * `npm run crosscheck`: the full corpus through keel and through the independent reference
 * (tests/reference/crosscheck.py), model by model, each in its own process with a time limit.
 * Prints the disagreements per quantity and the commonest classes, and writes every
 * disagreement to scratch/crosscheck/report.json.
 *
 *   npm run crosscheck -- [--only FAMILY] [--count N] [--seed S] [--timeout SECONDS] [--minutes M] [--parallel]
 *
 * --parallel overlaps keel on one model with the reference on the previous one (two processes);
 * by default they take turns (one core).
 */
import { spawn } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { findScipyPython } from "../fixtures/scipy.js";
import { generateCorpus, DEFAULT_COUNT, DEFAULT_SEED, type GeneratedSpec } from "./generate.js";
import { compareModel, totals, type ModelComparison } from "./compare.js";
import type { KeelOutcome, ReferenceModel } from "./summary.js";
import { printReport } from "./report.js";

const ROOT = process.cwd();
const BUILD = join(ROOT, "scratch", "crosscheck", "build");
const OUT = join(ROOT, "scratch", "crosscheck");

interface Options {
  only?: string;
  count: number;
  seed: number;
  timeout: number;
  parallel: boolean;
  /** Start no model after this many minutes (the models are dealt round the families, so a cut run stays balanced). */
  minutes: number;
}

function parseArgs(argv: string[]): Options {
  const o: Options = {
    count: DEFAULT_COUNT,
    seed: DEFAULT_SEED,
    timeout: 600,
    parallel: false,
    minutes: Infinity,
  };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--only") o.only = argv[++i];
    else if (a === "--count") o.count = Number(argv[++i]);
    else if (a === "--seed") o.seed = Number(argv[++i]);
    else if (a === "--timeout") o.timeout = Number(argv[++i]);
    else if (a === "--parallel") o.parallel = true;
    else if (a === "--minutes") o.minutes = Number(argv[++i]);
    else throw new Error(`unknown option ${a}`);
  }
  return o;
}

/** Runs a process to its end or its time limit; stdout, and whether it finished in time. */
function runProcess(
  cmd: string,
  args: string[],
  input: string | null,
  seconds: number,
): Promise<{ stdout: string; stderr: string; code: number | null; timedOut: boolean }> {
  return new Promise((resolve) => {
    const child = spawn(cmd, args, { cwd: ROOT, stdio: ["pipe", "pipe", "pipe"] });
    let stdout = "",
      stderr = "",
      timedOut = false;
    const timer = setTimeout(() => {
      timedOut = true;
      child.kill("SIGKILL");
    }, seconds * 1000);
    child.stdout.on("data", (c) => (stdout += c));
    child.stderr.on("data", (c) => (stderr += c));
    child.on("close", (code) => {
      clearTimeout(timer);
      resolve({ stdout, stderr, code, timedOut });
    });
    child.stdin.end(input ?? "");
  });
}

async function runKeel(g: GeneratedSpec, specFile: string, timeout: number): Promise<KeelOutcome> {
  const t0 = Date.now();
  const r = await runProcess(
    process.execPath,
    [join(BUILD, "tests", "crosscheck", "keel-worker.js"), specFile],
    null,
    timeout,
  );
  const seconds = (Date.now() - t0) / 1000;
  if (r.timedOut) return { id: g.id, ok: false, seconds, error: `timeout after ${timeout} s` };
  try {
    return JSON.parse(r.stdout) as KeelOutcome;
  } catch {
    return { id: g.id, ok: false, seconds, error: `exit ${r.code}: ${r.stderr.slice(-2000)}` };
  }
}

async function runRef(
  python: string,
  g: GeneratedSpec,
  keel: KeelOutcome,
  timeout: number,
): Promise<ReferenceModel> {
  const cycles = keel.ok ? keel.cycles.map((c) => ({ id: c.id, point: c.point, period: c.period })) : [];
  const input = JSON.stringify([{ spec: g.spec, cycles }]);
  const r = await runProcess(python, [join(ROOT, "tests", "reference", "crosscheck.py")], input, timeout);
  const fail = (error: string) => ({ id: g.id, ok: false, error }) as ReferenceModel;
  if (r.timedOut) return fail(`timeout after ${timeout} s`);
  try {
    return (JSON.parse(r.stdout) as ReferenceModel[])[0];
  } catch {
    return fail(`exit ${r.code}: ${r.stderr.slice(-2000)}`);
  }
}

export interface ModelRecord extends ModelComparison {
  family: string;
  variant: string;
  keelSeconds: number;
  referenceSeconds: number | null;
}

async function main(): Promise<void> {
  const o = parseArgs(process.argv.slice(2));
  const python = findScipyPython();
  if (!python)
    throw new Error("no python3 with numpy and scipy: install Debian's python3-scipy (.ci/run does)");
  const corpus = generateCorpus({ seed: o.seed, count: o.count, only: o.only });
  mkdirSync(join(OUT, "specs"), { recursive: true });
  const files = corpus.map((g) => {
    const f = join(OUT, "specs", `${g.id}.json`);
    writeFileSync(f, JSON.stringify(g.spec, null, 2) + "\n");
    return f;
  });
  const started = Date.now();
  const records: ModelRecord[] = [];
  let pendingRef: Promise<void> = Promise.resolve();
  for (let i = 0; i < corpus.length; i++) {
    if (Date.now() - started > o.minutes * 60_000) {
      process.stdout.write(`time limit (${o.minutes} min) reached: ${i} of ${corpus.length} models run\n`);
      break;
    }
    const g = corpus[i];
    const keel = await runKeel(g, files[i], o.timeout);
    const step = async () => {
      const t0 = Date.now();
      const ref = await runRef(python, g, keel, o.timeout);
      const cmp = compareModel(keel, ref);
      const rec = {
        ...cmp,
        family: g.family,
        variant: g.variant,
        keelSeconds: keel.seconds,
        referenceSeconds: ref.ok ? ref.seconds : (Date.now() - t0) / 1000,
      };
      records.push(rec);
      const n = cmp.disagreements.length;
      process.stdout.write(
        `${String(records.length).padStart(4)}/${corpus.length} ${g.id.padEnd(28)} keel ${keel.seconds.toFixed(1).padStart(6)} s  reference ${rec.referenceSeconds.toFixed(1).padStart(6)} s  ${n ? `${n} disagreement${n > 1 ? "s" : ""}` : "agree"}\n`,
      );
    };
    if (o.parallel) {
      await pendingRef;
      pendingRef = step();
    } else await step();
  }
  await pendingRef;
  records.sort(
    (a, b) => corpus.findIndex((g) => g.id === a.model) - corpus.findIndex((g) => g.id === b.model),
  );
  const summary = totals(records);
  const report = {
    seed: o.seed,
    count: records.length,
    corpus: corpus.length,
    only: o.only ?? null,
    wallSeconds: (Date.now() - started) / 1000,
    totals: summary,
    models: records.map(({ disagreements, ...rest }) => ({ ...rest, disagreements: disagreements.length })),
    disagreements: records.flatMap((r) => r.disagreements),
  };
  writeFileSync(join(OUT, "report.json"), JSON.stringify(report, null, 2) + "\n");
  printReport(report, records);
  process.stdout.write(`report: ${join("scratch", "crosscheck", "report.json")}\n`);
}

await main();

/**
 * `npm run fuzz`: every case of the corpus (generate.ts) through the built CLI, two processes at a
 * time, each judged by checks.ts. Prints a table per category and every failing case, and writes
 * the counts and failures to scratch/fuzz-summary.json. Exit 0 when every case held, else 1.
 *
 *   npm run fuzz -- [--seed S] [--only CATEGORY] [--jobs N] [--limit N]
 *
 * KEEL_FUZZ_CLI names another built CLI (for example one compiled with
 * `npx tsc -p tsconfig.json --outDir /tmp/fuzz-dist`: /tmp/fuzz-dist/cli/bin.js).
 */
import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { cliEntry, PROJECT_ROOT } from "./execute.js";
import { CATEGORIES, DEFAULT_SEED, generateCases } from "./generate.js";
import { judgeCase, type Verdict } from "./judge.js";
import { printSummary, summarise } from "./summary.js";

interface Options {
  seed: number;
  only?: string;
  jobs: number;
  limit: number;
}

function parseArgs(argv: string[]): Options {
  const o: Options = { seed: DEFAULT_SEED, jobs: 2, limit: Infinity };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--seed") o.seed = Number(argv[++i]);
    else if (a === "--only") o.only = argv[++i];
    else if (a === "--jobs") o.jobs = Number(argv[++i]);
    else if (a === "--limit") o.limit = Number(argv[++i]);
    else throw new Error(`unknown option ${a}`);
  }
  if (o.only && !(CATEGORIES as readonly string[]).includes(o.only))
    throw new Error(`unknown category ${o.only}; one of ${CATEGORIES.join(", ")}`);
  return o;
}

async function main(): Promise<void> {
  const options = parseArgs(process.argv.slice(2));
  const cli = cliEntry();
  const cases = generateCases(options.seed)
    .filter((c) => !options.only || c.category === options.only)
    .slice(0, options.limit);
  console.info(`fuzz: ${cases.length} cases, seed ${options.seed}, ${options.jobs} at a time, CLI ${cli}`);
  const started = performance.now();
  const verdicts: Verdict[] = new Array(cases.length);
  let next = 0;
  let done = 0;
  const worker = async () => {
    while (next < cases.length) {
      const k = next++;
      verdicts[k] = await judgeCase(cases[k], cli);
      done++;
      const v = verdicts[k];
      if (v.problems.length)
        console.info(
          `FAIL ${v.name} (exit ${v.status ?? v.signal}, ${v.seconds.toFixed(1)} s): ${v.problems.join("; ")}`,
        );
      if (done % 50 === 0)
        console.info(`… ${done}/${cases.length} in ${((performance.now() - started) / 1000).toFixed(0)} s`);
    }
  };
  await Promise.all(Array.from({ length: options.jobs }, worker));
  const seconds = (performance.now() - started) / 1000;
  const summary = summarise(verdicts, { seed: options.seed, cli, seconds });
  const out = join(PROJECT_ROOT, "scratch");
  mkdirSync(out, { recursive: true });
  writeFileSync(join(out, "fuzz-summary.json"), JSON.stringify(summary, null, 2) + "\n");
  printSummary(summary);
  process.exitCode = summary.failed ? 1 : 0;
}

await main();

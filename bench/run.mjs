/**
 * Runs every bench/*.bench.mjs in turn, each in its own Node process so one benchmark's JIT
 * state and heap cannot colour the next. Exits non-zero if any benchmark fails.
 * `npm run bench` builds first; running this alone uses whatever dist/ holds.
 */
import { spawnSync } from "node:child_process";
import { readdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const benchDir = dirname(fileURLToPath(import.meta.url));
const files = readdirSync(benchDir)
  .filter((f) => f.endsWith(".bench.mjs"))
  .sort();
if (files.length === 0) throw new Error(`no *.bench.mjs files in ${benchDir}`);

const failed = [];
for (const file of files) {
  console.log(`\n== ${file}`);
  const run = spawnSync(process.execPath, [join(benchDir, file)], { stdio: "inherit" });
  if (run.status !== 0) failed.push(`${file} (${run.signal ?? `exit ${run.status}`})`);
}
if (failed.length) {
  console.error(`\nbenchmarks failed: ${failed.join(", ")}`);
  process.exit(1);
}

/**
 * One model through keel, in a process of its own (so a hang or a crash costs one model, not the
 * run): reads a spec file, runs keel's pipeline, prints the KeelSummary (or the crash) as JSON.
 * Run by run.ts from the crosscheck build: node scratch/crosscheck/build/tests/crosscheck/keel-worker.js SPEC
 */
import { readFileSync } from "node:fs";
import { runPipeline } from "../../src/pipeline.js";
import { summarizeResults, type KeelOutcome } from "./summary.js";

function main(path: string): KeelOutcome {
  const text = readFileSync(path, "utf8");
  const id = (JSON.parse(text) as { id: string }).id;
  const t0 = performance.now();
  try {
    const out = runPipeline(text);
    const seconds = (performance.now() - t0) / 1000;
    if (!out.ok) return { id, ok: false, seconds, error: `spec refused: ${JSON.stringify(out.issues)}` };
    return summarizeResults(out.value.results, seconds);
  } catch (err) {
    const seconds = (performance.now() - t0) / 1000;
    return { id, ok: false, seconds, error: err instanceof Error ? (err.stack ?? err.message) : String(err) };
  }
}

process.stdout.write(JSON.stringify(main(process.argv[2])));

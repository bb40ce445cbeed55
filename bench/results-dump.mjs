// Writes results.json for each spec, analysed by the keel build in TREE (a checkout with dist/ built).
// Usage: node bench/results-dump.mjs TREE OUTDIR SPEC...
// Used by results-compare.mjs; it runs one process per tree, so the two builds never share a module.
// Each spec is analysed in a worker thread; one that runs past SPEC_TIME_LIMIT_MS is stopped and
// recorded as timed out after five minutes (some fixtures exist for the compiler's tests and were never meant to be
// analysed whole), so one hang cannot stall the comparison.
import { readFileSync, writeFileSync, mkdirSync } from "node:fs";
import { basename, join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { Worker, isMainThread, parentPort, workerData } from "node:worker_threads";

const SPEC_TIME_LIMIT_MS = 300_000;

if (!isMainThread) {
  const keel = await import(pathToFileURL(resolve(workerData.tree, "dist/index.js")).href);
  parentPort.on("message", (spec) => {
    const run = keel.runPipeline(readFileSync(spec, "utf8"));
    const text = run.ok
      ? keel.serializeResults(run.value.results)
      : JSON.stringify({ notAnalysed: run.issues.map((i) => i.code) });
    parentPort.postMessage(text);
  });
} else {
  const [tree, outDir, ...specs] = process.argv.slice(2);
  mkdirSync(outDir, { recursive: true });
  let worker = null;
  const analyse = (spec) =>
    new Promise((done) => {
      worker ??= new Worker(new URL(import.meta.url), { workerData: { tree } });
      const timer = setTimeout(() => {
        worker.removeAllListeners("message");
        void worker.terminate();
        worker = null;
        done(JSON.stringify({ timedOut: SPEC_TIME_LIMIT_MS }));
      }, SPEC_TIME_LIMIT_MS);
      worker.once("message", (text) => {
        clearTimeout(timer);
        done(text);
      });
      worker.postMessage(spec);
    });
  let count = 0;
  for (const spec of specs) {
    writeFileSync(join(outDir, `${basename(spec, ".json")}.json`), await analyse(spec));
    count++;
    if (process.stderr.isTTY) process.stderr.write(`\r${tree}: ${count}/${specs.length}`);
  }
  if (process.stderr.isTTY) process.stderr.write("\n");
  await worker?.terminate();
}

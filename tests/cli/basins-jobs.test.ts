import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { analyze, analyzeAsync } from "../../src/analysis/analyze.js";
import { instantiateBasinKernel } from "../../src/analysis/basins/kernel.js";
import type { BatchEvaluator } from "../../src/analysis/basins/refine.js";
import { prepareModel } from "../../src/pipeline.js";
import {
  runParameterTask,
  type ParameterTaskResult,
  type ParameterTaskRunner,
} from "../../src/analysis/parameters/tasks.js";
import { compileModel } from "../../src/model/compile.js";
import { threadsFor } from "../../src/cli/commands/run.js";
import { CLI_ENTRY, removeWorkDirs, runKeel } from "../fixtures/cli.js";
import { EXAMPLE_IDS, exampleSpec } from "../fixtures/examples.js";

/**
 * Determinism across worker counts (common practice for parallel numerics: the answer is
 * assembled in a fixed order, so it must not depend on how the work was split). The CLI runs
 * are the built dist/ (npm test builds first).
 */
const EXAMPLES = EXAMPLE_IDS;
/** An awkward batch size (prime, and not a divisor of any level's batch) for the odd evaluator. */
const ODD_CHUNK = 7;

afterAll(() => removeWorkDirs());

/**
 * The example at its full basin resolution, with two of its parameter studies: both pooled
 * stages run (basin batches and study tasks); further studies would repeat the same tasks.
 */
function analyzeJobs(example: string, jobs: number): Buffer {
  const spec = exampleSpec(example);
  delete spec.$schema;
  const ranged = (spec.parameters as { name: string; range?: unknown }[]).filter((p) => p.range);
  spec.analysis = { ...(spec.analysis ?? {}), parameters: ranged.slice(0, 2).map((p) => p.name) };
  const run = runKeel(["analyze", "spec.json", "--out", "out", "--jobs", String(jobs), "--quiet"], {
    files: { "spec.json": JSON.stringify(spec) },
  });
  expect(run.status, run.stderr).toBe(0);
  return readFileSync(join(run.cwd, "out", "results.json"));
}

describe("keel analyze --jobs", () => {
  it("keel analyze EXAMPLE --jobs 1 and --jobs 2 write byte-identical results.json", () => {
    expect(existsSync(CLI_ENTRY), `${CLI_ENTRY} is missing: build with npx tsc -p tsconfig.json`).toBe(true);
    for (const example of EXAMPLES) {
      const one = analyzeJobs(example, 1);
      const two = analyzeJobs(example, 2);
      expect(JSON.parse(one.toString("utf8")).basins.grid.nx, example).toBe(1024);
      expect(two.equals(one), `${example}: results.json differs between --jobs 1 and --jobs 2`).toBe(true);
    }
  });
});

describe("analyzeAsync with an evaluator that splits batches oddly", () => {
  /**
   * Labels each batch in chunks of ODD_CHUNK starts, last chunk first, each after a turn of the
   * event loop: a stand-in for workers that answer out of order. Counts the chunks so the test
   * knows the batches really were split.
   */
  function reversedChunks(counter: { chunks: number }) {
    return (source: string): BatchEvaluator => {
      const kernel = instantiateBasinKernel(source);
      return async (starts) => {
        const count = starts.length / 2;
        const out = new Int32Array(count);
        const firsts: number[] = [];
        for (let first = 0; first < count; first += ODD_CHUNK) firsts.push(first);
        for (const first of firsts.reverse()) {
          await new Promise((resolve) => setImmediate(resolve));
          const last = Math.min(count, first + ODD_CHUNK);
          const labels = new Int32Array(last - first);
          kernel(starts.slice(2 * first, 2 * last), labels);
          out.set(labels, first);
          counter.chunks++;
        }
        return out;
      };
    };
  }

  for (const example of EXAMPLES) {
    it(`analyzeAsync(${example}, chunks of 7 in reverse) deep-equals analyze(${example})`, async () => {
      const spec = exampleSpec(example);
      // a lower resolution keeps the test short; 256/16 still refines over four levels. No
      // parameter studies: their tasks are the next test's subject, and here they only cost time
      spec.analysis = { basins: { resolution: 256, coarse: 16 }, parameters: [] };
      const prepared = prepareModel(JSON.stringify(spec));
      if (!prepared.ok) throw new Error(JSON.stringify(prepared.issues));
      const model = prepared.value.model;
      const counter = { chunks: 0 };
      const oddly = await analyzeAsync(model, reversedChunks(counter));
      const direct = analyze(model);
      expect(counter.chunks).toBeGreaterThan((16 * 16) / ODD_CHUNK);
      expect(oddly).toEqual(direct);
      expect(JSON.stringify(oddly)).toBe(JSON.stringify(direct));
    });
  }
});

describe("analyzeAsync with parameter tasks run out of order on a second compilation", () => {
  /**
   * Runs the tasks last first, each on a model compiled again from a structured clone of the
   * spec (as a worker thread sees it), its answer cloned back: a stand-in for the worker pool.
   */
  const lastFirstElsewhere: ParameterTaskRunner = async (model, tasks) => {
    const compiled = compileModel(structuredClone(model.spec));
    if (!compiled.ok) throw new Error("the spec did not compile again");
    const answers: ParameterTaskResult[] = new Array(tasks.length);
    for (let k = tasks.length - 1; k >= 0; k--) {
      await new Promise((resolve) => setImmediate(resolve));
      answers[k] = structuredClone(runParameterTask(compiled.value, structuredClone(tasks[k])));
    }
    return answers;
  };

  it("analyzeAsync(competition-map, tasks last first) deep-equals analyze(competition-map), map and studies included", async () => {
    // two studies and one map, with a small basin grid (64/16)
    const text = readFileSync(join("tests", "fixtures", "specs", "competition-map-a4409dc54a.json"), "utf8");
    const prepared = prepareModel(text);
    if (!prepared.ok) throw new Error(JSON.stringify(prepared.issues));
    const model = prepared.value.model;
    const label = (source: string): BatchEvaluator => {
      const kernel = instantiateBasinKernel(source);
      return async (starts) => {
        const out = new Int32Array(starts.length / 2);
        kernel(starts, out);
        return out;
      };
    };
    const elsewhere = await analyzeAsync(model, label, undefined, undefined, lastFirstElsewhere);
    const direct = analyze(model);
    expect(direct.conditions.studies.length).toBeGreaterThan(0);
    expect(direct.conditions.maps.length).toBe(1);
    expect(JSON.stringify(elsewhere)).toBe(JSON.stringify(direct));
  });
});

describe("threadsFor", () => {
  it("threadsFor(jobs, cores) takes --jobs up to the core count and one per core by default", () => {
    expect(threadsFor(undefined, 2)).toBe(2);
    expect(threadsFor(1, 2)).toBe(1);
    expect(threadsFor(2, 2)).toBe(2);
    // --jobs 64 on two cores: two threads, not 63 workers fighting for them
    expect(threadsFor(64, 2)).toBe(2);
    expect(threadsFor(undefined, 0)).toBe(1);
  });
});

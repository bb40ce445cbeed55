import { instantiateBasinKernel, type BasinKernel } from "../analysis/basins/kernel.js";
import {
  runParameterTask,
  type ParameterTask,
  type ParameterTaskResult,
} from "../analysis/parameters/tasks.js";
import { withParameters } from "../model/parameters.js";
import type { Model } from "../model/types.js";
import type { NormalizedSpec } from "../spec/types.js";
import { workerData } from "node:worker_threads";

/**
 * Worker side of the analysis pool (pool.ts): labels basin batches with a kernel compiled once
 * per source, and runs parameter tasks on a model compiled once per spec. The model is the
 * main thread's own compilation of the same normalised spec (the same generated code), bound to
 * the same parameter values, so a task gives here what it gives there.
 */
let cachedSource = "";
let cachedKernel: BasinKernel | null = null;

export function labelBatch({ source, starts }: { source: string; starts: Float64Array }): Int32Array {
  if (source !== cachedSource || !cachedKernel) {
    cachedKernel = instantiateBasinKernel(source);
    cachedSource = source;
  }
  const out = new Int32Array(starts.length / 2);
  cachedKernel(starts, out);
  return out;
}

let cachedSpec = "";
let cachedModel: Promise<Model> | null = null;

/** The model of `spec`, compiled once per spec (the first caller starts it, later ones wait for it). */
function compiledFor(spec: NormalizedSpec): Promise<Model> {
  const key = JSON.stringify(spec);
  if (key !== cachedSpec || !cachedModel) {
    cachedSpec = key;
    // loaded on first use: a pool that labels basin batches only never needs the compiler
    cachedModel = import("../model/compile.js").then(({ compileModel }) => {
      const compiled = compileModel(spec);
      // the main thread compiles this very spec too: a failure here is a bug
      if (!compiled.ok) throw new Error(`worker: the spec ${spec.id} did not compile`);
      return compiled.value;
    });
  }
  return cachedModel;
}

async function modelFor(spec: NormalizedSpec, parameterValues: number[]): Promise<Model> {
  const model = await compiledFor(spec);
  const same = parameterValues.every((v, k) => Object.is(v, model.parameterValues[k]));
  return same ? model : withParameters(model, parameterValues);
}

/**
 * Started with the spec's text (pool.ts), the worker compiles its model at once, while the main
 * thread runs the nominal analysis. A spec that does not parse is left alone: the main thread
 * reports it, and no task will come.
 */
async function warmUp(specText: unknown): Promise<void> {
  if (typeof specText !== "string") return;
  const { parseSpecText } = await import("../spec/parse.js");
  const parsed = parseSpecText(specText);
  if (!parsed.ok) return;
  const model = await compiledFor(parsed.value).catch(() => null);
  if (!model) return;
  // one outcome at the nominal values, thrown away: the integrator's and the fate rules' code is
  // then optimised before the first task, as in the main thread after its nominal analysis
  const { classifyOutcome } = await import("../analysis/parameters/outcomes.js");
  classifyOutcome(model, true);
}
void warmUp((workerData as { specText?: unknown } | null)?.specText);

export async function runTask({
  spec,
  parameterValues,
  task,
}: {
  spec: NormalizedSpec;
  parameterValues: number[];
  task: ParameterTask;
}): Promise<{ answer: ParameterTaskResult; ms: number }> {
  const model = await modelFor(spec, parameterValues);
  const started = performance.now();
  const answer = runParameterTask(model, task);
  // timed here, where it ran, for --profile: the wait in the pool's queue is not the task's
  return { answer, ms: performance.now() - started };
}

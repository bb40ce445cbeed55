import { instantiateBasinKernel, type BasinKernel } from "../analysis/basins/kernel.js";
import {
  runParameterTask,
  type ParameterTask,
  type ParameterTaskResult,
} from "../analysis/parameters/tasks.js";
import { withParameters } from "../model/parameters.js";
import type { Model } from "../model/types.js";
import type { NormalizedSpec } from "../spec/types.js";

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
let cachedModel: Model | null = null;

async function modelFor(spec: NormalizedSpec, parameterValues: number[]): Promise<Model> {
  const key = JSON.stringify(spec);
  if (key !== cachedSpec || !cachedModel) {
    // loaded on the first task: a pool that labels basin batches only never needs the compiler
    const { compileModel } = await import("../model/compile.js");
    const compiled = compileModel(spec);
    // the main thread compiled this very spec before sending it: a failure here is a bug
    if (!compiled.ok) throw new Error(`worker: the spec ${spec.id} did not compile again`);
    cachedModel = compiled.value;
    cachedSpec = key;
  }
  const same = parameterValues.every((v, k) => Object.is(v, cachedModel!.parameterValues[k]));
  return same ? cachedModel : withParameters(cachedModel, parameterValues);
}

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

/**
 * keel's pipeline. Data flows one way:
 *
 *   spec.json ──► spec/      read, validate (zod), normalise, hash ──────────► NormalizedSpec
 *   Spec      ──► model/     parse (mathjs), whitelist, differentiate,
 *                            compile to JS, TeX ──────────────────────────────► Model
 *   Model     ──► analysis/  pure deterministic passes ────────────────────────► Results
 *   Results   ──► report/    figures, math, templates, html, pdf ─────────────► out/<id>/
 *
 * Each step returns a result rather than throwing on bad input; cli/ turns issues into exit codes.
 */
import type { Parsed } from "./diagnostics/issue.js";
import { parseSpecText } from "./spec/parse.js";
import type { NormalizedSpec } from "./spec/types.js";
import { compileModel } from "./model/compile.js";
import type { Model } from "./model/types.js";
import {
  analyze,
  analyzeAsync,
  optionsForModel,
  type AnalysisOptions,
  type ProgressReporter,
} from "./analysis/analyze.js";
import type { BatchEvaluator } from "./analysis/basins/refine.js";
import type { ParameterTaskRunner } from "./analysis/parameters/tasks.js";
import type { Results } from "./analysis/types.js";

export interface PipelineOutput {
  spec: NormalizedSpec;
  model: Model;
  results: Results;
}

/** Steps 1–2: spec text → normalised spec → compiled model. */
export function prepareModel(specText: string): Parsed<{ spec: NormalizedSpec; model: Model }> {
  // 1. read, validate, normalise, hash
  const spec = parseSpecText(specText);
  if (!spec.ok) return spec;
  // 2. parse expressions, whitelist, differentiate, generate code
  const model = compileModel(spec.value);
  if (!model.ok) return model;
  return { ok: true, value: { spec: spec.value, model: model.value } };
}

/** Steps 1–3: spec text → results. */
export function runPipeline(
  specText: string,
  options?: AnalysisOptions,
  progress?: ProgressReporter,
): Parsed<PipelineOutput> {
  const prepared = prepareModel(specText);
  if (!prepared.ok) return prepared;
  // 3. analysis passes, in this thread
  const model = prepared.value.model;
  const results = analyze(model, options ?? optionsForModel(model), progress);
  return { ok: true, value: { ...prepared.value, results } };
}

/**
 * Steps 1–3 with the basin map fanned out through `evaluate` and the parameter studies and maps
 * through `runTasks` (a worker pool); same Results.
 */
export async function runPipelineAsync(
  specText: string,
  evaluate: (kernelSource: string) => BatchEvaluator,
  options?: AnalysisOptions,
  progress?: ProgressReporter,
  runTasks?: ParameterTaskRunner,
): Promise<Parsed<PipelineOutput>> {
  const prepared = prepareModel(specText);
  if (!prepared.ok) return prepared;
  const model = prepared.value.model;
  const results = await analyzeAsync(model, evaluate, options ?? optionsForModel(model), progress, runTasks);
  return { ok: true, value: { ...prepared.value, results } };
}

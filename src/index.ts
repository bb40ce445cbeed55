/** keel's public API. The CLI is a thin client of these. */
export { parseSpecText, parseSpecValue, parseJsonText } from "./spec/parse.js";
export { buildSpecJsonSchema, KeelSpecSchema } from "./spec/schema.js";
export { hashSpec, canonicalJson } from "./spec/hash.js";
export { compileModel } from "./model/compile.js";
export { analyze, DEFAULT_ANALYSIS_OPTIONS } from "./analysis/analyze.js";
export { findEquilibria } from "./analysis/phase/equilibria.js";
export { classifyEquilibrium } from "./analysis/phase/stability.js";
export { runPipeline, prepareModel } from "./pipeline.js";
export { serializeResults, type ResultsDocument } from "./report/archive/serialize.js";
export { KEEL_VERSION, RESULTS_FORMAT } from "./version.js";
export type { NormalizedSpec } from "./spec/types.js";
export type { Model } from "./model/types.js";
export type {
  Results,
  EquilibriumResult,
  StabilityResult,
  EquilibriumType,
  AssumptionResult,
} from "./analysis/types.js";
export type { SpecIssue, Diagnostic, Parsed } from "./diagnostics/issue.js";

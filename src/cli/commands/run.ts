import { availableParallelism } from "node:os";
import { runPipeline, runPipelineAsync, type PipelineOutput } from "../../pipeline.js";
import type { Parsed } from "../../diagnostics/issue.js";
import type { ProgressReporter } from "../../analysis/analyze.js";
import { createBasinPool } from "../pool.js";

/** Runs the pipeline, fanning the basin map out to `jobs` worker threads when jobs > 1. */
export async function runAnalysis(
  specText: string,
  jobs: number | undefined,
  progress?: ProgressReporter,
): Promise<Parsed<PipelineOutput>> {
  const workers = jobs ?? availableParallelism();
  if (workers <= 1) return runPipeline(specText, undefined, progress);
  const pool = createBasinPool(
    workers,
    progress ? (done, total) => progress("basin cells", done, total) : undefined,
  );
  try {
    return await runPipelineAsync(specText, pool.evaluator, undefined, progress);
  } finally {
    await pool.close();
  }
}

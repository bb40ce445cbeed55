import { availableParallelism } from "node:os";
import { runPipelineAsync, type PipelineOutput } from "../../pipeline.js";
import type { Parsed } from "../../diagnostics/issue.js";
import { taskStage, type ProgressReporter } from "../../analysis/analyze.js";
import { instantiateBasinKernel } from "../../analysis/basins/kernel.js";
import type { BatchEvaluator } from "../../analysis/basins/refine.js";
import { runParameterTask, type ParameterTaskRunner } from "../../analysis/parameters/tasks.js";
import { createAnalysisPool } from "../pool.js";
import { taskName, type TaskTimer } from "../profile.js";

/** Starts labelled between two progress events when the basin map runs in this thread (as the pool's task size). */
const STARTS_PER_PROGRESS = 512;

/** The basin map's batches, labelled in this thread, with progress by STARTS_PER_PROGRESS starts. */
function labelHere(progress?: ProgressReporter): (source: string) => BatchEvaluator {
  let done = 0;
  let total = 0;
  return (source) => {
    const kernel = instantiateBasinKernel(source);
    return async (starts) => {
      const count = starts.length / 2;
      const out = new Int32Array(count);
      total += count;
      for (let first = 0; first < count; first += STARTS_PER_PROGRESS) {
        const last = Math.min(count, first + STARTS_PER_PROGRESS);
        kernel(starts.subarray(2 * first, 2 * last), out.subarray(first, last));
        done += last - first;
        progress?.("basin cells", done, total);
      }
      return out;
    };
  };
}

/** The parameter tasks in this thread, in order, each timed for --profile. */
function tasksHere(progress?: ProgressReporter, clock?: TaskTimer): ParameterTaskRunner {
  return async (model, tasks) => {
    const stage = taskStage(tasks);
    progress?.(stage, 0, tasks.length);
    return tasks.map((task, k) => {
      const started = performance.now();
      const answer = runParameterTask(model, task);
      clock?.task(taskName(task), performance.now() - started);
      progress?.(stage, k + 1, tasks.length);
      return answer;
    });
  };
}

/**
 * The threads a run uses: `jobs`, else one per core, and never more than the cores, since more
 * only adds start-up time and memory (63 workers on 2 cores: 43 s and 3.8 GB for one small spec).
 */
export function threadsFor(jobs: number | undefined, cores: number): number {
  return Math.max(1, Math.min(jobs ?? cores, cores));
}

/**
 * Runs the pipeline with `jobs` threads (at most the available cores) for the parameter work and
 * the basin map: this one and jobs − 1 workers when jobs > 1; with one job, all in this thread. Either way the same
 * generator drives the analysis, so the results are the same.
 */
export async function runAnalysis(
  specText: string,
  jobs: number | undefined,
  progress?: ProgressReporter,
  clock?: TaskTimer,
): Promise<Parsed<PipelineOutput>> {
  const workers = threadsFor(jobs, availableParallelism());
  if (workers <= 1)
    return runPipelineAsync(specText, labelHere(progress), undefined, progress, tasksHere(progress, clock));
  // this thread takes tasks too: it is warm from the nominal analysis, and a worker's start-up
  // (compiling the spec, a cold JIT) is then paid once fewer
  const pool = createAnalysisPool(workers - 1, {
    specText,
    shareThisThread: true,
    onProgress: progress,
    onTask: (task, ms) => clock?.task(taskName(task), ms),
  });
  try {
    return await runPipelineAsync(specText, pool.evaluator, undefined, progress, pool.parameters);
  } finally {
    await pool.close();
  }
}

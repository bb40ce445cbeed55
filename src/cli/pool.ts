import { Piscina } from "piscina";
import type { BatchEvaluator } from "../analysis/basins/refine.js";
import { taskStage } from "../analysis/analyze.js";
import type {
  ParameterTask,
  ParameterTaskResult,
  ParameterTaskRunner,
} from "../analysis/parameters/tasks.js";

/** Starts per task: large enough to amortise messaging, small enough to balance two cores. */
const STARTS_PER_TASK = 512;

export interface AnalysisPool {
  /** The basin map's batches, split into fixed-size tasks. */
  evaluator: (kernelSource: string) => BatchEvaluator;
  /** The parameter studies and map rows, one task each. */
  parameters: ParameterTaskRunner;
  close: () => Promise<void>;
}

export type PoolProgress = (
  stage: "basin cells" | "thresholds" | "maps",
  done: number,
  total: number,
) => void;

/**
 * A worker-thread pool for the analysis's heavy passes: the basin map and the parameter work.
 * Answers are put back in start or task order, so results do not depend on the number of
 * workers. Each worker is handed the spec's text when it starts and compiles the model at once,
 * while this thread runs the nominal analysis, so the parameter tasks do not wait for it.
 */
export function createAnalysisPool(
  jobs: number,
  specText?: string,
  onProgress?: PoolProgress,
  onTask?: (task: ParameterTask, ms: number) => void,
): AnalysisPool {
  const pool = new Piscina({
    filename: new URL("./analysis-worker.js", import.meta.url).href,
    minThreads: jobs,
    maxThreads: jobs,
    idleTimeout: 1000,
    workerData: { specText },
  });
  let done = 0;
  let total = 0;
  const evaluator =
    (source: string): BatchEvaluator =>
    async (starts) => {
      const count = starts.length / 2;
      const out = new Int32Array(count);
      const tasks: Promise<void>[] = [];
      total += count;
      for (let first = 0; first < count; first += STARTS_PER_TASK) {
        const last = Math.min(count, first + STARTS_PER_TASK);
        const slice = starts.slice(2 * first, 2 * last);
        tasks.push(
          pool
            .run({ source, starts: slice }, { name: "labelBatch", transferList: [slice.buffer] })
            .then((labels: Int32Array) => {
              out.set(labels, first);
              done += last - first;
              onProgress?.("basin cells", done, total);
            }),
        );
      }
      await Promise.all(tasks);
      return out;
    };
  const parameters: ParameterTaskRunner = async (model, tasks) => {
    let finished = 0;
    const stage = taskStage(tasks);
    onProgress?.(stage, 0, tasks.length);
    const payload = { spec: model.spec, parameterValues: Array.from(model.parameterValues) };
    return Promise.all(
      tasks.map((task) =>
        pool
          .run({ ...payload, task }, { name: "runTask" })
          .then(({ answer, ms }: { answer: ParameterTaskResult; ms: number }) => {
            onTask?.(task, ms);
            onProgress?.(stage, ++finished, tasks.length);
            return answer;
          }),
      ),
    );
  };
  return { evaluator, parameters, close: () => pool.destroy() };
}

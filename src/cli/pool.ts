import { Piscina } from "piscina";
import { instantiateBasinKernel, type BasinKernel } from "../analysis/basins/kernel.js";
import type { BatchEvaluator } from "../analysis/basins/refine.js";
import { taskStage } from "../analysis/analyze.js";
import {
  runParameterTask,
  type ParameterTask,
  type ParameterTaskResult,
  type ParameterTaskRunner,
} from "../analysis/parameters/tasks.js";

/** Starts per task: large enough to amortise messaging, small enough to balance two cores. */
const STARTS_PER_TASK = 512;
/**
 * Tasks handed to each worker at a time: with two, a worker goes on to its next task while this
 * thread is busy with one of its own and cannot hand out another.
 */
const TASKS_IN_HAND = 2;

export interface AnalysisPool {
  /** The basin map's batches, split into fixed-size tasks. */
  evaluator: (kernelSource: string) => BatchEvaluator;
  /** The parameter studies and map points, one task each. */
  parameters: ParameterTaskRunner;
  close: () => Promise<void>;
}

export type PoolProgress = (
  stage: "basin cells" | "thresholds" | "maps",
  done: number,
  total: number,
) => void;

export interface AnalysisPoolOptions {
  /** Given to each worker as it starts, so it compiles the model while this thread runs the nominal analysis. */
  specText?: string;
  /** This thread takes tasks too, between the workers' answers (the CLI: `--jobs N` is this thread and N − 1 workers). */
  shareThisThread?: boolean;
  onProgress?: PoolProgress;
  /** A parameter task's own time, where it ran (for --profile). */
  onTask?: (task: ParameterTask, ms: number) => void;
}

/** Lets the workers' answers in, and the next task out, between two tasks of this thread. */
const breathe = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Every item run once, by `slots` lanes on the pool and (with `here`) one lane in this thread, each
 * lane taking the next item as it finishes one; the answers are in item order, so they do not
 * depend on which lane ran what.
 */
async function shareOut<T, R>(
  items: T[],
  slots: number,
  there: (item: T) => Promise<R>,
  here: ((item: T) => R) | null,
): Promise<R[]> {
  const answers = new Array<R>(items.length);
  let next = 0;
  const poolLane = async () => {
    while (next < items.length) {
      const k = next++;
      answers[k] = await there(items[k]);
    }
  };
  const thisLane = async () => {
    // the pool lanes post their first tasks before this thread starts on one of its own
    await breathe();
    while (next < items.length) {
      const k = next++;
      answers[k] = here!(items[k]);
      await breathe();
    }
  };
  await Promise.all([...Array.from({ length: slots }, poolLane), ...(here ? [thisLane()] : [])]);
  return answers;
}

/** The basin map's batches in chunks of STARTS_PER_TASK starts, on the pool and (when shared) in this thread. */
function basinEvaluator(
  pool: Piscina,
  slots: number,
  shareThisThread: boolean,
  onProgress?: PoolProgress,
): (source: string) => BatchEvaluator {
  let done = 0;
  let total = 0;
  let kernelHere: { source: string; kernel: BasinKernel } | null = null;
  const labelHere = (source: string, starts: Float64Array): Int32Array => {
    if (kernelHere?.source !== source) kernelHere = { source, kernel: instantiateBasinKernel(source) };
    const out = new Int32Array(starts.length / 2);
    kernelHere.kernel(starts, out);
    return out;
  };
  return (source: string): BatchEvaluator =>
    async (starts) => {
      const count = starts.length / 2;
      const out = new Int32Array(count);
      total += count;
      const firsts = Array.from(
        { length: Math.ceil(count / STARTS_PER_TASK) },
        (_, k) => k * STARTS_PER_TASK,
      );
      const sliceAt = (first: number) =>
        starts.slice(2 * first, 2 * Math.min(count, first + STARTS_PER_TASK));
      const settle = (first: number, labels: Int32Array) => {
        out.set(labels, first);
        done += labels.length;
        onProgress?.("basin cells", done, total);
      };
      await shareOut(
        firsts,
        slots,
        async (first) => {
          const slice = sliceAt(first);
          settle(
            first,
            await pool.run({ source, starts: slice }, { name: "labelBatch", transferList: [slice.buffer] }),
          );
        },
        shareThisThread ? (first) => settle(first, labelHere(source, sliceAt(first))) : null,
      );
      return out;
    };
}

/**
 * A worker-thread pool for the analysis's heavy passes: the basin map and the parameter work.
 * Answers are put back in start or task order, so results do not depend on the number of
 * workers. Each worker is handed the spec's text when it starts and compiles the model at once.
 */
export function createAnalysisPool(workers: number, options: AnalysisPoolOptions = {}): AnalysisPool {
  const { specText, shareThisThread = false, onProgress, onTask } = options;
  const pool = new Piscina({
    filename: new URL("./analysis-worker.js", import.meta.url).href,
    minThreads: workers,
    maxThreads: workers,
    concurrentTasksPerWorker: TASKS_IN_HAND,
    idleTimeout: 1000,
    workerData: { specText },
  });
  const slots = workers * TASKS_IN_HAND;
  const evaluator = basinEvaluator(pool, slots, shareThisThread, onProgress);
  const parameters: ParameterTaskRunner = async (model, tasks) => {
    let finished = 0;
    const stage = taskStage(tasks);
    onProgress?.(stage, 0, tasks.length);
    const payload = { spec: model.spec, parameterValues: Array.from(model.parameterValues) };
    const settle = (task: ParameterTask, answer: ParameterTaskResult, ms: number) => {
      onTask?.(task, ms);
      onProgress?.(stage, ++finished, tasks.length);
      return answer;
    };
    return shareOut(
      tasks,
      slots,
      async (task) => {
        const { answer, ms } = (await pool.run({ ...payload, task }, { name: "runTask" })) as {
          answer: ParameterTaskResult;
          ms: number;
        };
        return settle(task, answer, ms);
      },
      shareThisThread
        ? (task) => {
            const started = performance.now();
            const answer = runParameterTask(model, task);
            return settle(task, answer, performance.now() - started);
          }
        : null,
    );
  };
  return { evaluator, parameters, close: () => pool.destroy() };
}

import { Piscina } from "piscina";
import type { BatchEvaluator } from "../analysis/basins/refine.js";

/** Starts per task: large enough to amortise messaging, small enough to balance two cores. */
const STARTS_PER_TASK = 512;

export interface BasinPool {
  evaluator: (kernelSource: string) => BatchEvaluator;
  close: () => Promise<void>;
}

/**
 * A worker-thread pool for the basin map. Batches are split into fixed-size tasks and the
 * answers put back in start order, so the labels do not depend on the number of workers.
 */
export function createBasinPool(jobs: number, onProgress?: (done: number, total: number) => void): BasinPool {
  const pool = new Piscina({
    filename: new URL("./basin-worker.js", import.meta.url).href,
    minThreads: jobs,
    maxThreads: jobs,
    idleTimeout: 1000,
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
          pool.run({ source, starts: slice }, { transferList: [slice.buffer] }).then((labels: Int32Array) => {
            out.set(labels, first);
            done += last - first;
            onProgress?.(done, total);
          }),
        );
      }
      await Promise.all(tasks);
      return out;
    };
  return { evaluator, close: () => pool.destroy() };
}

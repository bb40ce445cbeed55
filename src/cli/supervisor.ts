import { Worker } from "node:worker_threads";
import type { ProgressReporter } from "../analysis/analyze.js";
import type { Results } from "../analysis/types.js";
import type { Parsed } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import type { NormalizedSpec } from "../spec/types.js";
import type { RunnerInput, RunnerMessage } from "./analysis-runner.js";
import { CliExit, EXIT, type CommonOptions } from "./io.js";

/** The analysis limit when neither --time-limit nor KEEL_TIME_LIMIT sets one: 10 minutes. */
export const DEFAULT_TIME_LIMIT_SECONDS = 600;
/** How often the progress line is redrawn while a stage sends nothing new (the issue asks at most 2 s). */
const HEARTBEAT_MS = 1000;

export interface AnalysisOutput {
  spec: NormalizedSpec;
  results: Results;
}

/**
 * Runs the analysis in a thread of its own (analysis-runner.ts) and watches it from this one:
 * the progress line is redrawn every HEARTBEAT_MS with the stage's elapsed time, and at the time
 * limit the analysis thread (and its pool) is stopped and the command exits with EXIT.timeLimit,
 * having written nothing. The limit is a guard, not a budget: results never depend on the
 * clock, since every stage's own budgets are counts (steps, iterations, cells, evaluations).
 */
export function analyzeSupervised(
  specText: string,
  options: CommonOptions,
  progress: ProgressReporter | undefined,
): Promise<Parsed<AnalysisOutput>> {
  const input: RunnerInput = { specText, jobs: options.jobs };
  const worker = new Worker(new URL("./analysis-runner.js", import.meta.url), { workerData: input });
  let last: { stage: string; done: number; total: number } | null = null;
  return new Promise<Parsed<AnalysisOutput>>((resolve, reject) => {
    let settled = false;
    const finish = (act: () => void) => {
      if (settled) return;
      settled = true;
      clearInterval(heartbeat);
      if (deadline) clearTimeout(deadline);
      // the answer is in: the thread and its pool are done with, and a fault leaves nothing to keep
      void worker.terminate().then(act, act);
    };
    const heartbeat = setInterval(() => {
      if (last) progress?.(last.stage, last.done, last.total);
    }, HEARTBEAT_MS);
    const deadline =
      options.timeLimit === null
        ? null
        : setTimeout(
            () =>
              finish(() =>
                reject(
                  new CliExit(
                    EXIT.timeLimit,
                    `error: ${messages.timeLimitReached(options.timeLimit!, last)}`,
                  ),
                ),
              ),
            options.timeLimit * 1000,
          );
    worker.on("message", (message: RunnerMessage) => {
      switch (message.kind) {
        case "progress":
          last = { stage: message.stage, done: message.done, total: message.total };
          progress?.(message.stage, message.done, message.total);
          break;
        case "task":
          options.clock?.task(message.name, message.ms);
          break;
        case "answer":
          finish(() => resolve(message.output as Parsed<AnalysisOutput>));
          break;
        case "fault": {
          const fault = new Error(message.message);
          fault.stack = message.stack;
          finish(() => reject(fault));
          break;
        }
      }
    });
    worker.on("error", (err) => finish(() => reject(err)));
    worker.on("exit", (code) =>
      finish(() => reject(new Error(`the analysis thread stopped (exit code ${code}) without an answer`))),
    );
  });
}

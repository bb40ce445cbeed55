import { parentPort, workerData } from "node:worker_threads";
import { runAnalysis } from "./commands/run.js";

/**
 * The analysis thread the supervisor (supervisor.ts) starts: it runs the pipeline, with its own
 * worker pool for --jobs, and posts progress, task times and the answer back. Running here leaves
 * the main thread free to redraw progress and to stop the run at its time limit, however long a
 * stretch of the analysis runs without a pause.
 */
export interface RunnerInput {
  specText: string;
  jobs: number | undefined;
}

export type RunnerMessage =
  | { kind: "progress"; stage: string; done: number; total: number }
  | { kind: "task"; name: string; ms: number }
  | { kind: "answer"; output: unknown }
  | { kind: "fault"; message: string; stack: string };

const port = parentPort!;
const post = (message: RunnerMessage) => port.postMessage(message);
const { specText, jobs } = workerData as RunnerInput;

runAnalysis(specText, jobs, (stage, done, total) => post({ kind: "progress", stage, done, total }), {
  task: (name, ms) => post({ kind: "task", name, ms }),
}).then(
  (parsed) => {
    // the compiled model holds functions and stays here; the commands need the spec and results
    const output = parsed.ok
      ? { ok: true, value: { spec: parsed.value.spec, results: parsed.value.results } }
      : parsed;
    post({ kind: "answer", output });
  },
  (err: unknown) =>
    post({
      kind: "fault",
      message: (err as Error)?.message ?? String(err),
      stack: String((err as Error)?.stack),
    }),
);

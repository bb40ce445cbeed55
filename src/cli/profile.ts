import type { ProgressReporter } from "../analysis/analyze.js";
import type { ParameterTask } from "../analysis/parameters/tasks.js";

/** Where a parameter task's own time goes (the stage clock, or a message to it from another thread). */
export interface TaskTimer {
  task(name: string, ms: number): void;
}

/** A stage's or task's wall time, in first-seen order. */
interface Timing {
  name: string;
  ms: number;
}

/**
 * Wall time per stage for `--profile`, read from the progress events the pipeline already sends
 * (a stage runs from its first event to the first event of another), plus each parameter task's
 * own time as the thread that ran it measured it. Only cli/ reads the clock.
 */
export class StageClock implements TaskTimer {
  private readonly stages: Timing[] = [];
  private readonly tasks: Timing[] = [];
  private current: Timing | null = null;
  private since = performance.now();
  private readonly started = this.since;

  /** Enters `stage` (a no-op when it is the current one). */
  enter(stage: string): void {
    if (this.current?.name === stage) return;
    this.close();
    this.current = this.stages.find((s) => s.name === stage) ?? null;
    if (!this.current) {
      this.current = { name: stage, ms: 0 };
      this.stages.push(this.current);
    }
  }

  /** A parameter task's time, as measured where it ran; tasks of one name (a map's points) add up. */
  task(name: string, ms: number): void {
    const known = this.tasks.find((t) => t.name === name);
    if (known) known.ms += ms;
    else this.tasks.push({ name, ms });
  }

  /** A progress reporter that times stages and passes every event on to `inner`. */
  observe(inner?: ProgressReporter): ProgressReporter {
    return (stage, done, total) => {
      this.enter(stage);
      inner?.(stage, done, total);
    };
  }

  private close(): void {
    const now = performance.now();
    if (this.current) this.current.ms += now - this.since;
    this.since = now;
  }

  /** The table printed at the end of the run. */
  report(): string {
    this.close();
    this.current = null;
    const total = performance.now() - this.started;
    const line = (t: Timing) =>
      `  ${t.name.padEnd(28)} ${(t.ms / 1000).toFixed(2).padStart(8)} s ${((100 * t.ms) / total).toFixed(0).padStart(4)} %`;
    const lines = ["profile (wall time; share of the whole run):", ...this.stages.map(line)];
    const other = total - this.stages.reduce((s, t) => s + t.ms, 0);
    lines.push(line({ name: "start-up, reading, writing", ms: other }));
    lines.push(`  ${"total".padEnd(28)} ${(total / 1000).toFixed(2).padStart(8)} s`);
    if (this.tasks.length) {
      lines.push("parameter tasks (time in the thread that ran each; they overlap with --jobs > 1):");
      for (const t of this.tasks)
        lines.push(`  ${t.name.padEnd(28)} ${(t.ms / 1000).toFixed(2).padStart(8)} s`);
    }
    return lines.join("\n");
  }
}

/** The profile's name for a parameter task: one per study, one per map (its chunks of points add up). */
export function taskName(task: ParameterTask): string {
  return task.kind === "study" ? `study of ${task.parameter}` : `map of ${task.pair.join(" and ")}`;
}

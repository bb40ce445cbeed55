import type { ProgressReporter } from "../analysis/analyze.js";
import type { StageClock } from "./profile.js";
import {
  accessSync,
  constants,
  mkdirSync,
  readFileSync,
  renameSync,
  statSync,
  writeFileSync,
  rmSync,
} from "node:fs";
import { dirname, join, basename } from "node:path";
import { formatIssues } from "../diagnostics/format.js";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";

export const EXIT = { ok: 0, internal: 1, input: 2, contradicted: 3 } as const;

/** A failure already explained to the user, carrying its exit code. */
export class CliExit extends Error {
  constructor(
    readonly code: number,
    message: string,
  ) {
    super(message);
  }
}

export function readSpecFile(file: string): string {
  try {
    return readFileSync(file, "utf8");
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const reason =
      code === "ENOENT"
        ? "no such file"
        : code === "EISDIR"
          ? messages.fileIsFolder()
          : (err as Error).message;
    throw new CliExit(EXIT.input, `error: ${messages.fileUnreadable(file, reason)}`);
  }
}

export function inputError(issues: SpecIssue[], file: string): CliExit {
  return new CliExit(EXIT.input, formatIssues(issues, file));
}

/** File-system refusals caused by the output path the user chose: bad usage (exit 2), not a fault. */
const OUTPUT_PATH_REASONS: Record<string, string> = {
  EEXIST: "a file stands where a folder is needed",
  ENOTDIR: "a file stands where a folder is needed",
  EISDIR: "a folder stands where the file should go",
  EACCES: "permission denied",
  EPERM: "permission denied",
  EROFS: "the file system is read-only",
};

function outputError(path: string, err: unknown): unknown {
  const reason = OUTPUT_PATH_REASONS[(err as NodeJS.ErrnoException).code ?? ""];
  return reason ? new CliExit(EXIT.input, `error: ${messages.outputUnwritable(path, reason)}`) : err;
}

/**
 * Refuses, before any analysis runs, an output folder that cannot be written: a file standing
 * where it or a folder above it should be, or a nearest existing folder the user may not write
 * to. Nothing is created here; a long run then fails at the end only for reasons no check
 * beforehand can see (a full disk).
 */
export function checkOutputFolder(dir: string): void {
  const probe = join(dir, "results.json");
  let existing = dir;
  for (;;) {
    try {
      if (!statSync(existing).isDirectory()) throw outputError(probe, { code: "ENOTDIR" });
      break;
    } catch (err) {
      if (err instanceof CliExit) throw err;
      if ((err as NodeJS.ErrnoException).code !== "ENOENT") throw outputError(probe, err);
      const up = dirname(existing);
      if (up === existing) return;
      existing = up;
    }
  }
  try {
    accessSync(existing, constants.W_OK);
  } catch (err) {
    throw outputError(probe, err);
  }
}

/** Writes a file atomically: a temporary file beside it, then a rename. */
export function writeFileAtomic(path: string, content: string | Uint8Array): void {
  try {
    mkdirSync(dirname(path), { recursive: true });
  } catch (err) {
    throw outputError(path, err);
  }
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  try {
    writeFileSync(tmp, content);
    renameSync(tmp, path);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw outputError(path, err);
  }
}

/** Progress on stderr, only when it is a terminal and not silenced. */
/** The options every command takes from the program: --quiet, --jobs, and --profile's clock. */
export interface CommonOptions {
  quiet: boolean;
  jobs?: number;
  clock?: StageClock;
}

/** The progress bar on a terminal (unless quiet), and the profile's stage clock when given. */
export function makeProgress(quiet: boolean, clock?: StageClock): ProgressReporter | undefined {
  const bar = progressBar(quiet);
  return clock ? clock.observe(bar) : bar;
}

function progressBar(quiet: boolean): ProgressReporter | undefined {
  if (quiet || !process.stderr.isTTY) return undefined;
  let last = "";
  return (stage, done, total) => {
    const width = 24;
    const filled = total > 0 ? Math.round((width * done) / total) : width;
    const line = `${stage.padEnd(14)} [${"#".repeat(filled)}${".".repeat(width - filled)}] ${done}/${total}`;
    if (line === last) return;
    last = line;
    process.stderr.write(`\r${line}${done >= total ? "\n" : ""}`);
  };
}

import { mkdirSync, readFileSync, renameSync, writeFileSync, rmSync } from "node:fs";
import { dirname, join, basename } from "node:path";
import { formatIssues } from "../diagnostics/format.js";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";

export const EXIT = { ok: 0, internal: 1, input: 2, contradicted: 3 } as const;

/** A failure already explained to the user, carrying its exit code. */
export class CliExit extends Error {
  constructor(readonly code: number, message: string) {
    super(message);
  }
}

export function readSpecFile(file: string): string {
  try {
    return readFileSync(file, "utf8");
  } catch (err) {
    const reason = (err as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (err as Error).message;
    throw new CliExit(EXIT.input, `error: ${messages.fileUnreadable(file, reason)}`);
  }
}

export function inputError(issues: SpecIssue[], file: string): CliExit {
  return new CliExit(EXIT.input, formatIssues(issues, file));
}

/** Writes a file atomically: a temporary file beside it, then a rename. */
export function writeFileAtomic(path: string, content: string | Uint8Array): void {
  mkdirSync(dirname(path), { recursive: true });
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  try {
    writeFileSync(tmp, content);
    renameSync(tmp, path);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
}

/** Progress on stderr, only when it is a terminal and not silenced. */
export function makeProgress(quiet: boolean): ((stage: string, done: number, total: number) => void) | undefined {
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

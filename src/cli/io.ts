import type { ProgressReporter } from "../analysis/analyze.js";
import type { StageClock } from "./profile.js";
import {
  accessSync,
  closeSync,
  constants,
  fstatSync,
  openSync,
  readSync,
  mkdirSync,
  renameSync,
  statSync,
  writeFileSync,
  rmSync,
} from "node:fs";
import { dirname, join, basename } from "node:path";
import { formatIssues } from "../diagnostics/format.js";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import { SPEC_MAX_BYTES } from "../spec/limits.js";

/** 4: the dossier was written but Chromium, though found, could not print its PDF. */
export const EXIT = { ok: 0, internal: 1, input: 2, contradicted: 3, noPdf: 4, timeLimit: 5 } as const;

/** A failure already explained to the user, carrying its exit code. */
export class CliExit extends Error {
  constructor(
    readonly code: number,
    message: string,
  ) {
    super(message);
  }
}

/**
 * The spec file's text: read with a cap (a device such as /dev/zero, or a huge file, is never read
 * whole), its encoding checked (UTF-8 only, as RFC 8259 §8.1 asks of JSON shared between systems),
 * with a message that says what is wrong with the bytes.
 */
export function readSpecFile(file: string): string {
  let bytes: Buffer;
  try {
    bytes = readCapped(file, SPEC_MAX_BYTES + 1);
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
  const refuse = (reason: string) => new CliExit(EXIT.input, `error: ${file}: ${reason}`);
  if (bytes.length > SPEC_MAX_BYTES) throw refuse(messages.fileTooLarge(SPEC_MAX_BYTES));
  const encoding = foreignEncoding(bytes);
  if (encoding) throw refuse(messages.wrongEncoding(encoding));
  const bad = firstInvalidUtf8(bytes);
  if (bad >= 0) {
    let line = 1;
    for (let k = 0; k < bad; k++) if (bytes[k] === 0x0a) line++;
    throw refuse(messages.notUtf8(bad, line));
  }
  return bytes.toString("utf8");
}

/** At most `cap` bytes of a file, read in chunks. */
function readCapped(file: string, cap: number): Buffer {
  const fd = openSync(file, "r");
  try {
    if (fstatSync(fd).isDirectory()) throw Object.assign(new Error("is a folder"), { code: "EISDIR" });
    const chunks: Buffer[] = [];
    let total = 0;
    while (total < cap) {
      const chunk = Buffer.alloc(Math.min(1 << 16, cap - total));
      const read = readSync(fd, chunk, 0, chunk.length, null);
      if (read === 0) break;
      chunks.push(chunk.subarray(0, read));
      total += read;
    }
    return Buffer.concat(chunks, total);
  } finally {
    closeSync(fd);
  }
}

/** The encoding a byte-order mark or zero bytes betray (JSON text holds no raw zero byte), or null. */
function foreignEncoding(bytes: Buffer): string | null {
  const starts = (...b: number[]) => b.every((v, k) => bytes[k] === v);
  if (starts(0x00, 0x00, 0xfe, 0xff) || starts(0xff, 0xfe, 0x00, 0x00))
    return "UTF-32 (it starts with a UTF-32 byte-order mark)";
  if (starts(0xfe, 0xff) || starts(0xff, 0xfe)) return "UTF-16 (it starts with a UTF-16 byte-order mark)";
  if (bytes.includes(0x00))
    return "not text, or UTF-16 or UTF-32 without a byte-order mark (it holds zero bytes)";
  return null;
}

/**
 * The offset of the first byte that is not part of a well-formed UTF-8 sequence (RFC 3629 §4:
 * no overlong forms, no surrogates, nothing above U+10FFFF), or −1. Node's decoder would replace
 * such bytes silently, and isUtf8 does not say where the fault is.
 */
export function firstInvalidUtf8(b: Buffer): number {
  for (let i = 0; i < b.length;) {
    const c = b[i];
    if (c < 0x80) {
      i++;
      continue;
    }
    const [n, lo, hi] =
      c >= 0xc2 && c <= 0xdf
        ? [1, 0x80, 0xbf]
        : c === 0xe0
          ? [2, 0xa0, 0xbf]
          : c === 0xed
            ? [2, 0x80, 0x9f]
            : c >= 0xe1 && c <= 0xef
              ? [2, 0x80, 0xbf]
              : c === 0xf0
                ? [3, 0x90, 0xbf]
                : c >= 0xf1 && c <= 0xf3
                  ? [3, 0x80, 0xbf]
                  : c === 0xf4
                    ? [3, 0x80, 0x8f]
                    : [0, 0, 0];
    if (n === 0) return i;
    // the second byte has the lead byte's own range; later ones are plain continuation bytes
    if (i + n >= b.length) return i;
    if (b[i + 1] < lo || b[i + 1] > hi) return i;
    for (let k = 2; k <= n; k++) if (b[i + k] === undefined || b[i + k] < 0x80 || b[i + k] > 0xbf) return i;
    i += n + 1;
  }
  return -1;
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
  // a name in --out longer than the file system allows (255 bytes on most): the user's path
  ENAMETOOLONG: "a name in the path is too long for the file system",
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
  // an empty --out would resolve to the current folder and scatter the files there
  if (dir.trim() === "") throw new CliExit(EXIT.input, `error: ${messages.emptyOutputFolder()}`);
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

/** The options every command takes from the program: --quiet, --jobs, --time-limit and --profile's clock. */
export interface CommonOptions {
  quiet: boolean;
  jobs?: number;
  /** The analysis's wall-clock limit in seconds; null for none. */
  timeLimit: number | null;
  clock?: StageClock;
}

/** The progress bar on a terminal (unless quiet), and the profile's stage clock when given. */
export function makeProgress(quiet: boolean, clock?: StageClock): ProgressReporter | undefined {
  const bar = progressBar(quiet);
  return clock ? clock.observe(bar) : bar;
}

/** Progress on stderr, only when it is a terminal and not silenced. */
function progressBar(quiet: boolean): ProgressReporter | undefined {
  if (quiet || !process.stderr.isTTY) return undefined;
  let last = "";
  let stageNow = "";
  let stageSince = performance.now();
  // the same event sent again (the supervisor's heartbeat) redraws the stage's elapsed time
  return (stage, done, total) => {
    if (stage !== stageNow) {
      stageNow = stage;
      stageSince = performance.now();
    }
    const width = 24;
    const filled = total > 0 ? Math.round((width * done) / total) : width;
    const seconds = Math.floor((performance.now() - stageSince) / 1000);
    const line = `${stage.padEnd(14)} [${"#".repeat(filled)}${".".repeat(width - filled)}] ${done}/${total}  ${seconds} s`;
    if (line === last) return;
    last = line;
    process.stderr.write(`\r${line}\x1b[K${done >= total ? "\n" : ""}`);
  };
}

/**
 * Runs the built CLI (`node dist/cli/bin.js ...args`) as a user would: a separate process, in a
 * fresh temporary working directory, with its exit status and both output streams captured.
 * tests/setup/build.ts builds dist/ once before the suites run.
 */
import { spawnSync } from "node:child_process";
import { mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve } from "node:path";
import { fileURLToPath } from "node:url";

export const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../..");
export const CLI_ENTRY = join(PROJECT_ROOT, "dist", "cli", "bin.js");

export interface CliResult {
  /** Exit code, or null when the process was killed by a signal. */
  status: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
  /** The working directory the CLI ran in. */
  cwd: string;
}

export interface RunOptions {
  /** Run here instead of in a new temporary directory. */
  cwd?: string;
  /** Files to write (relative path → content) into the working directory before the run. */
  files?: Record<string, string | Uint8Array>;
  /** Variables to set for this run on top of the test's own environment; undefined removes one. */
  env?: Record<string, string | undefined>;
}

/** A safety net so a hung CLI fails its test instead of stalling the run; not a timing assertion. */
const HANG_GUARD_MS = 300_000;

const created: string[] = [];

/** A new, empty temporary directory, removed by removeWorkDirs(). */
export function makeWorkDir(): string {
  const dir = mkdtempSync(join(tmpdir(), "keel-cli-"));
  created.push(dir);
  return dir;
}

export function removeWorkDirs(): void {
  for (const dir of created.splice(0)) rmSync(dir, { recursive: true, force: true });
}

export function runKeel(args: string[], options: RunOptions = {}): CliResult {
  const cwd = options.cwd ?? makeWorkDir();
  for (const [name, content] of Object.entries(options.files ?? {})) {
    const path = join(cwd, name);
    mkdirSync(dirname(path), { recursive: true });
    writeFileSync(path, content);
  }
  // KEEL_DEBUG would add stack traces on internal faults, which the suites check are absent
  const env: NodeJS.ProcessEnv = { ...process.env, NO_COLOR: "1" };
  delete env.KEEL_DEBUG;
  for (const [name, value] of Object.entries(options.env ?? {})) {
    if (value === undefined) delete env[name];
    else env[name] = value;
  }
  const run = spawnSync(process.execPath, [CLI_ENTRY, ...args], { cwd, env, encoding: "utf8", timeout: HANG_GUARD_MS });
  if (run.error) throw run.error;
  return { status: run.status, signal: run.signal, stdout: run.stdout, stderr: run.stderr, cwd };
}

/** Every file under `dir`, as sorted forward-slash paths relative to it (folders are not listed). */
export function listFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (current: string) => {
    for (const entry of readdirSync(current, { withFileTypes: true })) {
      const path = join(current, entry.name);
      if (entry.isDirectory()) walk(path);
      else out.push(relative(dir, path).split("\\").join("/"));
    }
  };
  walk(dir);
  return out.sort();
}

/** Every entry (files and folders) directly in `dir`, sorted. */
export function listEntries(dir: string): string[] {
  return readdirSync(dir).sort();
}

/** A Node stack frame line ("    at fn (file:1:2)"), which a user-facing error must never show. */
export const STACK_FRAME = /^\s+at\s.*(?:\(.*\)|:\d+:\d+)\s*$/m;

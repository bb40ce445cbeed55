/**
 * Runs one fuzz case as a user would: its own process, in a fresh temporary folder, with its own
 * TMPDIR (so files keel leaves in the system's temporary folder are seen), a time limit, and the
 * whole process group killed when the limit passes (Chromium included).
 */
import { spawn } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve, sep } from "node:path";
import { fileURLToPath } from "node:url";
import type { FuzzCase } from "./base.js";

/** Where `npm run fuzz` compiles the suite (tests/fuzz/tsconfig.json), below the project root. */
const BUILD_FOLDER = join("scratch", "fuzz", "build");

/** The project root, from this file's place: tests/fuzz/, or the same below BUILD_FOLDER when compiled. */
function findProjectRoot(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  const build = here.lastIndexOf(`${sep}${BUILD_FOLDER}${sep}`);
  return build >= 0 ? here.slice(0, build) : resolve(here, "../..");
}

export const PROJECT_ROOT = findProjectRoot();

/** The CLI under test: KEEL_FUZZ_CLI when set (a build of your own), else the project's dist/. */
export function cliEntry(): string {
  return resolve(PROJECT_ROOT, process.env.KEEL_FUZZ_CLI ?? join("dist", "cli", "bin.js"));
}

/** Every case must end within this (the brief of the suite: valid small cases take seconds). */
export const CASE_TIMEOUT_MS = 30_000;
/** How long a process of the CLI's group may outlive it before it counts as left running. */
const LEFT_RUNNING_GRACE_MS = 1_000;
/** Output kept per stream; longer output is counted, not kept. */
const KEPT_OUTPUT = 1 << 20;

export interface CaseFolders {
  root: string;
  /** The working directory the CLI runs in, holding the case's files. */
  work: string;
  /** The CLI's TMPDIR. */
  tmp: string;
}

export interface CaseRun {
  status: number | null;
  signal: NodeJS.Signals | null;
  timedOut: boolean;
  stdout: string;
  stderr: string;
  /** Bytes written to stdout and stderr together, kept or not. */
  outputBytes: number;
  seconds: number;
  /** Processes of the CLI's group still running after it exited (each was then killed). */
  leftRunning: boolean;
}

/** Path (relative, "/" separated, folders with a trailing "/") → SHA-256 of a file's bytes, or "". */
export type Snapshot = Map<string, string>;

export function snapshot(dir: string): Snapshot {
  const out: Snapshot = new Map();
  const walk = (current: string) => {
    for (const entry of readdirSync(current, { withFileTypes: true })) {
      const path = join(current, entry.name);
      const rel = relative(dir, path).split("\\").join("/");
      if (entry.isDirectory()) {
        out.set(`${rel}/`, "");
        walk(path);
      } else
        out.set(rel, entry.isFile() ? createHash("sha256").update(readFileSync(path)).digest("hex") : "");
    }
  };
  walk(dir);
  return out;
}

export function prepareFolders(c: FuzzCase): CaseFolders {
  const root = mkdtempSync(join(tmpdir(), "keel-fuzz-"));
  const work = join(root, "work");
  const tmp = join(root, "tmp");
  mkdirSync(work);
  mkdirSync(tmp);
  for (const [name, content] of Object.entries(c.files)) {
    const path = join(work, name);
    if (name.endsWith("/")) mkdirSync(path, { recursive: true });
    else {
      mkdirSync(dirname(path), { recursive: true });
      writeFileSync(path, content);
    }
  }
  return { root, work, tmp };
}

export function removeFolders(folders: CaseFolders): void {
  rmSync(folders.root, { recursive: true, force: true });
}

export function runCase(c: FuzzCase, folders: CaseFolders, cli = cliEntry()): Promise<CaseRun> {
  const env: NodeJS.ProcessEnv = { ...process.env, KEEL_JOBS: "1", NO_COLOR: "1", TMPDIR: folders.tmp };
  delete env.KEEL_DEBUG; // it would add stack traces, which the checks look for
  const started = performance.now();
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [cli, ...(c.args ?? ["check", "spec.json"])], {
      cwd: folders.work,
      env,
      stdio: ["ignore", "pipe", "pipe"],
      detached: true, // its own process group, so the limit stops Chromium too
    });
    const streams = { stdout: "", stderr: "" };
    let outputBytes = 0;
    let timedOut = false;
    const keep = (key: "stdout" | "stderr") => (chunk: Buffer) => {
      outputBytes += chunk.length;
      if (streams[key].length < KEPT_OUTPUT) streams[key] += chunk.toString("utf8");
    };
    child.stdout.on("data", keep("stdout"));
    child.stderr.on("data", keep("stderr"));
    const timer = setTimeout(() => {
      timedOut = true;
      try {
        process.kill(-child.pid!, "SIGKILL");
      } catch {
        child.kill("SIGKILL");
      }
    }, CASE_TIMEOUT_MS);
    child.on("error", fail);
    child.on("close", (status, signal) => {
      clearTimeout(timer);
      const seconds = (performance.now() - started) / 1000;
      // whatever the CLI started and left behind in its group is noted, then stopped
      const finish = (leftRunning: boolean) => {
        if (leftRunning) groupKill(child.pid!);
        done({ status, signal, timedOut, ...streams, outputBytes, seconds, leftRunning });
      };
      // a grace period: a child exiting at the same moment as the CLI is not left running
      if (timedOut || !groupAlive(child.pid!)) finish(false);
      else setTimeout(() => finish(groupAlive(child.pid!)), LEFT_RUNNING_GRACE_MS);
    });
  });
}

function groupAlive(pgid: number): boolean {
  try {
    process.kill(-pgid, 0);
    return true;
  } catch {
    return false; // ESRCH: no process left in the group, the usual case
  }
}

function groupKill(pgid: number): void {
  try {
    process.kill(-pgid, "SIGKILL");
  } catch {
    // it ended on its own in the meantime
  }
}

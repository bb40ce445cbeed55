import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  renameSync,
  rmSync,
  statSync,
  writeSync,
} from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { messages } from "../diagnostics/messages.js";
import { CliExit, EXIT, writeFileAtomic } from "./io.js";

/**
 * The output folder's life in one build: a lock beside it (one writer at a time), a staging
 * folder beside it that receives every file, then one swap, so a reader never meets a mixture of
 * two builds and a failure part-way leaves the old folder as it was. Beside, not inside: a rename
 * is atomic only within one file system, and the folder itself is what gets replaced.
 */
export interface OutputFolder {
  dir: string;
  /** Writes every file, then puts them in place (see `prepareOutputFolder`). */
  commit(files: Map<string, string | Uint8Array>): string[];
  /** Removes the staging folder and the lock; safe to call twice. */
  release(): void;
}

// resolved first: "out/" and "." have no usable base name as given
const marker = (dir: string, kind: string) =>
  join(dirname(resolve(dir)), `.${basename(resolve(dir))}.keel-${kind}`);
const lockPath = (dir: string) => marker(dir, "lock");
const stagingPrefix = (dir: string) => `.${basename(resolve(dir))}.keel-new-`;
const retiredPrefix = (dir: string) => `.${basename(resolve(dir))}.keel-old-`;

/** Whether a process with this id is running (signal 0 checks without sending anything). */
function isRunning(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === "EPERM";
  }
}

/** Takes the lock, or refuses when a running keel holds it; a dead holder's lock is taken over. */
function acquireLock(dir: string): void {
  const path = lockPath(dir);
  mkdirSync(dirname(path), { recursive: true });
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = openSync(path, "wx");
      writeSync(fd, `${process.pid}\n`);
      closeSync(fd);
      return;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "EEXIST") throw err;
      const holder = Number(readFileSync(path, "utf8").trim());
      if (isRunning(holder) && holder !== process.pid)
        throw new CliExit(EXIT.input, `error: ${messages.outputLocked(dir, holder, path)}`);
      rmSync(path, { force: true });
    }
  }
  throw new CliExit(EXIT.input, `error: ${messages.outputLocked(dir, NaN, path)}`);
}

/** Staging and retired folders left by builds that were killed: their processes are gone. */
function removeLeftovers(dir: string): void {
  const parent = dirname(resolve(dir));
  if (!existsSync(parent)) return;
  for (const name of readdirSync(parent)) {
    const prefix = [stagingPrefix(dir), retiredPrefix(dir)].find((p) => name.startsWith(p));
    if (prefix && !isRunning(Number(name.slice(prefix.length))))
      rmSync(join(parent, name), { recursive: true, force: true });
  }
}

/**
 * A folder keel may replace whole: absent, empty, or an earlier build of the same spec id (its
 * spec.json and manifest.json say so). Anything else is the user's.
 */
function replaceableBuild(dir: string, specId: string | null): boolean {
  if (!existsSync(dir)) return true;
  const entries = readdirSync(dir);
  if (entries.length === 0) return true;
  if (!entries.includes("manifest.json") || !entries.includes("spec.json")) return false;
  try {
    const earlier = JSON.parse(readFileSync(join(dir, "spec.json"), "utf8")) as { id?: unknown };
    const manifest = JSON.parse(readFileSync(join(dir, "manifest.json"), "utf8")) as { files?: unknown };
    if (specId === null || earlier.id !== specId) return false;
    const listed = new Set(Object.keys((manifest.files ?? {}) as object));
    listed.add("manifest.json");
    // a file the build did not write (a note the user put there) would be lost in the swap
    return filesUnder(dir).every((name) => listed.has(name) || isOwnTemporary(name));
  } catch {
    return false;
  }
}

/** Every file below `dir`, as a relative path with "/" separators. */
function filesUnder(dir: string, prefix = ""): string[] {
  return readdirSync(join(dir, prefix), { withFileTypes: true }).flatMap((entry) => {
    const name = prefix ? `${prefix}/${entry.name}` : entry.name;
    return entry.isDirectory() ? filesUnder(dir, name) : [name];
  });
}

/** writeFileAtomic's temporary file, left by a killed run (".name.PID.tmp"). */
const isOwnTemporary = (name: string) => /(^|\/)\.[^/]+\.\d+\.tmp$/.test(name);

/**
 * replace: the folder is swapped whole for the new files (refused unless `replaceableBuild`);
 * force: swapped when replaceable, else the files are written into it one by one;
 * in-place: the files are written into it one by one (analyze's results.json beside a dossier).
 */
export type WriteMode = "replace" | "force" | "in-place";

/**
 * Locks `dir` and prepares its replacement, before the analysis starts (a refusal costs nothing
 * then). `specId` is the id the spec declares, read loosely: a spec whose id is missing gets
 * refused later by validation anyway.
 */
export function prepareOutputFolder(dir: string, specId: string | null, mode: WriteMode): OutputFolder {
  if (existsSync(dir) && !statSync(dir).isDirectory())
    throw new CliExit(
      EXIT.input,
      `error: ${messages.outputUnwritable(dir, "a file stands where a folder is needed")}`,
    );
  acquireLock(dir);
  let staging: string | null = null;
  let released = false;
  const release = () => {
    if (released) return;
    released = true;
    if (staging) rmSync(staging, { recursive: true, force: true });
    rmSync(lockPath(dir), { force: true });
  };
  try {
    removeLeftovers(dir);
    const replaceable = mode !== "in-place" && replaceableBuild(dir, specId);
    if (mode === "replace" && !replaceable)
      throw new CliExit(EXIT.input, `error: ${messages.outputNotKeels(dir)}`);
    const inPlace = !replaceable;
    const commit = (files: Map<string, string | Uint8Array>): string[] => {
      const written = [...files.keys()].map((name) => join(dir, name));
      if (inPlace) {
        for (const [name, content] of files) writeFileAtomic(join(dir, name), content);
        return written;
      }
      staging = join(dirname(resolve(dir)), `${stagingPrefix(dir)}${process.pid}`);
      rmSync(staging, { recursive: true, force: true });
      for (const [name, content] of files) writeFileAtomic(join(staging, name), content);
      const retired = join(dirname(resolve(dir)), `${retiredPrefix(dir)}${process.pid}`);
      if (existsSync(dir)) renameSync(dir, retired);
      renameSync(staging, dir);
      staging = null;
      rmSync(retired, { recursive: true, force: true });
      return written;
    };
    return { dir, commit, release };
  } catch (err) {
    release();
    throw err;
  }
}

/**
 * Runs `work` holding the folder, releasing it however the run ends: normally, by an error, or by
 * SIGINT/SIGTERM (then the process ends with 128 + the signal's number, as shells expect).
 */
export async function withOutputFolder<T>(
  dir: string,
  specId: string | null,
  mode: WriteMode,
  work: (folder: OutputFolder) => Promise<T>,
): Promise<T> {
  const folder = prepareOutputFolder(dir, specId, mode);
  const onSignal = (signal: NodeJS.Signals) => {
    folder.release();
    process.exit(128 + (signal === "SIGINT" ? 2 : 15));
  };
  process.on("SIGINT", onSignal);
  process.on("SIGTERM", onSignal);
  process.on("exit", folder.release);
  try {
    return await work(folder);
  } finally {
    folder.release();
    process.off("SIGINT", onSignal);
    process.off("SIGTERM", onSignal);
    process.off("exit", folder.release);
  }
}

/** The id a spec text declares, without validating anything else; null when it has none. */
export function declaredId(specText: string): string | null {
  try {
    const id = (JSON.parse(specText) as { id?: unknown }).id;
    return typeof id === "string" ? id : null;
  } catch {
    return null;
  }
}

/**
 * What every fuzz case must show (DESIGN.md "CLI contract"; README "Usage", "Output folders"):
 * exit 0 or 2, never 1, a signal or the time limit; no stack trace; no raw control character in
 * the terminal output; and nothing half-written: on any other exit than 0, the folder is as it
 * was (no output folder, no *.tmp, no .keel-* lock or staging folder, nothing in TMPDIR); on exit 0,
 * a build folder holding exactly the files its manifest lists, with their hashes, and markup that
 * neither runs nor loads anything.
 */
import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { join, posix, relative, resolve } from "node:path";
import { STACK_FRAME } from "../fixtures/cli.js";
import type { FuzzCase } from "./base.js";
import { codePointName, firstIn, TERMINAL_ACTIVE } from "./chars.js";
import { snapshot, type CaseFolders, type CaseRun, type Snapshot } from "./execute.js";
import { markupProblems } from "./html.js";

/** More terminal output than any message should take (the spec itself is capped at 4 MiB). */
const OUTPUT_FLOOD_BYTES = 1 << 20;
const LEFTOVER = /(\.tmp$|(^|\/)\.[^/]*\.keel-)/;

/** The output folder a command names (--out, or out/<id> from the spec), relative to the working folder. */
export function outputFolder(c: FuzzCase, work: string): string | null {
  const args = c.args ?? [];
  if (!["analyze", "build"].includes(args[0])) return null;
  const at = args.findIndex((a) => a === "--out" || a === "-o");
  if (at >= 0) return relative(work, resolve(work, args[at + 1] ?? ""));
  try {
    const id = (JSON.parse(readFileSync(join(work, args[1]), "utf8")) as { id?: unknown }).id;
    return typeof id === "string" ? join("out", id) : null;
  } catch {
    return null;
  }
}

function processProblems(c: FuzzCase, run: CaseRun): string[] {
  const problems: string[] = [];
  if (run.timedOut) problems.push("timed out (killed after 30 s)");
  else if (run.signal) problems.push(`killed by ${run.signal}`);
  else if (run.status !== 0 && run.status !== 2) problems.push(`exit ${run.status}`);
  if (
    !run.timedOut &&
    c.expect !== undefined &&
    run.status !== c.expect &&
    (run.status === 0 || run.status === 2)
  )
    problems.push(`expected exit ${c.expect}, got ${run.status}`);
  if (STACK_FRAME.test(run.stderr) || STACK_FRAME.test(run.stdout))
    problems.push("stack trace in the output");
  if (run.leftRunning) problems.push("left processes running after it exited");
  if (run.outputBytes > OUTPUT_FLOOD_BYTES) problems.push(`${run.outputBytes} bytes of terminal output`);
  const active = firstIn(run.stdout + run.stderr, TERMINAL_ACTIVE);
  if (active) problems.push(`raw ${codePointName(active)} in the terminal output`);
  return problems;
}

/** Files the case started with that the run changed or removed (keel never edits its input). */
function inputChanges(before: Snapshot, after: Snapshot): string[] {
  return [...before]
    .filter(([path, hash]) => after.get(path) !== hash)
    .map(([path]) => `${after.has(path) ? "changed" : "removed"} its input ${path}`);
}

/** A path inside the output folder, the folder itself, or a folder on the way to it (made for it). */
const under = (path: string, folder: string) =>
  folder === "" || path.startsWith(`${folder}/`) || (path.endsWith("/") && `${folder}/`.startsWith(path));

function manifestProblems(dir: string, files: string[]): string[] {
  let listed: Record<string, string>;
  try {
    listed = (
      JSON.parse(readFileSync(join(dir, "manifest.json"), "utf8")) as { files: Record<string, string> }
    ).files;
  } catch (error) {
    return [`no readable manifest.json (${String(error).split("\n")[0]})`];
  }
  const expected = [...Object.keys(listed), "manifest.json"].sort();
  const problems: string[] = [];
  for (const f of files) if (!expected.includes(f)) problems.push(`${f} is not in the manifest`);
  for (const f of expected)
    if (!files.includes(f)) problems.push(`the manifest lists ${f}, which is missing`);
  for (const [f, hash] of Object.entries(listed))
    if (
      files.includes(f) &&
      createHash("sha256")
        .update(readFileSync(join(dir, f)))
        .digest("hex") !== hash
    )
      problems.push(`${f} does not match its hash in the manifest`);
  return problems;
}

function markupOf(dir: string, files: string[]): string[] {
  return files
    .filter((f) => f.endsWith(".html") || f.endsWith(".svg"))
    .flatMap((f) => markupProblems(readFileSync(join(dir, f), "utf8"), f));
}

/** The folder after an exit 0: what the command writes, and nothing else. */
function writtenProblems(c: FuzzCase, folders: CaseFolders, created: string[]): string[] {
  const command = c.args?.[0];
  const folder = outputFolder(c, folders.work);
  if (folder === null) return created.map((p) => `${command} wrote ${p}`);
  const problems = created
    .filter((p) => !under(p, folder))
    .map((p) => `wrote ${p} outside its output folder`);
  const dir = join(folders.work, folder);
  if (!existsSync(dir) || !statSync(dir).isDirectory()) return [...problems, `no output folder ${folder}`];
  const files = [...snapshot(dir).keys()].filter((p) => !p.endsWith("/")).sort();
  if (command === "analyze") {
    const others = created
      .filter((p) => !p.endsWith("/") && under(p, folder))
      .map((p) => posix.relative(folder, p))
      .filter((f) => f !== "results.json");
    if (!files.includes("results.json")) problems.push("analyze wrote no results.json");
    if (others.length) problems.push(`analyze wrote ${others.slice(0, 3).join(", ")} beside results.json`);
    return problems;
  }
  return [...problems, ...manifestProblems(dir, files), ...markupOf(dir, files)];
}

/** Every way the case broke the contract, as short descriptions; empty when it held. */
export function checkCase(c: FuzzCase, run: CaseRun, folders: CaseFolders, before: Snapshot): string[] {
  const problems = processProblems(c, run);
  // a run we stopped may leave anything behind: the time limit is the finding
  if (run.timedOut) return problems;
  const after = snapshot(folders.work);
  const created = [...after.keys()].filter((p) => !before.has(p));
  problems.push(...inputChanges(before, after));
  problems.push(...created.filter((p) => LEFTOVER.test(p.replace(/\/$/, ""))).map((p) => `left ${p}`));
  const tmpLeft = readdirSync(folders.tmp);
  if (tmpLeft.length) problems.push(`left ${tmpLeft.slice(0, 3).join(", ")} in TMPDIR`);
  if (run.status === 0) problems.push(...writtenProblems(c, folders, created));
  else if (created.length)
    problems.push(
      `exit ${run.status ?? run.signal} but wrote ${created.slice(0, 3).join(", ")}${created.length > 3 ? " …" : ""}`,
    );
  return problems;
}

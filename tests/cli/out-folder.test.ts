/**
 * The output folder's lock, staging and swap (src/cli/out-folder.ts), called directly, and
 * `keel build` through the built CLI when a second build, a foreign folder or a killed run meets
 * the folder. Behaviour required by the reliability issues; the rules are common practice for
 * tools that replace a folder (lock file with the holder's pid, O_EXCL creation, rename swap).
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { prepareOutputFolder, declaredId } from "../../src/cli/out-folder.js";
import { CliExit, EXIT } from "../../src/cli/io.js";
import { makeWorkDir, removeWorkDirs, runKeel, STACK_FRAME } from "../fixtures/cli.js";

afterAll(removeWorkDirs);

const sleepers: ChildProcess[] = [];
afterEach(() => {
  for (const child of sleepers.splice(0)) child.kill("SIGKILL");
});

/** The pid of a running process that is not this one (a lock holder that is alive). */
function livePid(): number {
  const child = spawn("sleep", ["60"], { stdio: "ignore" });
  sleepers.push(child);
  return child.pid!;
}

/** A pid no process has: far above Linux's default pid_max (4194304 at most). */
const DEAD_PID = 9_999_999;

function files(entries: Record<string, string>): Map<string, string> {
  return new Map(Object.entries(entries));
}

function exitOf(work: () => unknown): CliExit | null {
  try {
    work();
    return null;
  } catch (err) {
    if (err instanceof CliExit) return err;
    throw err;
  }
}

/** An earlier build of spec `id` in `dir`: its spec.json, a listed file and the manifest. */
function earlierBuild(dir: string, id: string, extra: Record<string, string> = {}): void {
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, "spec.json"), JSON.stringify({ id }));
  writeFileSync(join(dir, "results.json"), "{}");
  const manifest = { files: { "spec.json": {}, "results.json": {} } };
  writeFileSync(join(dir, "manifest.json"), JSON.stringify(manifest));
  for (const [name, content] of Object.entries(extra)) writeFileSync(join(dir, name), content);
}

const siblings = (dir: string) => readdirSync(dirname(dir)).sort();

describe("prepareOutputFolder", () => {
  it("prepareOutputFolder(absent folder) writes the files and leaves no lock or staging folder", () => {
    const dir = join(makeWorkDir(), "out");
    const folder = prepareOutputFolder(dir, "demo", "replace");
    folder.commit(files({ "a.txt": "A", "figures/b.svg": "B" }));
    folder.release();
    expect(readFileSync(join(dir, "a.txt"), "utf8")).toBe("A");
    expect(readFileSync(join(dir, "figures/b.svg"), "utf8")).toBe("B");
    expect(siblings(dir)).toEqual(["out"]);
  });

  it("prepareOutputFolder(earlier build of the same id) swaps the folder whole: old files not rewritten are gone", () => {
    const dir = join(makeWorkDir(), "out");
    earlierBuild(dir, "demo");
    const folder = prepareOutputFolder(dir, "demo", "replace");
    folder.commit(files({ "spec.json": JSON.stringify({ id: "demo" }), "manifest.json": "{}" }));
    folder.release();
    expect(readdirSync(dir).sort()).toEqual(["manifest.json", "spec.json"]);
    expect(siblings(dir)).toEqual(["out"]);
  });

  it("prepareOutputFolder(earlier build of another id) refuses with exit 2 and leaves the folder untouched", () => {
    const dir = join(makeWorkDir(), "out");
    earlierBuild(dir, "other");
    const refusal = exitOf(() => prepareOutputFolder(dir, "demo", "replace"));
    expect(refusal?.code).toBe(EXIT.input);
    expect(refusal?.message).toMatch(/--force/);
    expect(readdirSync(dir).sort()).toEqual(["manifest.json", "results.json", "spec.json"]);
    expect(siblings(dir)).toEqual(["out"]);
  });

  it("prepareOutputFolder(same id, plus a file the user added) refuses: the swap would lose the user's file", () => {
    const dir = join(makeWorkDir(), "out");
    earlierBuild(dir, "demo", { "notes.txt": "mine" });
    expect(exitOf(() => prepareOutputFolder(dir, "demo", "replace"))?.code).toBe(EXIT.input);
  });

  it("prepareOutputFolder(foreign folder, force) writes beside the user's files and keeps them", () => {
    const dir = join(makeWorkDir(), "out");
    mkdirSync(dir);
    writeFileSync(join(dir, "notes.txt"), "mine");
    const folder = prepareOutputFolder(dir, "demo", "force");
    folder.commit(files({ "results.json": "{}" }));
    folder.release();
    expect(readdirSync(dir).sort()).toEqual(["notes.txt", "results.json"]);
  });

  it("prepareOutputFolder(folder locked by a running process) refuses with exit 2 naming the process", () => {
    const dir = join(makeWorkDir(), "out");
    const holder = livePid();
    writeFileSync(join(dirname(dir), ".out.keel-lock"), `${holder}\n`);
    const refusal = exitOf(() => prepareOutputFolder(dir, "demo", "replace"));
    expect(refusal?.code).toBe(EXIT.input);
    expect(refusal?.message).toContain(String(holder));
    expect(existsSync(dir)).toBe(false);
  });

  it("prepareOutputFolder(a second writer while the first holds the lock) refuses; after release it proceeds", () => {
    const dir = join(makeWorkDir(), "out");
    const first = prepareOutputFolder(dir, "demo", "replace");
    // the holder is this very process, so fake a live other holder by rewriting the pid
    writeFileSync(join(dirname(dir), ".out.keel-lock"), `${livePid()}\n`);
    expect(exitOf(() => prepareOutputFolder(dir, "demo", "replace"))?.code).toBe(EXIT.input);
    first.release();
    const second = prepareOutputFolder(dir, "demo", "replace");
    second.commit(files({ "a.txt": "A" }));
    second.release();
    expect(readdirSync(dir)).toEqual(["a.txt"]);
  });

  it("prepareOutputFolder(lock and staging left by a killed run) takes the lock over and removes the leftovers", () => {
    const dir = join(makeWorkDir(), "out");
    const parent = dirname(dir);
    writeFileSync(join(parent, ".out.keel-lock"), `${DEAD_PID}\n`);
    mkdirSync(join(parent, `.out.keel-new-${DEAD_PID}`));
    writeFileSync(join(parent, `.out.keel-new-${DEAD_PID}`, "results.json"), "");
    mkdirSync(join(parent, `.out.keel-old-${DEAD_PID}`));
    const folder = prepareOutputFolder(dir, "demo", "replace");
    folder.commit(files({ "a.txt": "A" }));
    folder.release();
    expect(siblings(dir)).toEqual(["out"]);
  });

  it("prepareOutputFolder(a file where the folder should be) refuses with exit 2", () => {
    const dir = join(makeWorkDir(), "out");
    writeFileSync(dir, "not a folder");
    expect(exitOf(() => prepareOutputFolder(dir, "demo", "replace"))?.code).toBe(EXIT.input);
  });

  it("declaredId reads the id of a spec text and gives null for none or for text that is not JSON", () => {
    expect(declaredId('{"id": "demo", "keel": 1}')).toBe("demo");
    expect(declaredId('{"keel": 1}')).toBeNull();
    expect(declaredId("{not json")).toBeNull();
  });
});

/** An invented test model: a stable node at the origin, decoupled linear decay. */
const DECAY_SPEC = {
  keel: 1,
  id: "two-decays",
  title: "Two independent decays (invented test model)",
  time: { unit: "day" },
  states: [
    { name: "u", label: "first amount", unit: "g", min: 0, max: 1 },
    { name: "w", label: "second amount", unit: "g", min: 0, max: 1 },
  ],
  parameters: [{ name: "k", value: 1, unit: "1/day", label: "decay rate", source: "invented for the test" }],
  equations: { u: "-k*u", w: "-2*k*w" },
  scenarios: [{ name: "start", initial: { u: 0.5, w: 0.5 }, horizon: 10 }],
  analysis: { basins: { resolution: 16, coarse: 8 } },
};

describe("keel build into a folder it does not own", () => {
  it("keel build --out (a folder of the user's files) exits 2 naming --force and writes nothing", () => {
    const cwd = makeWorkDir();
    const run = runKeel(["build", "spec.json", "--out", "out", "--no-pdf"], {
      cwd,
      files: { "spec.json": JSON.stringify(DECAY_SPEC), "out/notes.txt": "mine" },
    });
    expect(run.status, run.stderr).toBe(2);
    expect(run.stderr).toMatch(/--force/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(readdirSync(join(cwd, "out"))).toEqual(["notes.txt"]);
    expect(readdirSync(cwd).sort()).toEqual(["out", "spec.json"]);
  });

  it("keel build --force --out (a folder of the user's files) writes the build beside them", () => {
    const cwd = makeWorkDir();
    const run = runKeel(["build", "spec.json", "--out", "out", "--no-pdf", "--force"], {
      cwd,
      files: { "spec.json": JSON.stringify(DECAY_SPEC), "out/notes.txt": "mine" },
    });
    expect(run.status, run.stderr).toBe(0);
    const names = readdirSync(join(cwd, "out"));
    expect(names).toContain("notes.txt");
    expect(names).toContain("dossier.html");
    expect(names).toContain("manifest.json");
  });

  it("keel build twice into one folder replaces the first build and leaves no lock or staging folder", () => {
    const cwd = makeWorkDir();
    const spec = { "spec.json": JSON.stringify(DECAY_SPEC) };
    const first = runKeel(["build", "spec.json", "--out", "out", "--no-pdf"], { cwd, files: spec });
    expect(first.status, first.stderr).toBe(0);
    const second = runKeel(["build", "spec.json", "--out", "out", "--no-pdf"], { cwd });
    expect(second.status, second.stderr).toBe(0);
    expect(readdirSync(cwd).sort()).toEqual(["out", "spec.json"]);
  });
});

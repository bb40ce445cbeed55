/**
 * The CLI contract (README.md, "Usage") through the built CLI, run as a separate process
 * in a fresh working directory: version and help, usage errors, `check` and `analyze` on every
 * example spec, the default output folder, byte-identical reruns, and no stray files.
 */
import { readdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  listFiles,
  makeWorkDir,
  PROJECT_ROOT,
  removeWorkDirs,
  runKeel,
  STACK_FRAME,
  type CliResult,
} from "../fixtures/cli.js";

const packageJson = JSON.parse(readFileSync(join(PROJECT_ROOT, "package.json"), "utf8")) as {
  version: string;
};

/**
 * The only values `equilibria[].type` may take: the classes of the trace–determinant plane (Hirsch,
 * Smale and Devaney, Differential Equations, Dynamical Systems, and an Introduction to Chaos, 3rd
 * ed., section 4.1) and `non-hyperbolic` for a zero eigenvalue.
 */
const EQUILIBRIUM_TYPES = new Set([
  "saddle",
  "stable-node",
  "unstable-node",
  "stable-focus",
  "unstable-focus",
  "center",
  "stable-degenerate-node",
  "unstable-degenerate-node",
  "stable-star",
  "unstable-star",
  "non-hyperbolic",
]);

const SPECS_DIR = join(PROJECT_ROOT, "specs");
const exampleFiles = readdirSync(SPECS_DIR)
  .filter((f) => f.endsWith(".json"))
  .sort();

interface Example {
  file: string;
  path: string;
  text: string;
  spec: { id: string; title: string; states: { name: string }[] };
}
const examples: Example[] = exampleFiles.map((file) => {
  const path = join(SPECS_DIR, file);
  const text = readFileSync(path, "utf8");
  return { file, path, text, spec: JSON.parse(text) };
});

function expectUsageError(run: CliResult, message: RegExp): void {
  expect(run.status, run.stderr).toBe(2);
  expect(run.stderr).toMatch(message);
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stdout).toBe("");
}

afterAll(removeWorkDirs);

describe("keel --version and --help", () => {
  it("keel --version prints package.json's version and exits 0", () => {
    for (const flag of ["--version", "-V"]) {
      const run = runKeel([flag]);
      expect(run.status, run.stderr).toBe(0);
      expect(run.stdout).toBe(`${packageJson.version}\n`);
    }
  });

  it("keel --help lists the commands and exits 0", () => {
    const run = runKeel(["--help"]);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/^Usage: keel /);
    for (const command of ["check", "analyze", "schema"])
      expect(run.stdout).toMatch(new RegExp(`^  ${command}\\b`, "m"));
  });

  it("keel analyze --help documents --out and exits 0", () => {
    const run = runKeel(["analyze", "--help"]);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/--out <dir>/);
  });
});

describe("keel usage errors exit 2 with a message and no stack trace", () => {
  it("keel with no command prints the usage and exits 2", () => {
    const run = runKeel([]);
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/^Usage: keel /);
  });

  it("keel frobnicate (an unknown command) exits 2", () => {
    expectUsageError(runKeel(["frobnicate"]), /unknown command 'frobnicate'/);
  });

  it("keel --frobnicate (an unknown option) exits 2", () => {
    expectUsageError(runKeel(["--frobnicate"]), /unknown option '--frobnicate'/);
  });

  it("keel analyze SPEC --frobnicate (an unknown command option) exits 2 and writes nothing", () => {
    const run = runKeel(["analyze", "spec.json", "--frobnicate"], {
      files: { "spec.json": examples[0].text },
    });
    expectUsageError(run, /unknown option '--frobnicate'/);
    expect(listFiles(run.cwd)).toEqual(["spec.json"]);
  });

  it("keel check (no SPEC) exits 2", () => {
    expectUsageError(runKeel(["check"]), /missing required argument 'spec'/);
  });

  it("keel --time-limit -1 (or 'soon') analyze SPEC exits 2 naming the option", () => {
    for (const value of ["-1", "soon"])
      expectUsageError(
        runKeel(["--time-limit", value, "analyze", "spec.json"], {
          files: { "spec.json": examples[0].text },
        }),
        /--time-limit/,
      );
  });

  it("keel --time-limit 1 analyze SPEC stops at the limit with exit 5, names the stage, and writes nothing", () => {
    // the example's analysis takes several seconds, so a limit of one second is passed mid-run
    // (or, on a loaded machine, before the analysis thread has sent its first stage)
    const run = runKeel(["--time-limit", "1", "analyze", "spec.json", "--out", "out"], {
      files: { "spec.json": examples[0].text },
    });
    expect(run.status, run.stderr).toBe(5);
    expect(run.stderr).toMatch(
      /passed its time limit of 1 s (in the stage "[a-z ]+" \(\d+ of \d+ done\)|before its first stage); nothing was written/,
    );
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(listFiles(run.cwd)).toEqual(["spec.json"]);
  });

  it("keel --jobs 0 check SPEC exits 2", () => {
    expectUsageError(
      runKeel(["--jobs", "0", "check", "spec.json"], { files: { "spec.json": examples[0].text } }),
      /--jobs/,
    );
  });
});

describe("keel check and analyze on a spec file that cannot be read or written", () => {
  it("keel check missing.json and keel analyze missing.json exit 2 naming the file, and write nothing", () => {
    for (const args of [
      ["check", "missing.json"],
      ["analyze", "missing.json", "--out", "o"],
      ["analyze", "missing.json"],
    ]) {
      const run = runKeel(args);
      expectUsageError(run, /^error: cannot read missing\.json: no such file$/m);
      expect(listFiles(run.cwd)).toEqual([]);
    }
  });

  it("keel check FOLDER exits 2 saying it is a folder", () => {
    const run = runKeel(["check", "specs"], { files: { "specs/a.json": examples[0].text } });
    expectUsageError(run, /cannot read specs: it is a folder, not a file/);
  });

  it("keel analyze SPEC --out FILE (a file in the way) exits 2 naming the path, and leaves the file alone", () => {
    const run = runKeel(["analyze", "spec.json", "--out", "taken"], {
      files: { "spec.json": examples[0].text, taken: "mine" },
    });
    expectUsageError(
      run,
      /^error: cannot write taken[/\\]results\.json: a file stands where a folder is needed$/m,
    );
    expect(readFileSync(join(run.cwd, "taken"), "utf8")).toBe("mine");
    expect(listFiles(run.cwd)).toEqual(["spec.json", "taken"]);
    // refused before the analysis, also where the file is further up the path
    const deeper = runKeel(["build", "spec.json", "--no-pdf", "--out", "taken/sub"], { cwd: run.cwd });
    expectUsageError(
      deeper,
      /^error: cannot write taken[/\\]sub[/\\]results\.json: a file stands where a folder is needed$/m,
    );
    expect(listFiles(run.cwd)).toEqual(["spec.json", "taken"]);
  });
});

describe.each(examples)("keel check and analyze on specs/$file", (example) => {
  const id = example.spec.id;
  let dir: string;
  let checked: CliResult;
  let defaultRun: CliResult;
  let secondRun: CliResult;

  beforeAll(() => {
    dir = makeWorkDir();
    checked = runKeel(["check", example.path], { cwd: dir });
    // first run into the default folder, second into --out: one pair tests both and determinism
    defaultRun = runKeel(["analyze", example.path], { cwd: dir });
    secondRun = runKeel(["analyze", example.path, "--out", "second"], { cwd: dir });
  });

  it(`check(${example.file}) exits 0 and prints "spec OK"`, () => {
    expect(checked.status, checked.stderr).toBe(0);
    expect(checked.stdout.startsWith(`${id}: ${example.spec.title}\n`)).toBe(true);
    expect(checked.stdout.endsWith("spec OK\n")).toBe(true);
  });

  it(`analyze(${example.file}) exits 0 and writes out/${id}/results.json relative to the working directory`, () => {
    expect(defaultRun.status, defaultRun.stderr).toBe(0);
    expect(secondRun.status, secondRun.stderr).toBe(0);
    expect(defaultRun.stderr).toBe(`wrote ${join("out", id, "results.json")}\n`);
  });

  it(`analyze(${example.file}) leaves no temporary file behind and does not touch the spec`, () => {
    expect(listFiles(dir)).toEqual([`out/${id}/results.json`, "second/results.json"]);
    expect(readFileSync(example.path, "utf8")).toBe(example.text);
  });

  it(`analyze(${example.file}) twice gives byte-identical results.json`, () => {
    const first = readFileSync(join(dir, "out", id, "results.json"));
    const second = readFileSync(join(dir, "second", "results.json"));
    expect(first.length).toBeGreaterThan(0);
    expect(first.equals(second)).toBe(true);
  });

  it(`analyze(${example.file}) results.json is JSON with equilibria typed from the fixed vocabulary`, () => {
    const results = JSON.parse(readFileSync(join(dir, "out", id, "results.json"), "utf8"));
    expect(results.keel).toBe(packageJson.version);
    expect(results.spec.id).toBe(id);
    // the hash `check` prints is the one analyze records
    expect(checked.stdout).toContain(`spec sha256 ${results.spec.sha256}\n`);
    expect(results.equilibria.length).toBeGreaterThan(0);
    const stateNames = example.spec.states.map((s) => s.name).sort();
    for (const equilibrium of results.equilibria) {
      expect(EQUILIBRIUM_TYPES.has(equilibrium.type), `type ${equilibrium.type}`).toBe(true);
      expect(typeof equilibrium.hyperbolic).toBe("boolean");
      expect(Object.keys(equilibrium.point).sort()).toEqual(stateNames);
    }
  });
});

describe("keel options and input encodings", () => {
  it("keel --quiet analyze SPEC --out DIR prints nothing and writes DIR/results.json", () => {
    // an example made quick (small basin map, no studies): the output, not the analysis, is under test
    const quick: Record<string, unknown> = {
      ...examples[0].spec,
      analysis: { basins: { resolution: 64, coarse: 16 }, parameters: [] },
    };
    delete quick.$schema;
    const run = runKeel(["--quiet", "analyze", "spec.json", "--out", "o"], {
      files: { "spec.json": JSON.stringify(quick) },
    });
    expect(run.status, run.stderr).toBe(0);
    expect(run.stderr).toBe("");
    expect(run.stdout).toBe("");
    expect(listFiles(run.cwd)).toEqual(["o/results.json", "spec.json"]);
  });

  it("keel --profile --jobs 1 analyze MAP-SPEC prints each stage's and task's time, and the same results.json as --jobs 2 without it", () => {
    const map = readFileSync(
      join(PROJECT_ROOT, "tests/fixtures/specs/competition-map-a4409dc54a.json"),
      "utf8",
    );
    const dir = makeWorkDir();
    const profiled = runKeel(["--quiet", "--profile", "--jobs", "1", "analyze", "spec.json", "--out", "p"], {
      cwd: dir,
      files: { "spec.json": map },
    });
    expect(profiled.status, profiled.stderr).toBe(0);
    const seconds = (name: string) => {
      const m = new RegExp(`^  ${name} +(\\d+\\.\\d\\d) s`, "m").exec(profiled.stderr);
      expect(m, `no line for ${name} in\n${profiled.stderr}`).not.toBeNull();
      return Number(m![1]);
    };
    const stages = ["equilibria", "geometry", "cycles", "trajectories", "thresholds", "claims", "basins"];
    const staged = stages.map(seconds).reduce((a, b) => a + b, 0);
    // each stage is a share of the run, not more (rounding to 0.01 s each aside)
    expect(staged).toBeLessThanOrEqual(seconds("total") + 0.01 * stages.length);
    for (const task of ["study of a12", "study of a21", "map of a12 and a21"])
      expect(seconds(task)).toBeGreaterThan(0);
    const plain = runKeel(["--quiet", "--jobs", "2", "analyze", "spec.json", "--out", "q"], { cwd: dir });
    expect(plain.status, plain.stderr).toBe(0);
    expect(plain.stderr).toBe("");
    expect(readFileSync(join(dir, "q/results.json"), "utf8")).toBe(
      readFileSync(join(dir, "p/results.json"), "utf8"),
    );
  });

  it("keel check accepts a spec saved with a byte-order mark, with the same sha256", () => {
    // RFC 8259 section 8.1: a parser may ignore a leading byte-order mark; some editors write one
    const dir = makeWorkDir();
    writeFileSync(join(dir, "plain.json"), examples[0].text);
    writeFileSync(join(dir, "bom.json"), "\uFEFF" + examples[0].text);
    const plain = runKeel(["check", "plain.json"], { cwd: dir });
    const bom = runKeel(["check", "bom.json"], { cwd: dir });
    expect(bom.status, bom.stderr).toBe(0);
    const hash = (run: CliResult) => /^spec sha256 ([0-9a-f]{64})$/m.exec(run.stdout)?.[1];
    expect(hash(bom)).toBeDefined();
    expect(hash(bom)).toBe(hash(plain));
  });
});

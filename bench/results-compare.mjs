// Compares results.json of this checkout with those of an earlier commit, for specs/*.json and every
// fixture spec in tests/fixtures/specs/ (the specs the test suite compiles, captured once).
//
//   node bench/results-compare.mjs [--base REF] [--only SUBSTRING] [--fresh]
//
// --base   the commit to compare with (default: BASE below, the last commit before the
//          structural refactor of issue 14); it is checked out in a worktree under
//          scratch/compare/, given this checkout's node_modules, and built with tsc.
// --only   compare only the specs whose file name contains SUBSTRING.
// --fresh  analyse with the base again even when its results from an earlier run are all there
//          (they depend only on REF, so they are reused by default).
//
// Every leaf (number, string, boolean, null) of the two results is compared exactly, after the
// base's results are adapted to the new shape by the rules in ADAPT (fields that were renamed or
// moved without changing their meaning). Fields in ADDED are new and have no counterpart. Fields in MOVED are left out on both sides: they were
// removed from results.json on purpose (English and TeX now written by report/). Fields in
// ROUNDING may differ by rounding only (a numerical method swapped for an equivalent one); their
// largest relative difference is printed. Exit 0 when nothing else differs.
import { execFileSync, spawn } from "node:child_process";
import { existsSync, mkdirSync, readdirSync, readFileSync, symlinkSync, rmSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { wordsFromStructure } from "./adapt-words.mjs";
import { fatesAsRecords } from "./adapt-fates.mjs";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..");
const BASE = "d4ec7a0";

/** Removed from results.json on purpose; the dossier builds these in report/. */
const MOVED = [];

/** New in results.json, with no counterpart in the base: [path pattern, why]. */
const ADDED = [[/^format$/, "results format version (issue 14)"]];

/** May differ by rounding only: [path pattern, largest relative difference accepted, why]. */
const ROUNDING = [];

/** Old shape → new shape, applied to the base's results before comparing. */
const ADAPT = [wordsFromStructure, fatesAsRecords];

function parseArgs(argv) {
  const args = { base: BASE, only: null, fresh: false };
  for (let k = 0; k < argv.length; k++) {
    if (argv[k] === "--base") args.base = argv[++k];
    else if (argv[k] === "--only") args.only = argv[++k];
    else if (argv[k] === "--fresh") args.fresh = true;
    else if (argv[k] === "--reuse")
      continue; // the default now; kept so older command lines work
    else throw new Error(`unknown argument ${argv[k]}`);
  }
  return args;
}

function specFiles(only) {
  const fromDir = (dir) =>
    existsSync(dir)
      ? readdirSync(dir)
          .filter((f) => f.endsWith(".json"))
          .sort()
          .map((f) => join(dir, f))
      : [];
  const all = [...fromDir(join(ROOT, "specs")), ...fromDir(join(ROOT, "tests/fixtures/specs"))];
  return only ? all.filter((f) => basename(f).includes(only)) : all;
}

function prepareBase(ref, dir) {
  if (!existsSync(dir)) {
    mkdirSync(dirname(dir), { recursive: true });
    execFileSync("git", ["worktree", "add", "--detach", dir, ref], { cwd: ROOT, stdio: "ignore" });
  } else execFileSync("git", ["checkout", "--detach", "-q", ref], { cwd: dir });
  if (!existsSync(join(dir, "node_modules")))
    symlinkSync(join(ROOT, "node_modules"), join(dir, "node_modules"));
  execFileSync("npx", ["tsc", "-p", "tsconfig.json"], { cwd: dir, stdio: "inherit" });
}

function dump(tree, outDir, specs) {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [join(ROOT, "bench/results-dump.mjs"), tree, outDir, ...specs], {
      stdio: ["ignore", "inherit", "inherit"],
    });
    child.on("exit", (code) =>
      code === 0 ? done() : fail(new Error(`results-dump for ${tree} exited ${code}`)),
    );
  });
}

/** path → leaf value, with array indices in brackets: "equilibria[0].point.N". */
function flatten(value, path = "", out = new Map()) {
  if (Array.isArray(value)) value.forEach((v, k) => flatten(v, `${path}[${k}]`, out));
  else if (value && typeof value === "object")
    for (const [k, v] of Object.entries(value)) flatten(v, path ? `${path}.${k}` : k, out);
  else out.set(path, value);
  return out;
}

const matches = (rules, path) => rules.find((r) => r[0].test(path));

function compareOne(oldResults, newResults) {
  for (const adapt of ADAPT) adapt(oldResults, newResults);
  const a = flatten(oldResults);
  const b = flatten(newResults);
  const report = { compared: 0, differing: [], onlyOld: [], onlyNew: [], rounding: new Map(), moved: 0 };
  for (const [path, va] of a) {
    if (matches(MOVED, path)) {
      report.moved++;
      continue;
    }
    if (!b.has(path)) {
      report.onlyOld.push(path);
      continue;
    }
    const vb = b.get(path);
    report.compared++;
    if (Object.is(va, vb)) continue;
    const rule = typeof va === "number" && typeof vb === "number" ? matches(ROUNDING, path) : null;
    const rel = rule ? Math.abs(va - vb) / Math.max(Math.abs(va), Math.abs(vb)) : Infinity;
    if (rule && rel <= rule[1])
      report.rounding.set(rule[0].source, Math.max(rel, report.rounding.get(rule[0].source) ?? 0));
    else report.differing.push(`${path}: ${JSON.stringify(va)} → ${JSON.stringify(vb)}`);
  }
  for (const path of b.keys())
    if (!a.has(path) && !matches(MOVED, path) && !matches(ADDED, path)) report.onlyNew.push(path);
  return report;
}

async function main() {
  const args = parseArgs(process.argv.slice(2));
  const specs = specFiles(args.only);
  const work = join(ROOT, "scratch/compare");
  const baseTree = join(work, "base");
  const baseOut = join(work, `results-${args.base}`);
  // one folder per run, so two comparisons at once do not overwrite each other's results
  const newOut = join(work, `results-current-${process.pid}`);
  rmSync(newOut, { recursive: true, force: true });
  execFileSync("npx", ["tsc", "-p", "tsconfig.json"], { cwd: ROOT, stdio: "inherit" });
  const jobs = [dump(ROOT, newOut, specs)];
  const haveBase = (spec) => existsSync(join(baseOut, `${basename(spec, ".json")}.json`));
  if (args.fresh || !specs.every(haveBase)) {
    prepareBase(args.base, baseTree);
    jobs.push(dump(baseTree, baseOut, args.fresh ? specs : specs.filter((s) => !haveBase(s))));
  }
  await Promise.all(jobs);

  let failures = 0,
    leaves = 0,
    moved = 0;
  const rounding = new Map();
  for (const spec of specs) {
    const name = `${basename(spec, ".json")}.json`;
    const report = compareOne(
      JSON.parse(readFileSync(join(baseOut, name), "utf8")),
      JSON.parse(readFileSync(join(newOut, name), "utf8")),
    );
    leaves += report.compared;
    moved += report.moved;
    for (const [k, v] of report.rounding) rounding.set(k, Math.max(v, rounding.get(k) ?? 0));
    const problems = [
      ...report.differing.map((d) => `differs   ${d}`),
      ...report.onlyOld.map((p) => `only base ${p}`),
      ...report.onlyNew.map((p) => `only new  ${p}`),
    ];
    if (problems.length) {
      failures++;
      console.log(`\n${name}: ${problems.length} differences`);
      for (const line of problems.slice(0, 25)) console.log(`  ${line}`);
      if (problems.length > 25) console.log(`  … and ${problems.length - 25} more`);
    }
  }
  console.log(`\n${specs.length} specs, ${leaves} leaves compared exactly, ${moved} moved leaves left out`);
  for (const [k, v] of rounding)
    console.log(`rounding-only differences in /${k}/: largest relative ${v.toExponential(2)}`);
  console.log(failures ? `${failures} specs differ` : "results unchanged");
  rmSync(newOut, { recursive: true, force: true });
  process.exit(failures ? 1 : 0);
}

await main();

/** The fuzz run's counts per category and its failures, as scratch/fuzz-summary.json and a table. */
import type { Verdict } from "./judge.js";

export interface Failure {
  name: string;
  exit: number | string | null;
  seconds: number;
  firstStderrLine: string;
  problems: string[];
}

export interface CategorySummary {
  cases: number;
  passed: number;
  failed: number;
  maxSeconds: number;
  medianSeconds: number;
  /** How many cases ended with each exit code (or signal). */
  exits: Record<string, number>;
  failures: Failure[];
}

export interface FuzzSummary {
  seed: number;
  cli: string;
  seconds: number;
  cases: number;
  passed: number;
  failed: number;
  categories: Record<string, CategorySummary>;
}

const round = (x: number) => Math.round(x * 100) / 100;

function median(xs: number[]): number {
  const sorted = [...xs].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

export function summarise(
  verdicts: Verdict[],
  run: { seed: number; cli: string; seconds: number },
): FuzzSummary {
  const categories: Record<string, CategorySummary> = {};
  for (const v of verdicts) {
    const s = (categories[v.category] ??= {
      cases: 0,
      passed: 0,
      failed: 0,
      maxSeconds: 0,
      medianSeconds: 0,
      exits: {},
      failures: [],
    });
    s.cases++;
    const exit = String(v.signal ?? v.status);
    s.exits[exit] = (s.exits[exit] ?? 0) + 1;
    s.maxSeconds = Math.max(s.maxSeconds, round(v.seconds));
    if (!v.problems.length) s.passed++;
    else {
      s.failed++;
      s.failures.push({
        name: v.name,
        exit: v.signal ?? v.status,
        seconds: round(v.seconds),
        firstStderrLine: v.firstStderrLine,
        problems: v.problems,
      });
    }
  }
  for (const [name, c] of Object.entries(categories))
    c.medianSeconds = round(median(verdicts.filter((v) => v.category === name).map((v) => v.seconds)));
  const failed = verdicts.filter((v) => v.problems.length).length;
  return {
    ...run,
    seconds: round(run.seconds),
    cases: verdicts.length,
    passed: verdicts.length - failed,
    failed,
    categories,
  };
}

export function printSummary(s: FuzzSummary): void {
  const exits = (e: Record<string, number>) =>
    Object.entries(e)
      .sort()
      .map(([code, n]) => `${code}:${n}`)
      .join(" ");
  const rows = Object.entries(s.categories).map(([name, c]) => [
    name,
    c.cases,
    c.passed,
    c.failed,
    c.medianSeconds.toFixed(1),
    c.maxSeconds.toFixed(1),
    exits(c.exits),
  ]);
  const header = ["category", "cases", "passed", "failed", "median s", "max s", "exits"];
  const table = [header, ...rows, ["total", s.cases, s.passed, s.failed, "", "", ""]].map((r) =>
    r.map(String),
  );
  const widths = header.map((_, k) => Math.max(...table.map((r) => r[k].length)));
  for (const r of table)
    console.info(
      r.map((cell, k) => (k && k < 6 ? cell.padStart(widths[k]) : cell.padEnd(widths[k]))).join("  "),
    );
  for (const [name, c] of Object.entries(s.categories))
    for (const f of c.failures)
      console.info(
        `\n${name}: ${f.name}\n  exit ${f.exit}, ${f.seconds} s, stderr: ${f.firstStderrLine}\n  ${f.problems.join("\n  ")}`,
      );
  console.info(
    `\n${s.cases} cases in ${s.seconds.toFixed(0)} s; ${s.failed} failed. Summary: scratch/fuzz-summary.json`,
  );
}

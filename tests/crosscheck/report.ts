/** The crosscheck's printed summary: disagreements per quantity, then the commonest classes with example models. */
import type { ModelComparison, Quantity } from "./compare.js";

interface Printable {
  count: number;
  wallSeconds: number;
  totals: { quantity: Quantity; compared: number; disagreements: number }[];
}

export function printReport(report: Printable, models: ModelComparison[]): void {
  const w = (s: string | number, n: number) => String(s).padStart(n);
  const lines = [
    "",
    `crosscheck: ${report.count} models, ${(report.wallSeconds / 60).toFixed(1)} min`,
    `${"quantity".padEnd(32)}${w("compared", 10)}${w("disagree", 10)}`,
    ...report.totals.map((t) => `${t.quantity.padEnd(32)}${w(t.compared, 10)}${w(t.disagreements, 10)}`),
    "",
    "commonest classes (count, examples):",
  ];
  const classes = new Map<string, string[]>();
  for (const m of models)
    for (const d of m.disagreements) {
      const key = `${d.quantity}: ${d.class}`;
      classes.set(key, [...(classes.get(key) ?? []), d.model]);
    }
  const ranked = [...classes.entries()].sort((a, b) => b[1].length - a[1].length).slice(0, 20);
  for (const [key, ids] of ranked)
    lines.push(`${w(ids.length, 5)}  ${key}  (${[...new Set(ids)].slice(0, 4).join(", ")})`);
  const skipped = new Map<string, number>();
  for (const m of models)
    for (const [k, n] of Object.entries(m.skipped)) skipped.set(k, (skipped.get(k) ?? 0) + n);
  if (skipped.size) {
    lines.push("", "not compared (the reference could not decide):");
    for (const [k, n] of skipped) lines.push(`${w(n, 5)}  ${k}`);
  }
  process.stdout.write(lines.join("\n") + "\n");
}

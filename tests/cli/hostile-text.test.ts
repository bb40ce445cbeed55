/**
 * Free text that would act on a terminal or hide how a dossier reads (escape sequences,
 * bidirectional overrides: Unicode Technical Standard #39; the "Trojan Source" report,
 * CVE-2021-42574), names that would collide or overflow a file name (255 bytes on common file
 * systems, common practice), and floods of issues.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { listEntries, removeWorkDirs, runKeel } from "../fixtures/cli.js";
import { figureFileBases } from "../../src/cli/commands/build.js";
import { formatIssues, MAX_SHOWN_ISSUES } from "../../src/diagnostics/format.js";
import { showInvisible } from "../../src/diagnostics/visible.js";

const BASE_TEXT = readFileSync(join(import.meta.dirname, "../fixtures/bad/base-spec.json"), "utf8");

afterAll(removeWorkDirs);

describe("text that acts instead of showing", () => {
  it("showInvisible writes ESC, a right-to-left override and a zero-width space out, and keeps tab, newline and accents", () => {
    expect(showInvisible("a\u001b[31mb\u202Ec\u200Bd")).toBe("a⟨U+001B⟩[31mb⟨U+202E⟩c⟨U+200B⟩d");
    expect(showInvisible("tab\there\nnext é ü")).toBe("tab\there\nnext é ü");
    // line and paragraph separators (The Unicode Standard, §5.8, from memory): no break in HTML
    expect(showInvisible("a\u2028b\u2029c")).toBe("a⟨U+2028⟩b⟨U+2029⟩c");
  });

  it("check(a title with an escape sequence and an override) prints them visibly, never raw", () => {
    const spec = JSON.parse(BASE_TEXT) as { title: string };
    spec.title = "Stocks \u001b[2J\u202Eelif";
    const run = runKeel(["check", "spec.json"], { files: { "spec.json": JSON.stringify(spec) } });
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain("Stocks ⟨U+001B⟩[2J⟨U+202E⟩elif");
    expect(run.stdout + run.stderr).not.toContain("\u001b");
    expect(run.stdout + run.stderr).not.toContain("\u202e");
  });

  it("formatIssues(60 issues) prints MAX_SHOWN_ISSUES of them and counts the rest", () => {
    const issues = Array.from({ length: 60 }, (_, k) => ({ code: "x", path: ["states", k], message: "bad" }));
    const lines = formatIssues(issues, "spec.json").split("\n");
    expect(lines.filter((l) => l.startsWith("error "))).toHaveLength(MAX_SHOWN_ISSUES);
    expect(lines).toContain("… and 10 more errors not shown");
    expect(lines.at(-1)).toBe("60 errors in the spec; nothing was written.");
  });
});

describe("output names", () => {
  it("figureFileBases keeps a clean unique id, and gives ids that share a slug or pass the length cap distinct, short names", () => {
    const long = `timeseries-${"n".repeat(300)}`;
    const bases = figureFileBases(["portrait", "timeseries-low stock", "timeseries-low/stock", long]);
    expect(bases.get("portrait")).toBe("portrait");
    const [a, b] = [bases.get("timeseries-low stock")!, bases.get("timeseries-low/stock")!];
    expect(a).not.toBe(b);
    expect(a.startsWith("timeseries-low-stock-")).toBe(true);
    expect(bases.get(long)!.length).toBeLessThanOrEqual(80);
    expect(new Set(bases.values()).size).toBe(4);
  });

  it("analyze --out '' exits 2 and writes nothing in the current folder", () => {
    const run = runKeel(["analyze", "spec.json", "--out", ""], { files: { "spec.json": BASE_TEXT } });
    expect(run.status, run.stderr).toBe(2);
    expect(run.stderr).toMatch(/--out needs a folder name/);
    expect(listEntries(run.cwd)).toEqual(["spec.json"]);
  });
});

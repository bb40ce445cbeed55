/**
 * The seeded slice of the fuzz suite that `npm test` runs (the whole corpus is `npm run fuzz`): a
 * few cases of every category, spread through it, the same ones every run, each through the built
 * dist/cli/bin.js and held to the full run's contract (checks.ts): exit 0 or 2 within the case
 * limit, no stack trace, nothing half-written. One dossier of hostile labels is opened in Chromium
 * when Chromium is installed. First the checks are shown to catch what they exist to catch, so a
 * slice that passes says something.
 */
import { existsSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { specCase } from "./base.js";
import { browserProblems, CHROMIUM } from "./browser.js";
import { checkCase } from "./checks.js";
import { CASE_TIMEOUT_MS, prepareFolders, removeFolders, snapshot, type CaseRun } from "./execute.js";
import { CATEGORIES, generateCases, sliceCases } from "./generate.js";
import { markupProblems } from "./html.js";
import { judgeCase } from "./judge.js";

/** Cases per category: three, spread through each, keep the slice near half a minute on two cores. */
const PER_CATEGORY = 3;
/** Room beyond a case's own limit for writing its files, the checks and removing its folders. */
const HARNESS_MARGIN_MS = 15_000;
/** Room beyond that for Chromium to start, load the dossier and settle. */
const BROWSER_MARGIN_MS = 60_000;

const corpus = generateCases();
const slice = sliceCases(corpus, PER_CATEGORY);
const hasChromium = existsSync(CHROMIUM);

describe("the fuzz checks catch what they must", () => {
  // payloads from the OWASP XSS Filter Evasion Cheat Sheet, each of which runs or loads in a browser
  it.each([
    ["a script element", "<p><script>alert(1)</script></p>"],
    ["an event handler", "<img src=x onerror=alert(1)>"],
    ["a javascript: link behind entities", '<a href="jav&#x61;script:alert(1)">x</a>'],
    ["a CSS url( to another host", '<div style="background:url(https://fuzz.invalid/x.png)"></div>'],
    ["a raw right-to-left override", "<p>\u202etxt.exe</p>"],
  ])("markup with %s is flagged", (_, markup) => {
    expect(markupProblems(markup, "x.html")).not.toEqual([]);
  });

  it("escaped text, a link within the page and an inline data image are not flagged", () => {
    const markup =
      '<p>&lt;script&gt;alert(1)&lt;/script&gt;</p><a href="#s">x</a><image href="data:image/png;base64,AA=="/>';
    expect(markupProblems(markup, "x.html")).toEqual([]);
  });

  it("an exit 1, and an exit 2 that wrote a file, are each flagged", () => {
    const c = specCase("self-test", "self-test", "{}", "analyze");
    const folders = prepareFolders(c);
    try {
      const before = snapshot(folders.work);
      const run = (status: number): CaseRun => ({
        status,
        signal: null,
        timedOut: false,
        stdout: "",
        stderr: "",
        outputBytes: 0,
        seconds: 0,
        leftRunning: false,
      });
      expect(checkCase(c, run(1), folders, before)).toContain("exit 1");
      writeFileSync(join(folders.work, "half.json"), "{");
      expect(checkCase(c, run(2), folders, before).join("; ")).toMatch(/exit 2 but wrote half\.json/);
    } finally {
      removeFolders(folders);
    }
  });
});

describe(`the fuzz slice: ${PER_CATEGORY} cases of each category`, () => {
  it("covers every category", () => {
    expect(new Set(slice.map((c) => c.category))).toEqual(new Set(CATEGORIES));
  });

  for (const c of slice)
    it(
      c.name,
      async () => {
        const verdict = await judgeCase(c);
        expect(verdict.problems, `${c.name}: exit ${verdict.status ?? verdict.signal}`).toEqual([]);
      },
      CASE_TIMEOUT_MS + HARNESS_MARGIN_MS,
    );
});

describe.skipIf(!hasChromium)("the fuzz slice in Chromium", () => {
  const timeout = CASE_TIMEOUT_MS + HARNESS_MARGIN_MS + BROWSER_MARGIN_MS;

  it(
    "the browser check sees a page that runs a script",
    async () => {
      const folders = prepareFolders(specCase("self-test", "self-test", ""));
      try {
        const page = join(folders.work, "page.html");
        writeFileSync(page, "<!doctype html><p>x</p><script>alert(1)</script>");
        expect((await browserProblems(page)).join("; ")).toMatch(/dialog|script/);
      } finally {
        removeFolders(folders);
      }
    },
    timeout,
  );

  const built = corpus.find((c) => c.browser && !c.args?.includes("--pdf"));
  it(
    `${built?.name ?? "a hostile-label dossier"} stays inert`,
    async () => {
      expect(built, "the corpus has a hostile-label case for the browser").toBeDefined();
      const verdict = await judgeCase(built!);
      expect(verdict.status).toBe(0);
      expect(verdict.problems).toEqual([]);
    },
    timeout,
  );
});

/**
 * One case from start to verdict: fresh folders, the run, the checks, the browser for the cases
 * that ask for it, then the folders removed. Shared by `npm run fuzz` and the slice in `npm test`.
 */
import { existsSync } from "node:fs";
import { join } from "node:path";
import type { FuzzCase } from "./base.js";
import { browserProblems } from "./browser.js";
import { checkCase, outputFolder } from "./checks.js";
import { prepareFolders, removeFolders, runCase, snapshot } from "./execute.js";

export interface Verdict {
  category: string;
  name: string;
  status: number | null;
  signal: string | null;
  seconds: number;
  /** The first line of stderr that says something, for the report. */
  firstStderrLine: string;
  /** Empty when the case passed. */
  problems: string[];
}

export async function judgeCase(c: FuzzCase, cli?: string): Promise<Verdict> {
  const folders = prepareFolders(c);
  try {
    const before = snapshot(folders.work);
    const run = await runCase(c, folders, cli);
    const problems = checkCase(c, run, folders, before);
    const folder = outputFolder(c, folders.work);
    const html = folder === null ? null : join(folders.work, folder, "dossier.html");
    if (c.browser && run.status === 0 && html && existsSync(html)) {
      try {
        problems.push(...(await browserProblems(html)));
      } catch (error) {
        problems.push(`browser check could not run: ${String(error).split("\n")[0]}`);
      }
    }
    return {
      category: c.category,
      name: c.name,
      status: run.status,
      signal: run.signal,
      seconds: run.seconds,
      firstStderrLine:
        run.stderr
          .split("\n")
          .find((line) => line.trim() !== "")
          ?.slice(0, 200) ?? "",
      problems,
    };
  } finally {
    removeFolders(folders);
  }
}

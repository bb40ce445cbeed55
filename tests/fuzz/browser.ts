/**
 * Opens a built dossier in Chromium with scripts enabled and every request intercepted, and
 * reports what a reader's browser would do that it should not: a request leaving the file, a
 * dialog (the payloads call alert), a script element or an event handler in the live document.
 * The launch flags follow keel's own printing (src/report/render/pdf.ts).
 */
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import puppeteer from "puppeteer-core";

export const CHROMIUM = process.env.KEEL_CHROMIUM ?? "/usr/bin/chromium";
const ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
];
/** Loading a dossier of a few MB with inline SVG takes a second or two; ample room on a loaded runner. */
const LOAD_TIMEOUT_MS = 60_000;
/** Time for a timer or a late handler a payload might have set to fire (common practice). */
const SETTLE_MS = 500;

interface LiveDocument {
  scripts: number;
  handlers: string[];
  frames: number;
}

/** Problems seen with the page open, each a short description; empty when it stayed inert. */
export async function browserProblems(htmlPath: string): Promise<string[]> {
  const profile = await mkdtemp(join(tmpdir(), "keel-fuzz-chromium-"));
  const browser = await puppeteer.launch({
    executablePath: CHROMIUM,
    headless: true,
    ignoreDefaultArgs: true,
    args: [...ARGS, `--user-data-dir=${profile}`],
    pipe: true,
  });
  const problems: string[] = [];
  try {
    const page = await browser.newPage();
    const own = pathToFileURL(htmlPath).href;
    await page.setRequestInterception(true);
    page.on("request", (request) => {
      const url = request.url();
      if (url === own || url.startsWith("data:") || url === "about:blank") void request.continue();
      else {
        problems.push(`request to ${url.slice(0, 80)}`);
        void request.abort();
      }
    });
    page.on("dialog", (dialog) => {
      problems.push(`dialog: ${dialog.message().slice(0, 40)}`);
      void dialog.dismiss();
    });
    await page.goto(own, { waitUntil: "load", timeout: LOAD_TIMEOUT_MS });
    await new Promise((done) => setTimeout(done, SETTLE_MS));
    const live = await page.evaluate((): LiveDocument => {
      const all = [...document.querySelectorAll("*")];
      return {
        scripts: document.scripts.length,
        handlers: all.flatMap((el) =>
          [...el.attributes].filter((a) => a.name.startsWith("on")).map((a) => `${el.tagName}.${a.name}`),
        ),
        frames: document.querySelectorAll("iframe, frame, object, embed").length,
      };
    });
    if (live.scripts) problems.push(`${live.scripts} script elements in the live document`);
    if (live.handlers.length) problems.push(`event handlers ${live.handlers.slice(0, 3).join(", ")}`);
    if (live.frames) problems.push(`${live.frames} frames or embedded objects`);
    if (page.url() !== own) problems.push(`navigated to ${page.url().slice(0, 80)}`);
  } finally {
    await browser.close();
    await rm(profile, { recursive: true, force: true });
  }
  return [...new Set(problems)].map((p) => `browser: ${p}`);
}

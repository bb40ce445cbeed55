import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { PDFDocument } from "pdf-lib";
import puppeteer, { type Browser, type HTTPRequest, type Page } from "puppeteer-core";

export type PaperSize = "a4" | "letter";

export interface PdfRenderOptions {
  /** Chromium (or Chrome) executable, usually from findChromium(). */
  chromiumPath: string;
  /** Paper format: ISO 216 A4 (210 × 297 mm) or US letter (8.5 × 11 in). */
  paper: PaperSize;
  /** Running header, left side (plain text; escaped here). The CLI passes the model id. */
  headerLeft: string;
  /** Running header, right side (plain text; escaped here). The CLI passes the spec hash. */
  headerRight: string;
  /** Optional plain text on the left of the footer; "page N of M" is always on the right. */
  footerNote?: string;
  /** How long to wait for Chromium to start (default CHROMIUM_START_TIMEOUT_MS). */
  startTimeoutMs?: number;
}

export interface PdfRenderResult {
  pdf: Uint8Array;
  /** Every URL the page tried to reach, sorted and without repeats; each was refused. */
  blockedRequests: string[];
  pageCount: number;
}

/** Chromium could not start, or could not print; `cause` holds the original error. */
export class PdfRenderError extends Error {
  override name = "PdfRenderError";
}

const pdfMessages = {
  launchFailed: (path: string, reason: string) =>
    `could not start Chromium at ${path} (the browser KEEL_CHROMIUM names, else the first one found): ${reason}`,
  printFailed: (reason: string) => `Chromium could not print the dossier: ${reason}`,
  noAnswer: (ms: number) => `no answer within ${ms / 1000} s (the process was stopped)`,
};

/**
 * The whole command line (puppeteer's own defaults are switched off, so nothing else is added
 * except the debugging pipe). --no-sandbox: the sandbox needs user namespaces, which containers
 * and CI runners often lack; the page is our own file with every request refused.
 */
const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
];
/**
 * A cold start takes about a second; 30 s allows for a loaded CI runner (common practice) and
 * bounds the wait on a browser that never answers. KEEL_CHROMIUM_TIMEOUT (seconds) overrides it.
 */
export const CHROMIUM_START_TIMEOUT_MS = 30_000;
/** Loading and printing a dossier with many inline SVG figures; generous for slow runners. */
const PRINT_TIMEOUT_MS = 120_000;
/** A browser that does not close when asked is killed after this long. */
const CLOSE_TIMEOUT_MS = 5_000;
/** Room for the running header and footer, which Chromium draws inside the page margins. */
const MARGINS = { top: "18mm", bottom: "18mm", left: "16mm", right: "16mm" };

/**
 * Prints `html` to PDF with a fresh, throw-away Chromium profile and no network: every request
 * other than data: and about:blank is refused and listed in `blockedRequests`, and the page is
 * put offline so that WebSockets and WebRTC, which request interception does not see, fail too.
 */
export async function renderPdf(html: string, options: PdfRenderOptions): Promise<PdfRenderResult> {
  const profile = await mkdtemp(join(tmpdir(), "keel-chromium-"));
  // puppeteer kills the browser process when this aborts; that rejects every pending protocol
  // call at once, so neither a browser that never answers nor a hung print can outlast a timer
  const killSwitch = new AbortController();
  try {
    const startTimeout = options.startTimeoutMs ?? CHROMIUM_START_TIMEOUT_MS;
    const browser = await withWatchdog(
      launchChromium(options.chromiumPath, profile, startTimeout, killSwitch.signal),
      startTimeout,
      killSwitch,
    ).catch((error: unknown) => {
      const reason = killSwitch.signal.aborted ? pdfMessages.noAnswer(startTimeout) : reasonOf(error);
      throw new PdfRenderError(pdfMessages.launchFailed(options.chromiumPath, reason), { cause: error });
    });
    try {
      return await withWatchdog(printPage(browser, html, options), PRINT_TIMEOUT_MS, killSwitch);
    } catch (error) {
      const reason = killSwitch.signal.aborted ? pdfMessages.noAnswer(PRINT_TIMEOUT_MS) : reasonOf(error);
      throw new PdfRenderError(pdfMessages.printFailed(reason), { cause: error });
    } finally {
      await withWatchdog(browser.close(), CLOSE_TIMEOUT_MS, killSwitch).catch(() => {});
    }
  } finally {
    killSwitch.abort();
    await rm(profile, { recursive: true, force: true, maxRetries: 3 });
  }
}

/** `work`, or a rejection after `ms` with the browser killed. */
async function withWatchdog<T>(work: Promise<T>, ms: number, killSwitch: AbortController): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const expired = new Promise<never>((_, reject) => {
    timer = setTimeout(() => {
      killSwitch.abort();
      reject(new Error(`no answer in ${ms} ms`));
    }, ms);
  });
  try {
    return await Promise.race([work, expired]);
  } finally {
    clearTimeout(timer);
  }
}

async function launchChromium(
  chromiumPath: string,
  profile: string,
  timeout: number,
  signal: AbortSignal,
): Promise<Browser> {
  return await puppeteer.launch({
    executablePath: chromiumPath,
    headless: true,
    ignoreDefaultArgs: true,
    args: [...CHROMIUM_ARGS, `--user-data-dir=${profile}`],
    pipe: true, // no debugging port on the loopback interface
    timeout,
    protocolTimeout: PRINT_TIMEOUT_MS,
    signal,
  });
}

async function printPage(
  browser: Browser,
  html: string,
  options: PdfRenderOptions,
): Promise<PdfRenderResult> {
  const page = await browser.newPage();
  // a dialog (alert, confirm) would stall printing until a protocol timeout
  page.on("dialog", (dialog) => {
    void dialog.dismiss();
  });
  const blocked = new Set<string>();
  await refuseNetwork(page, blocked);
  await page.setContent(html, { waitUntil: "load", timeout: PRINT_TIMEOUT_MS });
  await page.emulateMediaType("print");
  // Chromium names the PDF after document.title, or "about:blank" when there is none.
  if ((await page.title()).trim() === "") {
    await page.evaluate((title) => (document.title = title), options.headerLeft);
  }
  const pdf = await page.pdf({
    format: options.paper,
    margin: MARGINS,
    printBackground: true,
    displayHeaderFooter: true,
    headerTemplate: headerTemplate(options.headerLeft, options.headerRight),
    footerTemplate: footerTemplate(options.footerNote ?? ""),
    outline: true,
    tagged: true,
    timeout: PRINT_TIMEOUT_MS,
  });
  const pageCount = (await PDFDocument.load(pdf, { updateMetadata: false })).getPageCount();
  return { pdf, blockedRequests: [...blocked].sort(), pageCount };
}

async function refuseNetwork(page: Page, blocked: Set<string>): Promise<void> {
  await page.setOfflineMode(true);
  const cdp = await page.createCDPSession();
  await cdp.send("Network.enable");
  cdp.on("Network.webSocketCreated", (event) => blocked.add(event.url));
  await page.setRequestInterception(true);
  page.on("request", (request: HTTPRequest) => {
    const url = request.url();
    if (!isInline(url)) blocked.add(url);
    const settle = isInline(url) ? request.continue() : request.abort("blockedbyclient");
    settle.catch(() => {}); // the page may already be closing; nothing is left to refuse then
  });
}

const isInline = (url: string) => url.startsWith("data:") || url === "about:blank";

/** Small grey running header: model id on the left, spec hash on the right. */
function headerTemplate(left: string, right: string): string {
  return band(
    "top",
    `<span style="overflow:hidden;text-overflow:ellipsis;white-space:nowrap">${escapeHtml(left)}</span>` +
      `<span style="flex:none;padding-left:2em">${escapeHtml(right)}</span>`,
  );
}

function footerTemplate(note: string): string {
  return band(
    "bottom",
    `<span>${escapeHtml(note)}</span>` +
      `<span style="flex:none;padding-left:2em">page <span class="pageNumber"></span> of <span class="totalPages"></span></span>`,
  );
}

/**
 * Header and footer are separate documents without the dossier's CSS: each needs its own font
 * size (Chromium's default there is tiny) and the page's side margins as padding to line up.
 * Chromium sets them about 6 mm from the paper's edge, inside some printers' unprintable strip
 * (common practice: keep 5 mm clear); the inset moves them to about 9 mm.
 */
const EDGE_INSET = "3mm";

function band(edge: "top" | "bottom", content: string): string {
  return (
    `<div style="width:100%;box-sizing:border-box;padding:0 ${MARGINS.right} 0 ${MARGINS.left};` +
    `padding-${edge}:${EDGE_INSET};` +
    `display:flex;justify-content:space-between;font:7.5pt/1.2 'DejaVu Sans',Arial,sans-serif;color:#555;` +
    `-webkit-print-color-adjust:exact;print-color-adjust:exact">${content}</div>`
  );
}

const HTML_ESCAPES: Record<string, string> = {
  "&": "&amp;",
  "<": "&lt;",
  ">": "&gt;",
  '"': "&quot;",
  "'": "&#39;",
};

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]);
}

function reasonOf(error: unknown): string {
  const message = error instanceof Error ? error.message : String(error);
  return message.split("\n")[0].trim() || "unknown error";
}

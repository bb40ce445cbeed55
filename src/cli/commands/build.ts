import { createHash } from "node:crypto";
import { join } from "node:path";
import { createRequire } from "node:module";
import { analyzeSupervised } from "../supervisor.js";
import { serializeResults } from "../../report/archive/serialize.js";
import { buildDossier, type Dossier } from "../../report/dossier.js";
import type { Results } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { findChromium } from "../../report/render/chromium.js";
import { PdfRenderError, renderPdf } from "../../report/render/pdf.js";
import { toStandaloneSvg } from "../../report/render/svg.js";
import { embedArchive, manifestText, sha256, type Manifest } from "../../report/archive/manifest.js";
import { existsSync, readFileSync } from "node:fs";
import { dirname } from "node:path";
import { fileURLToPath } from "node:url";
import {
  checkOutputFolder,
  CliExit,
  EXIT,
  inputError,
  makeProgress,
  readSpecFile,
  type CommonOptions,
} from "../io.js";
import { declaredId, withOutputFolder } from "../out-folder.js";

export interface BuildOptions extends CommonOptions {
  out?: string;
  paper: "a4" | "letter";
  /** true: PDF required; false: skipped; undefined: written when Chromium is available. */
  pdf?: boolean;
  /** Write into an --out folder that holds other files (keel's own are replaced one by one). */
  force?: boolean;
}

/** What a build wrote, and whether the PDF that was wanted is missing because Chromium failed. */
export interface BuildOutcome {
  written: string[];
  /** Why Chromium could not print, when it was found but failed (the rest is written). */
  pdfFailure: string | null;
}

const REPORTED_LIBRARIES = [
  "mathjs",
  "ml-matrix",
  "odex",
  "d3-contour",
  "zod",
  "vega",
  "vega-lite",
  "katex",
  "handlebars",
  "puppeteer-core",
];

function libraryVersions(): Record<string, string> {
  const require = createRequire(import.meta.url);
  const out: Record<string, string> = {};
  for (const name of REPORTED_LIBRARIES) {
    // packages with an exports map hide package.json from require: walk up from their entry
    out[name] = "unknown";
    try {
      let dir = dirname(require.resolve(name));
      for (let up = 0; up < 6; up++, dir = dirname(dir)) {
        const file = join(dir, "package.json");
        if (!existsSync(file)) continue;
        const pkg = JSON.parse(readFileSync(file, "utf8")) as { name?: string; version?: string };
        if (pkg.name === name && pkg.version) {
          out[name] = pkg.version;
          break;
        }
      }
    } catch {
      // stays "unknown"
    }
  }
  return out;
}

/** SHA-256 of the lockfile keel was installed from (the package root's package-lock.json), when there is one. */
function lockfileHash(): string | null {
  const path = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "..", "package-lock.json");
  return existsSync(path) ? sha256(readFileSync(path)) : null;
}

/** The build date: SOURCE_DATE_EPOCH when set (reproducible builds), else now. */
export function buildEpoch(env: NodeJS.ProcessEnv): { epoch: number; reproducible: boolean } {
  const raw = env.SOURCE_DATE_EPOCH;
  if (raw !== undefined && raw !== "") {
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 0)
      throw new CliExit(
        EXIT.input,
        `error: SOURCE_DATE_EPOCH must be a whole number of seconds, got '${raw}'`,
      );
    return { epoch: n, reproducible: true };
  }
  return { epoch: Math.floor(Date.now() / 1000), reproducible: false };
}

type OutputFiles = Map<string, string | Uint8Array>;

/** Characters of a figure's file name before its suffix: far inside every file system's 255 bytes. */
const FIGURE_NAME_MAX = 80;

/**
 * A file name per figure id, safe and distinct: ids hold scenario names, which are free text, so
 * each becomes a slug (other characters as "-"), cut to FIGURE_NAME_MAX; a slug that was cut or
 * that two ids share gets a short hash of its id, so no figure overwrites another.
 */
export function figureFileBases(ids: string[]): Map<string, string> {
  const safe = (id: string) => id.replace(/[^A-Za-z0-9_-]+/g, "-");
  const slug = (id: string) => safe(id).slice(0, FIGURE_NAME_MAX);
  const uses = new Map<string, number>();
  for (const id of ids) uses.set(slug(id), (uses.get(slug(id)) ?? 0) + 1);
  return new Map(
    ids.map((id) => {
      const s = slug(id);
      const exact = safe(id).length <= FIGURE_NAME_MAX && uses.get(s) === 1;
      const hash = createHash("sha256").update(id).digest("hex").slice(0, 8);
      return [id, exact ? s : `${s.slice(0, FIGURE_NAME_MAX - 9)}-${hash}`];
    }),
  );
}

/** Every output file but the PDF and the manifest, in memory. */
function dossierFiles(specText: string, results: Results, dossier: Dossier): OutputFiles {
  const files: OutputFiles = new Map();
  files.set("spec.json", specText);
  files.set("results.json", serializeResults(results));
  const bases = figureFileBases(dossier.figures.map((f) => f.id));
  for (const f of dossier.figures) {
    const base = bases.get(f.id)!;
    files.set(`figures/${base}.svg`, toStandaloneSvg(f.svg) + "\n");
    files.set(
      `figures/${base}.vl.json`,
      JSON.stringify({ $schema: "https://vega.github.io/schema/vega-lite/v6.json", ...f.vegaLite }, null, 2) +
        "\n",
    );
  }
  files.set("dossier.html", dossier.html);
  return files;
}

function buildManifest(
  spec: NormalizedSpec,
  results: Results,
  files: OutputFiles,
  paper: string,
  pdf: boolean,
): Manifest {
  return {
    keel: results.keel,
    node: process.version,
    lockfileSha256: lockfileHash(),
    spec: { file: "spec.json", sha256Canonical: spec.sha256 },
    // --jobs is left out on purpose: results do not depend on it
    options: { paper, pdf },
    seeds: { claimSampler: 1 },
    files: Object.fromEntries([...files].map(([name, content]) => [name, sha256(content)])),
  };
}

/** Prints the dossier and embeds the archive in the PDF; adds dossier.pdf to files and manifest. */
async function addPdf(
  chromium: string,
  spec: NormalizedSpec,
  specText: string,
  files: OutputFiles,
  manifest: Manifest,
  context: { paper: BuildOptions["paper"]; epoch: number; notes: string[] },
): Promise<void> {
  const printed = await renderPdf(files.get("dossier.html") as string, {
    chromiumPath: chromium,
    paper: context.paper,
    headerLeft: spec.id,
    headerRight: `spec ${spec.sha256.slice(0, 16)}…`,
    startTimeoutMs: chromiumStartTimeout(process.env),
  });
  if (printed.blockedRequests.length)
    context.notes.push(
      `blocked ${printed.blockedRequests.length} network request(s) while printing: ${printed.blockedRequests.join(", ")}`,
    );
  // the PDF carries the spec, the results and the manifest (which cannot list the PDF's own hash)
  const embedded = {
    "spec.json": specText,
    "results.json": files.get("results.json") as string,
    "manifest.json": manifestText(manifest),
  };
  const pdf = await embedArchive(printed.pdf, embedded, context.epoch, `${spec.title} — stability dossier`);
  files.set("dossier.pdf", pdf);
  manifest.files["dossier.pdf"] = sha256(pdf);
}

/** KEEL_CHROMIUM_TIMEOUT, in seconds, when set to a positive number (a slow machine's browser). */
function chromiumStartTimeout(env: NodeJS.ProcessEnv): number | undefined {
  const seconds = Number(env.KEEL_CHROMIUM_TIMEOUT);
  return env.KEEL_CHROMIUM_TIMEOUT && Number.isFinite(seconds) && seconds > 0 ? seconds * 1000 : undefined;
}

function chromiumFor(options: BuildOptions): string | null {
  const chromium = options.pdf === false ? null : findChromium(process.env);
  if (options.pdf === true && !chromium) {
    throw new CliExit(
      EXIT.input,
      "error: --pdf was given but no Chromium was found; install it (apt-get install chromium) or set KEEL_CHROMIUM to its path",
    );
  }
  return chromium;
}

/** `keel build SPEC`: results.json, figures, dossier.html and (when possible) dossier.pdf. */
export async function runBuild(file: string, options: BuildOptions): Promise<BuildOutcome> {
  const { epoch, reproducible } = buildEpoch(process.env);
  const progress = makeProgress(options.quiet, options.clock);
  const chromium = chromiumFor(options);
  const started = performance.now();
  const specText = readSpecFile(file);
  checkOutputFolder(options.out ?? "out");
  const id = declaredId(specText);
  const dir = options.out ?? join("out", id ?? "");
  return withOutputFolder(dir, id, options.force ? "force" : "replace", async (folder) => {
    const output = await analyzeSupervised(specText, options, progress);
    if (!output.ok) throw inputError(output.issues, file);
    const { spec, results } = output.value;
    const runSeconds = reproducible ? null : (performance.now() - started) / 1000;
    progress?.("render", 0, 1);
    const dossier = await buildDossier(spec, results, {
      paper: options.paper,
      dateEpoch: epoch,
      runSeconds,
      nodeVersion: process.version,
      libraries: libraryVersions(),
    });
    const files = dossierFiles(specText, results, dossier);
    const manifest = buildManifest(spec, results, files, options.paper, Boolean(chromium));
    const notes: string[] = [];
    let pdfFailure: string | null = null;
    if (chromium) {
      progress?.("render", 1, 1);
      progress?.("pdf", 0, 1);
      try {
        await addPdf(chromium, spec, specText, files, manifest, { paper: options.paper, epoch, notes });
      } catch (err) {
        // Chromium's trouble is the machine's, not the model's: everything else is still written
        if (!(err instanceof PdfRenderError)) throw err;
        pdfFailure = err.message;
        manifest.options.pdf = false;
      }
    } else if (options.pdf !== false) {
      notes.push(
        "no Chromium found, so no PDF was written; install it with `apt-get install chromium` (or set KEEL_CHROMIUM)",
      );
    }
    files.set("manifest.json", manifestText(manifest));
    progress?.(chromium ? "pdf" : "render", 1, 1);
    options.clock?.enter("write files");
    // everything is computed; only now does anything reach the disk, and all of it at once
    const written = folder.commit(files);
    for (const n of notes) if (!options.quiet) process.stderr.write(`note: ${n}\n`);
    return { written, pdfFailure };
  });
}

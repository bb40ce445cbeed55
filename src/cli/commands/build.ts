import { join } from "node:path";
import { createRequire } from "node:module";
import { runAnalysis } from "./run.js";
import { serializeResults } from "../../analysis/serialize.js";
import { buildDossier } from "../../report/dossier.js";
import { findChromium } from "../../report/render/chromium.js";
import { renderPdf } from "../../report/render/pdf.js";
import { toStandaloneSvg } from "../../report/render/svg.js";
import { CliExit, EXIT, inputError, makeProgress, readSpecFile, writeFileAtomic } from "../io.js";

export interface BuildOptions {
  out?: string;
  quiet: boolean;
  paper: "a4" | "letter";
  /** true: PDF required; false: skipped; undefined: written when Chromium is available. */
  pdf?: boolean;
  jobs?: number;
}

const REPORTED_LIBRARIES = ["mathjs", "ml-matrix", "odex", "d3-contour", "zod", "vega", "vega-lite", "katex", "handlebars", "puppeteer-core"];

function libraryVersions(): Record<string, string> {
  const require = createRequire(import.meta.url);
  const out: Record<string, string> = {};
  for (const name of REPORTED_LIBRARIES) {
    try {
      out[name] = (require(`${name}/package.json`) as { version: string }).version;
    } catch {
      out[name] = "unknown";
    }
  }
  return out;
}

/** The build date: SOURCE_DATE_EPOCH when set (reproducible builds), else now. */
export function buildEpoch(env: NodeJS.ProcessEnv): { epoch: number; reproducible: boolean } {
  const raw = env.SOURCE_DATE_EPOCH;
  if (raw !== undefined && raw !== "") {
    const n = Number(raw);
    if (!Number.isInteger(n) || n < 0) throw new CliExit(EXIT.input, `error: SOURCE_DATE_EPOCH must be a whole number of seconds, got '${raw}'`);
    return { epoch: n, reproducible: true };
  }
  return { epoch: Math.floor(Date.now() / 1000), reproducible: false };
}

/** `keel build SPEC`: results.json, figures, dossier.html and (when possible) dossier.pdf. */
export async function runBuild(file: string, options: BuildOptions): Promise<string[]> {
  const { epoch, reproducible } = buildEpoch(process.env);
  const progress = makeProgress(options.quiet);
  const chromium = options.pdf === false ? null : findChromium(process.env);
  if (options.pdf === true && !chromium) {
    throw new CliExit(EXIT.input, "error: --pdf was given but no Chromium was found; install it (apt-get install chromium) or set KEEL_CHROMIUM to its path");
  }
  const started = performance.now();
  const output = await runAnalysis(readSpecFile(file), options.jobs, progress);
  if (!output.ok) throw inputError(output.issues, file);
  const { spec, results } = output.value;
  const runSeconds = reproducible ? null : (performance.now() - started) / 1000;
  progress?.("dossier", 0, chromium ? 2 : 1);
  const dossier = await buildDossier(spec, results, {
    paper: options.paper,
    dateEpoch: epoch,
    runSeconds,
    nodeVersion: process.version,
    libraries: libraryVersions(),
  });
  let pdf: Uint8Array | null = null;
  const notes: string[] = [];
  if (chromium) {
    progress?.("dossier", 1, 2);
    const printed = await renderPdf(dossier.html, { chromiumPath: chromium, paper: options.paper, headerLeft: spec.id, headerRight: `spec ${spec.sha256.slice(0, 16)}…` });
    pdf = printed.pdf;
    if (printed.blockedRequests.length) notes.push(`blocked ${printed.blockedRequests.length} network request(s) while printing: ${printed.blockedRequests.join(", ")}`);
  } else if (options.pdf !== false) {
    notes.push("no Chromium found, so no PDF was written; install it with `apt-get install chromium` (or set KEEL_CHROMIUM)");
  }
  progress?.("dossier", 2, 2);

  // everything is computed; only now does anything reach the disk
  const dir = options.out ?? join("out", spec.id);
  const written: string[] = [];
  const write = (name: string, content: string | Uint8Array) => {
    const path = join(dir, name);
    writeFileAtomic(path, content);
    written.push(path);
  };
  write("results.json", serializeResults(results));
  for (const f of dossier.figures) {
    // file names from ids, made safe: scenario names are free text
    const base = f.id.replace(/[^A-Za-z0-9_-]+/g, "-");
    write(join("figures", `${base}.svg`), toStandaloneSvg(f.svg) + "\n");
    write(join("figures", `${base}.vl.json`), JSON.stringify({ $schema: "https://vega.github.io/schema/vega-lite/v6.json", ...f.vegaLite }, null, 2) + "\n");
  }
  write("dossier.html", dossier.html);
  if (pdf) write("dossier.pdf", pdf);
  for (const n of notes) if (!options.quiet) process.stderr.write(`note: ${n}\n`);
  return written;
}

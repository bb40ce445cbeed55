import { existsSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import {
  EMBEDDED_FILES,
  manifestText,
  readEmbedded,
  sha256,
  type Manifest,
} from "../../report/archive/manifest.js";
import { compareResults, VERIFY_ABS_TOL, VERIFY_REL_TOL } from "../../report/archive/compare.js";
import { serializeResults } from "../../report/archive/serialize.js";
import { hashSpec } from "../../spec/hash.js";
import { CliExit, EXIT, makeProgress, type CommonOptions } from "../io.js";
import { analyzeSupervised } from "../supervisor.js";
import { confinedPath, manifestFiles } from "../archive-paths.js";

export interface VerifyReport {
  ok: boolean;
  lines: string[];
}

/** What the checks found so far: passes as lines, failures as problems. */
interface Findings {
  lines: string[];
  problems: string[];
}

/** The archived spec and results text, when the archive holds them. */
interface ArchivedRun {
  specText: string | null;
  resultsText: string | null;
}

/** Differences listed one by one; the rest are counted. */
const SHOWN_DIFFERENCES = 30;

const decoder = new TextDecoder("utf-8", { fatal: false });

function parseJson(text: string, what: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return new Error(`${what} is not valid JSON`);
  }
}

const readIfPresent = (path: string) => (existsSync(path) ? readFileSync(path, "utf8") : null);

/** `keel verify DIR|PDF`: every hash, every embedded copy, then a re-run compared with the archived results. */
export async function runVerify(target: string, options: CommonOptions): Promise<VerifyReport> {
  if (!existsSync(target)) throw new CliExit(EXIT.input, `error: ${target} does not exist`);
  const found: Findings = { lines: [], problems: [] };
  const archived = statSync(target).isDirectory()
    ? await checkFolder(target, found)
    : await checkPdf(target, found);
  if (archived.specText !== null && archived.resultsText !== null)
    await checkRerun(archived.specText, archived.resultsText, options, found);
  else found.problems.push("the archive lacks spec.json or results.json, so the analysis cannot be re-run");
  const { lines, problems } = found;
  const summary = problems.length ? `verify: ${problems.length} problem(s)` : "verify: all checks hold";
  return { ok: problems.length === 0, lines: [...lines, ...problems.map((p) => `FAIL ${p}`), summary] };
}

/** A folder written by keel build: the manifest, every file it hashes, then the PDF's embedded copies. */
async function checkFolder(target: string, found: Findings): Promise<ArchivedRun> {
  const { lines, problems } = found;
  const manifestPath = join(target, "manifest.json");
  if (!existsSync(manifestPath))
    throw new CliExit(
      EXIT.input,
      `error: ${target} holds no manifest.json; is it a folder written by keel build?`,
    );
  const manifestOnDisk = readFileSync(manifestPath, "utf8");
  const parsed = parseJson(manifestOnDisk, "manifest.json");
  // a manifest altered into invalid JSON is a tampered archive (exit 3), not bad usage
  if (parsed instanceof Error) problems.push(`tampered: manifest.json (${parsed.message})`);
  const manifest = (parsed instanceof Error ? { files: {} } : parsed) as Manifest;
  const listed = manifestFiles(parsed instanceof Error ? {} : manifest.files);
  if (typeof listed === "string") problems.push(`tampered: manifest.json (${listed})`);
  const files = typeof listed === "string" ? {} : listed;
  // the manifest cannot hash itself; keel writes it in one canonical form, so any other bytes were changed
  if (!(parsed instanceof Error) && typeof listed !== "string" && manifestOnDisk !== manifestText(manifest))
    problems.push("tampered: manifest.json (its bytes differ from the form keel writes)");
  for (const [name, expected] of Object.entries(files)) {
    const place = confinedPath(target, name);
    if ("refused" in place) {
      problems.push(`refused: manifest entry '${name}' (${place.refused})`);
      continue;
    }
    const path = place.path;
    if (!existsSync(path)) {
      problems.push(`missing: ${name}`);
      continue;
    }
    const actual = sha256(readFileSync(path));
    if (actual !== expected)
      problems.push(
        `tampered: ${name} (SHA-256 ${actual.slice(0, 16)}…, manifest says ${expected.slice(0, 16)}…)`,
      );
    else lines.push(`ok: ${name}`);
  }
  const archived = {
    specText: readIfPresent(join(target, "spec.json")),
    resultsText: readIfPresent(join(target, "results.json")),
  };
  const pdfPath = join(target, "dossier.pdf");
  if (existsSync(pdfPath) && files["dossier.pdf"])
    await checkEmbeddedCopies(target, pdfPath, manifest, found);
  return archived;
}

/** Each file embedded in the folder's dossier.pdf against its copy in the folder. */
async function checkEmbeddedCopies(
  target: string,
  pdfPath: string,
  manifest: Manifest,
  found: Findings,
): Promise<void> {
  const { lines, problems } = found;
  const files = manifest.files ?? {};
  const embedded = await readEmbeddedSafe(pdfPath, problems);
  for (const name of EMBEDDED_FILES) {
    const copy = embedded[name];
    if (!copy) {
      problems.push(`missing inside dossier.pdf: ${name}`);
      continue;
    }
    const onDisk = join(target, name);
    if (name === "manifest.json") {
      // the embedded manifest is the one on disk without the PDF's own hash
      const outer = { ...manifest, files: { ...files } };
      delete outer.files["dossier.pdf"];
      if (decoder.decode(copy) !== manifestText(outer))
        problems.push("tampered: manifest.json inside dossier.pdf (differs from manifest.json)");
      else lines.push("ok: manifest.json inside dossier.pdf");
    } else if (!existsSync(onDisk) || sha256(copy) !== sha256(readFileSync(onDisk))) {
      problems.push(`tampered: ${name} inside dossier.pdf (differs from ${name})`);
    } else lines.push(`ok: ${name} inside dossier.pdf`);
  }
}

/**
 * PDF files begin with "%PDF-" (ISO 32000-1:2008, §7.5.2) and end with "%%EOF" (§7.5.5), which
 * writers may follow with a line end or a little padding; 1024 bytes is the slack readers
 * commonly allow (common practice).
 */
const PDF_HEADER = "%PDF-";
const EOF_MARKER = "%%EOF";
const EOF_SLACK_BYTES = 1024;

const startsWithPdfHeader = (bytes: Uint8Array) =>
  Buffer.from(bytes.subarray(0, PDF_HEADER.length)).toString("latin1") === PDF_HEADER;
const endsWithEofMarker = (bytes: Uint8Array) =>
  Buffer.from(bytes.subarray(Math.max(0, bytes.length - EOF_SLACK_BYTES)))
    .toString("latin1")
    .includes(EOF_MARKER);

/** A dossier.pdf alone: its embedded manifest, and the spec and results it hashes. */
async function checkPdf(pdfPath: string, found: Findings): Promise<ArchivedRun> {
  const { lines, problems } = found;
  // a file that never was a PDF is a usage error; a PDF damaged after keel wrote it is a finding
  if (!startsWithPdfHeader(readFileSync(pdfPath)))
    throw new CliExit(EXIT.input, `error: ${pdfPath} is not a PDF (it does not begin with %PDF-)`);
  const embedded = await readEmbeddedSafe(pdfPath, problems);
  const manifestBytes = embedded["manifest.json"];
  if (!manifestBytes && problems.length > 0) return { specText: null, resultsText: null };
  if (!manifestBytes)
    throw new CliExit(EXIT.input, `error: ${pdfPath} carries no keel archive (no embedded manifest.json)`);
  const manifest = parseJson(decoder.decode(manifestBytes), "the embedded manifest.json");
  const listed = manifestFiles(manifest instanceof Error ? {} : (manifest as Manifest).files);
  if (manifest instanceof Error) problems.push("tampered: manifest.json inside the PDF (not valid JSON)");
  else if (typeof listed === "string") problems.push(`tampered: manifest.json inside the PDF (${listed})`);
  else if (decoder.decode(manifestBytes) !== manifestText(manifest as Manifest))
    problems.push("tampered: manifest.json inside the PDF (its bytes differ from the form keel writes)");
  const files = typeof listed === "string" ? {} : listed;
  for (const name of ["spec.json", "results.json"]) {
    const copy = embedded[name];
    if (!copy) {
      problems.push(`missing inside the PDF: ${name}`);
      continue;
    }
    if (files[name] !== sha256(copy))
      problems.push(`tampered: ${name} inside the PDF (SHA-256 differs from the embedded manifest)`);
    else lines.push(`ok: ${name} inside the PDF`);
  }
  const decoded = (name: string) => (embedded[name] ? decoder.decode(embedded[name]) : null);
  return { specText: decoded("spec.json"), resultsText: decoded("results.json") };
}

/** Re-runs the analysis from the archived spec and compares it with the archived results. */
async function checkRerun(
  specText: string,
  resultsText: string,
  options: CommonOptions,
  found: Findings,
): Promise<void> {
  const { lines, problems } = found;
  const archived = parseJson(resultsText, "results.json");
  const output = await analyzeSupervised(specText, options, makeProgress(options.quiet, options.clock));
  if (!output.ok) {
    problems.push("the archived spec no longer validates: " + output.issues.map((i) => i.message).join("; "));
    return;
  }
  if (archived instanceof Error) {
    problems.push("tampered: results.json is not valid JSON");
    return;
  }
  const specJson = parseJson(specText, "spec.json");
  const archivedHash = (archived as { spec?: { sha256?: string } }).spec?.sha256;
  if (!(specJson instanceof Error))
    lines.push(`spec SHA-256 checked: ${hashSpec(specJson)} (compare it with the dossier's cover)`);
  if (!(specJson instanceof Error) && archivedHash !== hashSpec(specJson))
    problems.push("mismatch: the results were not computed from this spec (spec hash differs)");
  const now = JSON.parse(serializeResults(output.value.results));
  const differences = compareResults(archived, now);
  for (const d of differences.slice(0, SHOWN_DIFFERENCES))
    problems.push(
      `${d.kind === "drift" ? "drifted" : "changed"}: ${d.path}: archived ${d.archived}, now ${d.now}`,
    );
  if (differences.length > SHOWN_DIFFERENCES)
    problems.push(`… and ${differences.length - SHOWN_DIFFERENCES} more differences`);
  if (differences.length === 0)
    lines.push(
      `ok: re-run matches the archived results (numbers within ${VERIFY_REL_TOL} relative + ${VERIFY_ABS_TOL}; counts and labels exact)`,
    );
}

async function readEmbeddedSafe(path: string, problems: string[]): Promise<Record<string, Uint8Array>> {
  const bytes = readFileSync(path);
  if (!startsWithPdfHeader(bytes)) {
    problems.push(`tampered: ${path} is not a PDF (no %PDF- header)`);
    return {};
  }
  if (!endsWithEofMarker(bytes)) problems.push(`tampered: ${path} is truncated (no %%EOF marker at its end)`);
  try {
    return await readEmbedded(bytes);
  } catch (err) {
    problems.push(`tampered: ${path} cannot be read as a PDF (${(err as Error).message})`);
    return {};
  }
}

import { existsSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { EMBEDDED, manifestText, readEmbedded, sha256, type Manifest } from "../../report/archive/manifest.js";
import { compareResults, VERIFY_ABS_TOL, VERIFY_REL_TOL } from "../../report/archive/compare.js";
import { serializeResults } from "../../report/archive/serialize.js";
import { hashSpec } from "../../spec/hash.js";
import { CliExit, EXIT, makeProgress } from "../io.js";
import { runAnalysis } from "./run.js";

export interface VerifyReport {
  ok: boolean;
  lines: string[];
}

const decoder = new TextDecoder("utf-8", { fatal: false });

function parseJson(text: string, what: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return new Error(`${what} is not valid JSON`);
  }
}

/** `keel verify DIR|PDF`: every hash, every embedded copy, then a re-run compared with the archived results. */
export async function runVerify(target: string, options: { quiet: boolean; jobs?: number }): Promise<VerifyReport> {
  if (!existsSync(target)) throw new CliExit(EXIT.input, `error: ${target} does not exist`);
  const lines: string[] = [];
  const problems: string[] = [];
  const isDir = statSync(target).isDirectory();
  const pdfPath = isDir ? join(target, "dossier.pdf") : target;
  let specText: string | null = null;
  let resultsText: string | null = null;

  if (isDir) {
    const manifestPath = join(target, "manifest.json");
    if (!existsSync(manifestPath)) throw new CliExit(EXIT.input, `error: ${target} holds no manifest.json; is it a folder written by keel build?`);
    const manifestOnDisk = readFileSync(manifestPath, "utf8");
    const parsed = parseJson(manifestOnDisk, "manifest.json");
    // a manifest altered into invalid JSON is a tampered archive (exit 3), not bad usage
    if (parsed instanceof Error) problems.push(`tampered: manifest.json (${parsed.message})`);
    const manifest = (parsed instanceof Error ? { files: {} } : parsed) as Manifest;
    // the manifest cannot hash itself; keel writes it in one canonical form, so any other bytes were changed
    if (!(parsed instanceof Error) && manifestOnDisk !== manifestText(manifest)) problems.push("tampered: manifest.json (its bytes differ from the form keel writes)");
    const files = manifest.files ?? {};
    for (const [name, expected] of Object.entries(files)) {
      const path = join(target, name);
      if (!existsSync(path)) { problems.push(`missing: ${name}`); continue; }
      const actual = sha256(readFileSync(path));
      if (actual !== expected) problems.push(`tampered: ${name} (SHA-256 ${actual.slice(0, 16)}…, manifest says ${expected.slice(0, 16)}…)`);
      else lines.push(`ok: ${name}`);
    }
    specText = existsSync(join(target, "spec.json")) ? readFileSync(join(target, "spec.json"), "utf8") : null;
    resultsText = existsSync(join(target, "results.json")) ? readFileSync(join(target, "results.json"), "utf8") : null;
    if (existsSync(pdfPath) && files["dossier.pdf"]) {
      const embedded = await readEmbeddedSafe(pdfPath, problems);
      for (const name of EMBEDDED) {
        const copy = embedded[name];
        if (!copy) { problems.push(`missing inside dossier.pdf: ${name}`); continue; }
        const onDisk = join(target, name);
        if (name === "manifest.json") {
          // the embedded manifest is the one on disk without the PDF's own hash
          const outer = { ...manifest, files: { ...files } };
          delete outer.files["dossier.pdf"];
          if (decoder.decode(copy) !== manifestText(outer)) problems.push("tampered: manifest.json inside dossier.pdf (differs from manifest.json)");
          else lines.push("ok: manifest.json inside dossier.pdf");
        } else if (!existsSync(onDisk) || sha256(copy) !== sha256(readFileSync(onDisk))) {
          problems.push(`tampered: ${name} inside dossier.pdf (differs from ${name})`);
        } else lines.push(`ok: ${name} inside dossier.pdf`);
      }
    }
  } else {
    const embedded = await readEmbeddedSafe(pdfPath, problems);
    const manifestBytes = embedded["manifest.json"];
    if (!manifestBytes) throw new CliExit(EXIT.input, `error: ${target} carries no keel archive (no embedded manifest.json)`);
    const manifest = parseJson(decoder.decode(manifestBytes), "the embedded manifest.json");
    if (manifest instanceof Error) problems.push("tampered: manifest.json inside the PDF (not valid JSON)");
    else if (decoder.decode(manifestBytes) !== manifestText(manifest as Manifest)) problems.push("tampered: manifest.json inside the PDF (its bytes differ from the form keel writes)");
    const files = manifest instanceof Error ? {} : (manifest as Manifest).files ?? {};
    for (const name of ["spec.json", "results.json"]) {
      const copy = embedded[name];
      if (!copy) { problems.push(`missing inside the PDF: ${name}`); continue; }
      if (files[name] !== sha256(copy)) problems.push(`tampered: ${name} inside the PDF (SHA-256 differs from the embedded manifest)`);
      else lines.push(`ok: ${name} inside the PDF`);
    }
    specText = embedded["spec.json"] ? decoder.decode(embedded["spec.json"]) : null;
    resultsText = embedded["results.json"] ? decoder.decode(embedded["results.json"]) : null;
  }

  // re-run from the archived spec and compare
  if (specText !== null && resultsText !== null) {
    const archived = parseJson(resultsText, "results.json");
    const output = await runAnalysis(specText, options.jobs, makeProgress(options.quiet));
    if (!output.ok) problems.push("the archived spec no longer validates: " + output.issues.map((i) => i.message).join("; "));
    else if (!(archived instanceof Error)) {
      const specJson = parseJson(specText, "spec.json");
      if (!(specJson instanceof Error) && (archived as { spec?: { sha256?: string } }).spec?.sha256 !== hashSpec(specJson)) problems.push("mismatch: the results were not computed from this spec (spec hash differs)");
      const now = JSON.parse(serializeResults(output.value.results));
      const differences = compareResults(archived, now);
      for (const d of differences.slice(0, 30)) problems.push(`${d.kind === "drift" ? "drifted" : "changed"}: ${d.path}: archived ${d.archived}, now ${d.now}`);
      if (differences.length > 30) problems.push(`… and ${differences.length - 30} more differences`);
      if (differences.length === 0) lines.push(`ok: re-run matches the archived results (numbers within ${VERIFY_REL_TOL} relative + ${VERIFY_ABS_TOL}; counts and labels exact)`);
    } else problems.push("tampered: results.json is not valid JSON");
  } else problems.push("the archive lacks spec.json or results.json, so the analysis cannot be re-run");

  return { ok: problems.length === 0, lines: [...lines, ...problems.map((p) => `FAIL ${p}`), problems.length ? `verify: ${problems.length} problem(s)` : "verify: all checks hold"] };
}

async function readEmbeddedSafe(path: string, problems: string[]): Promise<Record<string, Uint8Array>> {
  try {
    return await readEmbedded(readFileSync(path));
  } catch (err) {
    problems.push(`tampered: ${path} cannot be read as a PDF (${(err as Error).message})`);
    return {};
  }
}

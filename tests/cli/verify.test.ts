/**
 * `keel verify DIR|PDF` through the built CLI: a fresh build verifies; a one-byte change to any
 * archived file, or to a file embedded in the PDF, is caught and named; a forged results.json
 * whose hashes were all fixed is caught by the re-run, number by number; and builds with
 * SOURCE_DATE_EPOCH set are byte-identical across --jobs values.
 */
import { cpSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { createHash } from "node:crypto";
import { join } from "node:path";
import { PDFArray, PDFDict, PDFDocument, PDFHexString, PDFName, PDFRawStream, PDFString } from "pdf-lib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findChromium } from "../../src/report/render/chromium.js";
import { manifestText, type Manifest } from "../../src/report/archive/manifest.js";
import {
  listFiles,
  makeWorkDir,
  PROJECT_ROOT,
  removeWorkDirs,
  runKeel,
  type CliResult,
} from "../fixtures/cli.js";
import { EXAMPLE_IDS, exampleSpec, SMALL_BASINS, withBasins } from "../fixtures/examples.js";

const chromium = findChromium(process.env);
if (!chromium)
  console.warn(
    "skipping the PDF archive tests: no Chromium found (set KEEL_CHROMIUM or apt-get install chromium)",
  );

/** Fixed build date for reproducible builds (any whole number of seconds; this is 2023-11-14). */
const EPOCH = "1700000000";
/** The example archived in these tests, and the parameters its claims are about. */
const MAIN_EXAMPLE = "reservoir-competition.json";
const MAIN_STUDIED = ["a12"];

/**
 * An example spec with a small basin map, so each build and re-run is quick; `studied` narrows
 * the threshold search (the slowest pass left) to the parameters the spec's claims name.
 */
function fastSpec(file: string, studied?: string[]): string {
  const spec = withBasins(exampleSpec(file.replace(/\.json$/, "")), SMALL_BASINS);
  delete spec.$schema; // the relative path means nothing in a temporary folder
  if (studied) spec.analysis.parameters = studied;
  return JSON.stringify(spec, null, 2) + "\n";
}

const sha256 = (bytes: string | Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/** The byte in the middle of the file, changed (its lowest bit flipped). */
function changeOneByte(bytes: Uint8Array, at = Math.floor(bytes.length / 2)): Uint8Array {
  const out = Uint8Array.from(bytes);
  out[at] ^= 0x01;
  return out;
}

function changeFileByte(path: string): void {
  writeFileSync(path, changeOneByte(readFileSync(path)));
}

function decodeName(value: unknown): string | null {
  return value instanceof PDFString || value instanceof PDFHexString ? value.decodeText() : null;
}

/**
 * Rewrites the PDF with some embedded files replaced, as someone editing the archive with
 * pdf-lib would: each named attachment's file stream is swapped for a new one; the rest of the
 * document is left as it is.
 */
async function replaceEmbedded(
  pdf: Uint8Array,
  replacements: Record<string, Uint8Array>,
): Promise<Uint8Array> {
  const doc = await PDFDocument.load(pdf, { updateMetadata: false });
  const names = doc.catalog
    .lookup(PDFName.of("Names"), PDFDict)
    .lookup(PDFName.of("EmbeddedFiles"), PDFDict)
    .lookup(PDFName.of("Names"), PDFArray);
  const replaced = new Set<string>();
  for (let k = 0; k + 1 < names.size(); k += 2) {
    const name = decodeName(names.lookup(k));
    if (name === null || !(name in replacements)) continue;
    const ef = names.lookup(k + 1, PDFDict).lookup(PDFName.of("EF"), PDFDict);
    const old = ef.lookup(PDFName.of("F"));
    if (!(old instanceof PDFRawStream)) throw new Error(`the attachment ${name} has no file stream`);
    const bytes = replacements[name];
    const stream = doc.context.flateStream(bytes, {
      Type: "EmbeddedFile",
      Subtype: old.dict.get(PDFName.of("Subtype")),
      Params: { Size: bytes.length },
    });
    ef.set(PDFName.of("F"), doc.context.register(stream));
    replaced.add(name);
  }
  const missing = Object.keys(replacements).filter((n) => !replaced.has(n));
  if (missing.length) throw new Error(`no attachment named ${missing.join(", ")} in the PDF`);
  return doc.save({ useObjectStreams: false });
}

/** The embedded files of a PDF, read back with pdf-lib's own name-tree walk (not keel's reader). */
async function embeddedNames(pdf: Uint8Array): Promise<string[]> {
  const doc = await PDFDocument.load(pdf, { updateMetadata: false });
  const names = doc.catalog
    .lookup(PDFName.of("Names"), PDFDict)
    .lookup(PDFName.of("EmbeddedFiles"), PDFDict)
    .lookup(PDFName.of("Names"), PDFArray);
  const out: string[] = [];
  for (let k = 0; k < names.size(); k += 2) out.push(decodeName(names.lookup(k)) ?? "?");
  return out.sort();
}

/**
 * A forgery no hash can catch: results.json replaced by `edit` of it, re-serialised the way keel
 * writes it, and every hash and copy that mentions it (manifest.json, the PDF's attachments, the
 * manifest's entry for the PDF) made consistent again. Only the re-run can tell.
 */
async function forgeResults(dir: string, edit: (results: Record<string, unknown>) => void): Promise<void> {
  const results = JSON.parse(readFileSync(join(dir, "results.json"), "utf8"));
  edit(results);
  const text = JSON.stringify(results, null, 2) + "\n";
  writeFileSync(join(dir, "results.json"), text);
  const manifest = JSON.parse(readFileSync(join(dir, "manifest.json"), "utf8")) as Manifest;
  manifest.files["results.json"] = sha256(text);
  const inner = { ...manifest, files: { ...manifest.files } };
  delete inner.files["dossier.pdf"];
  const encoder = new TextEncoder();
  const pdf = await replaceEmbedded(readFileSync(join(dir, "dossier.pdf")), {
    "results.json": encoder.encode(text),
    "manifest.json": encoder.encode(manifestText(inner)),
  });
  writeFileSync(join(dir, "dossier.pdf"), pdf);
  manifest.files["dossier.pdf"] = sha256(pdf);
  writeFileSync(join(dir, "manifest.json"), manifestText(manifest));
}

function verify(target: string): CliResult {
  return runKeel(["--quiet", "--jobs", "1", "verify", target]);
}

function expectFailsNaming(run: CliResult, line: RegExp): void {
  expect(run.status, run.stdout + run.stderr).toBe(3);
  expect(run.stdout).toMatch(line);
  expect(run.stdout).toMatch(/^verify: \d+ problem\(s\)$/m);
}

const failLines = (run: CliResult) => run.stdout.split("\n").filter((l) => l.startsWith("FAIL "));

describe.skipIf(!chromium)("keel verify on a build with its PDF", () => {
  let work: string;
  /** Built with --jobs 1; the archive every case below copies. */
  let built: string;
  /** The same spec built with --jobs 2. */
  let builtTwoJobs: string;
  let savedEpoch: string | undefined;
  let copies = 0;

  /** A fresh copy of the build, for one tampering case. */
  function copyOfBuild(): string {
    const dir = join(work, `copy-${++copies}`);
    cpSync(built, dir, { recursive: true });
    return dir;
  }

  beforeAll(() => {
    // runKeel passes this process's environment on to the CLI
    savedEpoch = process.env.SOURCE_DATE_EPOCH;
    process.env.SOURCE_DATE_EPOCH = EPOCH;
    work = makeWorkDir();
    writeFileSync(join(work, "spec.json"), fastSpec(MAIN_EXAMPLE, MAIN_STUDIED));
    built = join(work, "jobs-1");
    builtTwoJobs = join(work, "jobs-2");
    for (const [jobs, out] of [
      ["1", built],
      ["2", builtTwoJobs],
    ]) {
      const run = runKeel(["--quiet", "--jobs", jobs, "build", "spec.json", "--pdf", "--out", out], {
        cwd: work,
      });
      if (run.status !== 0)
        throw new Error(`keel build --jobs ${jobs} failed (exit ${run.status}):\n${run.stderr}`);
    }
  });

  afterAll(() => {
    if (savedEpoch === undefined) delete process.env.SOURCE_DATE_EPOCH;
    else process.env.SOURCE_DATE_EPOCH = savedEpoch;
    removeWorkDirs();
  });

  it("keel build writes manifest.json hashing every other file, and a PDF carrying spec, results and manifest", async () => {
    const manifest = JSON.parse(readFileSync(join(built, "manifest.json"), "utf8")) as Manifest;
    const onDisk = listFiles(built).filter((f) => f !== "manifest.json");
    expect(Object.keys(manifest.files).sort()).toEqual(onDisk);
    for (const f of onDisk) expect(manifest.files[f], f).toBe(sha256(readFileSync(join(built, f))));
    expect(manifest.node).toBe(process.version);
    expect(manifest.lockfileSha256).toBe(sha256(readFileSync(join(PROJECT_ROOT, "package-lock.json"))));
    expect(await embeddedNames(readFileSync(join(built, "dossier.pdf")))).toEqual([
      "manifest.json",
      "results.json",
      "spec.json",
    ]);
  });

  it("keel verify DIR exits 0 on a fresh build", () => {
    const run = verify(built);
    expect(run.status, run.stdout + run.stderr).toBe(0);
    expect(failLines(run)).toEqual([]);
    expect(run.stdout).toMatch(/^ok: re-run matches the archived results/m);
    expect(run.stdout).toMatch(/^verify: all checks hold$/m);
  });

  it("keel verify DIR/dossier.pdf exits 0 on a fresh build", () => {
    const run = verify(join(built, "dossier.pdf"));
    expect(run.status, run.stdout + run.stderr).toBe(0);
    expect(run.stdout).toMatch(/^ok: results\.json inside the PDF$/m);
    expect(run.stdout).toMatch(/^verify: all checks hold$/m);
  });

  it.each([
    "spec.json",
    "results.json",
    "dossier.html",
    "manifest.json",
    "figures/portrait.svg",
    "dossier.pdf",
  ])("keel verify DIR exits 3 and names %s after a one-byte change to it", (file) => {
    const dir = copyOfBuild();
    changeFileByte(join(dir, file));
    const escaped = file.replace(/[./]/g, "\\$&");
    expectFailsNaming(verify(dir), new RegExp(`^FAIL tampered: ${escaped}\\b`, "m"));
  });

  it.each([
    ["cut in half", 0.5],
    ["without its last 40 bytes", -40],
  ] as const)(
    "keel verify PDF exits 3 on a dossier.pdf %s, naming it damaged, with no parser noise",
    (_label, cut) => {
      const pdf = readFileSync(join(built, "dossier.pdf"));
      const end = cut > 0 ? Math.floor(pdf.length * cut) : pdf.length + cut;
      const path = join(copyOfBuild(), "truncated.pdf");
      writeFileSync(path, pdf.subarray(0, end));
      const run = verify(path);
      expectFailsNaming(run, /^FAIL tampered: .*truncated\.pdf (is truncated|cannot be read as a PDF)/m);
      expect(run.stderr).toBe("");
    },
  );

  it("keel verify PDF exits 2 on a file that is not a PDF at all (no %PDF- header)", () => {
    const path = join(copyOfBuild(), "notes.pdf");
    writeFileSync(path, "just some words\n");
    const run = verify(path);
    expect(run.status, run.stdout + run.stderr).toBe(2);
    expect(run.stderr).toMatch(/not a PDF/);
  });

  it("keel verify DIR prints the spec SHA-256 it checked, the hash of the archived spec.json", () => {
    const run = verify(built);
    const specHash = (
      JSON.parse(readFileSync(join(built, "results.json"), "utf8")) as { spec: { sha256: string } }
    ).spec.sha256;
    expect(run.stdout).toContain(`spec SHA-256 checked: ${specHash}`);
  });

  /** A copy of the build whose manifest is rewritten, in the canonical form keel writes, by `change`. */
  function withManifest(change: (m: Manifest, dir: string) => void): string {
    const dir = copyOfBuild();
    const path = join(dir, "manifest.json");
    const manifest = JSON.parse(readFileSync(path, "utf8")) as Manifest;
    change(manifest, dir);
    writeFileSync(path, manifestText(manifest));
    return dir;
  }
  const anyDigest = "0".repeat(64);

  it.each(["../spec.json", "/etc/hostname", "figures/../../spec.json", "figures"])(
    "keel verify DIR exits 3 and refuses the manifest entry %s without reading it",
    (name) => {
      const dir = withManifest((m) => (m.files[name] = anyDigest));
      const escaped = name.replace(/[./]/g, "\\$&");
      expectFailsNaming(verify(dir), new RegExp(`^FAIL refused: manifest entry '${escaped}'`, "m"));
    },
  );

  it("keel verify DIR exits 3 and refuses a figure that is a symbolic link out of the folder", () => {
    const dir = withManifest(() => undefined);
    const figure = join(dir, "figures", "portrait.svg");
    rmSync(figure);
    symlinkSync(join(built, "figures", "portrait.svg"), figure);
    expectFailsNaming(
      verify(dir),
      /^FAIL refused: manifest entry 'figures\/portrait\.svg' \(a symbolic link leading outside/m,
    );
  });

  it.each([[null], [[]], ["files"]])(
    "keel verify DIR exits 3, not 1, when the manifest's files is %j",
    (files) => {
      const dir = copyOfBuild();
      const path = join(dir, "manifest.json");
      const manifest = JSON.parse(readFileSync(path, "utf8")) as Record<string, unknown>;
      // written as plain JSON: keel's canonical writer would not take such a manifest
      writeFileSync(path, JSON.stringify({ ...manifest, files }, null, 2));
      expectFailsNaming(verify(dir), /^FAIL tampered: manifest\.json \(its 'files' is not an object/m);
    },
  );

  it("keel verify DIR exits 3 and names manifest.json after a one-byte change that keeps its meaning (a space made a tab)", () => {
    const dir = copyOfBuild();
    const path = join(dir, "manifest.json");
    const text = readFileSync(path, "utf8");
    const at = text.indexOf("\n  ") + 1;
    writeFileSync(path, text.slice(0, at) + "\t" + text.slice(at + 1));
    expect(JSON.parse(readFileSync(path, "utf8"))).toEqual(JSON.parse(text));
    expectFailsNaming(verify(dir), /^FAIL tampered: manifest\.json\b/m);
  });

  it("keel verify DIR exits 3 (a tampered archive, not bad usage) and names manifest.json when a one-byte change breaks its JSON", () => {
    const dir = copyOfBuild();
    const path = join(dir, "manifest.json");
    writeFileSync(path, changeOneByte(readFileSync(path), 0)); // "{" becomes "z"
    expect(() => JSON.parse(readFileSync(path, "utf8"))).toThrow();
    expectFailsNaming(verify(dir), /^FAIL tampered: manifest\.json\b/m);
  });

  it.each(["spec.json", "results.json", "manifest.json"])(
    "keel verify DIR exits 3 and names %s inside dossier.pdf after a one-byte change to the embedded copy",
    async (file) => {
      const dir = copyOfBuild();
      const pdfPath = join(dir, "dossier.pdf");
      const original = readFileSync(join(dir, file));
      // the embedded manifest lacks the PDF's own entry; a change to the disk copy's bytes stands in for it
      const copy = file === "manifest.json" ? new TextEncoder().encode(embeddedManifest(dir)) : original;
      writeFileSync(pdfPath, await replaceEmbedded(readFileSync(pdfPath), { [file]: changeOneByte(copy) }));
      expectFailsNaming(
        verify(dir),
        new RegExp(`^FAIL tampered: ${file.replace(".", "\\.")} inside dossier\\.pdf\\b`, "m"),
      );
    },
  );

  it.each(["spec.json", "results.json"])(
    "keel verify DIR/dossier.pdf exits 3 and names %s inside the PDF after a one-byte change to the embedded copy",
    async (file) => {
      const dir = copyOfBuild();
      const pdfPath = join(dir, "dossier.pdf");
      writeFileSync(
        pdfPath,
        await replaceEmbedded(readFileSync(pdfPath), {
          [file]: changeOneByte(readFileSync(join(dir, file))),
        }),
      );
      expectFailsNaming(
        verify(pdfPath),
        new RegExp(`^FAIL tampered: ${file.replace(".", "\\.")} inside the PDF\\b`, "m"),
      );
    },
  );

  describe("a forged results.json with every hash fixed", () => {
    /** An equilibrium off both axes, so every coordinate is non-zero and a relative change moves it. */
    function interiorEquilibrium(results: Record<string, unknown>): {
      index: number;
      state: string;
      value: number;
    } {
      const list = results.equilibria as { point: Record<string, number> }[];
      const index = list.findIndex((e) => Object.values(e.point).every((v) => v !== 0));
      if (index < 0) throw new Error("the example has no interior equilibrium");
      const state = Object.keys(list[index].point)[0];
      return { index, state, value: list[index].point[state] };
    }

    /** 1e-3 relative: a thousand times the drift verify tolerates (VERIFY_REL_TOL, 1e-6). */
    const DRIFT = 1e-3;

    it("keel verify DIR exits 3 and reports a drifted equilibrium coordinate by its JSON path, with no hash complaint", async () => {
      const dir = copyOfBuild();
      let target = { index: -1, state: "", value: 0 };
      await forgeResults(dir, (results) => {
        target = interiorEquilibrium(results);
        (results.equilibria as { point: Record<string, number> }[])[target.index].point[target.state] =
          target.value * (1 + DRIFT);
      });
      const run = verify(dir);
      const path = `equilibria[${target.index}].point.${target.state}`;
      expectFailsNaming(
        run,
        new RegExp(
          `^FAIL drifted: ${path.replace(/[[\].]/g, "\\$&")}: archived ${target.value * (1 + DRIFT)}, now ${target.value}$`,
          "m",
        ),
      );
      expect(failLines(run).filter((l) => /tampered|missing/.test(l))).toEqual([]);
    });

    it("keel verify DIR/dossier.pdf reports the same drift from the PDF alone", async () => {
      const dir = copyOfBuild();
      let path = "";
      await forgeResults(dir, (results) => {
        const target = interiorEquilibrium(results);
        (results.equilibria as { point: Record<string, number> }[])[target.index].point[target.state] =
          target.value * (1 + DRIFT);
        path = `equilibria[${target.index}].point.${target.state}`;
      });
      const run = verify(join(dir, "dossier.pdf"));
      expectFailsNaming(run, new RegExp(`^FAIL drifted: ${path.replace(/[[\].]/g, "\\$&")}: `, "m"));
      expect(failLines(run).filter((l) => /tampered|missing/.test(l))).toEqual([]);
    });

    it("keel verify DIR exits 3 and reports a changed equilibrium type as changed, by its JSON path", async () => {
      const dir = copyOfBuild();
      let index = -1;
      let was = "";
      await forgeResults(dir, (results) => {
        const list = results.equilibria as { type: string }[];
        index = list.findIndex((e) => e.type === "saddle");
        was = list[index].type;
        list[index].type = "stable-node";
      });
      expect(index).toBeGreaterThanOrEqual(0);
      const run = verify(dir);
      expectFailsNaming(
        run,
        new RegExp(
          `^FAIL changed: equilibria\\[${index}\\]\\.type: archived "stable-node", now "${was}"$`,
          "m",
        ),
      );
      expect(failLines(run).filter((l) => /tampered|missing|drifted/.test(l))).toEqual([]);
    });
  });

  it("keel build with SOURCE_DATE_EPOCH gives byte-identical files with --jobs 1 and --jobs 2", () => {
    const files = listFiles(built);
    expect(listFiles(builtTwoJobs)).toEqual(files);
    for (const f of ["results.json", "dossier.html", "dossier.pdf", "manifest.json"])
      expect(files).toContain(f);
    for (const f of files)
      expect(sha256(readFileSync(join(builtTwoJobs, f))), f).toBe(sha256(readFileSync(join(built, f))));
  });
});

/** The manifest as embedded in the PDF: the one on disk without the PDF's own entry. */
function embeddedManifest(dir: string): string {
  const manifest = JSON.parse(readFileSync(join(dir, "manifest.json"), "utf8")) as Manifest;
  delete manifest.files["dossier.pdf"];
  return manifestText(manifest);
}

const examples = EXAMPLE_IDS.map((id) => `${id}.json`);

/**
 * The studies a round trip runs: the first ranged parameter and those the claims name. Every
 * stage still runs and is verified; the other studies would only repeat the same code.
 */
function roundTripStudies(file: string): string[] {
  const spec = exampleSpec(file.replace(/\.json$/, ""));
  const ranged = (spec.parameters as { name: string; range?: unknown }[]).filter((p) => p.range);
  const named = ((spec.claims ?? []) as { parameter?: string }[]).flatMap((c) => c.parameter ?? []);
  return [...new Set([ranged[0].name, ...named])];
}

describe("keel verify round-trips on every example spec (built without a PDF)", () => {
  afterAll(removeWorkDirs);

  it.each(examples)("keel build %s then keel verify DIR exits 0", (file) => {
    const work = makeWorkDir();
    writeFileSync(join(work, "spec.json"), fastSpec(file, roundTripStudies(file)));
    const build = runKeel(["--quiet", "build", "spec.json", "--no-pdf", "--out", "out"], { cwd: work });
    expect(build.status, build.stderr).toBe(0);
    const run = verify(join(work, "out"));
    expect(run.status, run.stdout + run.stderr).toBe(0);
    expect(run.stdout).toMatch(/^verify: all checks hold$/m);
  });
});

/**
 * `keel build` through the built CLI: byte-identical rebuilds under
 * SOURCE_DATE_EPOCH, paper sizes, --no-pdf, and what happens when no Chromium can be used.
 * The option checks run on a tiny invented model (a damped spring) so each build takes seconds.
 */
import { chmodSync, existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHROMIUM_ENV, findChromium } from "../../src/report/render/chromium.js";
import {
  listFiles,
  makeWorkDir,
  removeWorkDirs,
  runKeel,
  STACK_FRAME,
  type CliResult,
} from "../fixtures/cli.js";
import { pdfinfo, pdfPageSize, popplerAvailable, popplerMissingMessage } from "../fixtures/poppler.js";
import { exampleSpec, SMALL_BASINS } from "../fixtures/examples.js";

const chromium = findChromium(process.env);
const canPrint = chromium !== null && popplerAvailable;
if (chromium === null)
  console.warn(
    `skipping PDF checks of keel build: no Chromium found (set ${CHROMIUM_ENV} or apt-get install chromium)`,
  );
else if (!popplerAvailable) console.warn(`skipping PDF checks of keel build: ${popplerMissingMessage}`);

const EPOCH = "1700000000";

/**
 * Paper sizes in PostScript points: A4 is 210 × 297 mm (ISO 216:2007, table 1), letter is
 * 8.5 × 11 in (ANSI/ASME Y14.1-2012, table 1); 72 pt = 1 in = 25.4 mm. Chromium rounds the sheet
 * to its own device units (595.92 × 841.92 pt measured for A4); 1 pt (0.35 mm) bounds that.
 */
const A4_PT = { width: (210 / 25.4) * 72, height: (297 / 25.4) * 72 };
const LETTER_PT = { width: 612, height: 792 };
const PAPER_TOL_PT = 1;

/** An invented test model: a unit mass on a spring with light damping, one stable focus at the origin. */
const SPRING_SPEC = {
  keel: 1,
  id: "damped-spring",
  title: "A damped spring (invented test model)",
  time: { unit: "second" },
  states: [
    { name: "x", label: "displacement", unit: "m", min: -2, max: 2 },
    { name: "v", label: "velocity", unit: "m/s", min: -2, max: 2 },
  ],
  parameters: [
    { name: "k", value: 1, unit: "1/s^2", label: "stiffness per mass", source: "invented for the test" },
    { name: "c", value: 0.5, unit: "1/s", label: "damping per mass", source: "invented for the test" },
  ],
  equations: { x: "v", v: "-k*x - c*v" },
  scenarios: [{ name: "pluck", initial: { x: 1, v: 0 }, horizon: 30 }],
  analysis: { basins: { resolution: 32, coarse: 8 } },
};

/** The files every build writes besides figures/, and the ones the determinism check compares. */
const COMPARED = ["dossier.html", "results.json", "manifest.json", "dossier.pdf"];

interface Build {
  run: CliResult;
  out: string;
}

/** Runs `keel build spec.json --out out ...extra` in a fresh folder holding `spec`. */
function build(spec: object, extra: string[] = [], env: Record<string, string | undefined> = {}): Build {
  const run = runKeel(["build", "spec.json", "--out", "out", ...extra], {
    files: { "spec.json": JSON.stringify(spec, null, 2) },
    env: { SOURCE_DATE_EPOCH: EPOCH, ...env },
  });
  return { run, out: join(run.cwd, "out") };
}

function smallExample(): object {
  return { ...exampleSpec("reservoir-competition"), analysis: { basins: SMALL_BASINS } };
}

afterAll(removeWorkDirs);

describe("keel build twice with the same SOURCE_DATE_EPOCH", () => {
  let first: Build;
  let second: Build;

  beforeAll(() => {
    // two separate folders: an absolute path leaking into an output would differ between them
    first = build(smallExample());
    second = build(smallExample());
    for (const b of [first, second])
      if (b.run.status !== 0) throw new Error(`keel build exited ${b.run.status}: ${b.run.stderr}`);
  });

  it("keel build(reservoir-competition) twice writes the same set of files", () => {
    expect(listFiles(second.out)).toEqual(listFiles(first.out));
    for (const name of COMPARED.slice(0, 3)) expect(listFiles(first.out)).toContain(name);
  });

  it("keel build(reservoir-competition) twice gives byte-identical dossier.html, results.json, manifest.json and dossier.pdf", () => {
    const compared = canPrint ? COMPARED : COMPARED.filter((f) => f !== "dossier.pdf");
    for (const name of compared) {
      const a = readFileSync(join(first.out, name));
      const b = readFileSync(join(second.out, name));
      expect(a.length, name).toBeGreaterThan(0);
      expect(a.equals(b), `${name} differs between two builds`).toBe(true);
    }
  });

  it("keel build(reservoir-competition) twice gives byte-identical figures", () => {
    for (const name of listFiles(first.out).filter((f) => f.startsWith("figures/"))) {
      expect(readFileSync(join(first.out, name)).equals(readFileSync(join(second.out, name))), name).toBe(
        true,
      );
    }
  });

  it.skipIf(!canPrint)("keel build --paper a4 (the default) prints on A4", () => {
    const size = pdfPageSize(pdfinfo(readFileSync(join(first.out, "dossier.pdf"))));
    expect(Math.abs(size.width - A4_PT.width)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(Math.abs(size.height - A4_PT.height)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(size.name).toBe("A4");
  });
});

describe.skipIf(!canPrint)("keel build --paper letter", () => {
  let letter: Build;

  beforeAll(() => {
    letter = build(SPRING_SPEC, ["--paper", "letter"]);
  });

  it("keel build --paper letter exits 0 and prints on US letter", () => {
    expect(letter.run.status, letter.run.stderr).toBe(0);
    const size = pdfPageSize(pdfinfo(readFileSync(join(letter.out, "dossier.pdf"))));
    expect(Math.abs(size.width - LETTER_PT.width)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(Math.abs(size.height - LETTER_PT.height)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(size.name).toBe("letter");
  });

  it("keel build --paper letter records the paper in manifest.json", () => {
    const manifest = JSON.parse(readFileSync(join(letter.out, "manifest.json"), "utf8")) as {
      options: { paper: string; pdf: boolean };
    };
    expect(manifest.options).toEqual({ paper: "letter", pdf: true });
  });
});

describe("keel build --no-pdf", () => {
  it("keel build --no-pdf writes the HTML and results but no PDF, and says nothing about Chromium", () => {
    const { run, out } = build(SPRING_SPEC, ["--no-pdf"]);
    expect(run.status, run.stderr).toBe(0);
    expect(existsSync(join(out, "dossier.html"))).toBe(true);
    expect(existsSync(join(out, "results.json"))).toBe(true);
    expect(existsSync(join(out, "dossier.pdf"))).toBe(false);
    expect(run.stderr).not.toMatch(/chromium/i);
  });
});

describe("keel build with KEEL_CHROMIUM naming a file that is not executable", () => {
  let fakeChromium: string;

  beforeAll(() => {
    const folder = makeWorkDir();
    fakeChromium = join(folder, "chromium");
    writeFileSync(fakeChromium, "#!/bin/sh\nexit 0\n");
    chmodSync(fakeChromium, 0o644);
  });

  it("keel build --pdf exits 2 naming KEEL_CHROMIUM or Chromium, with no stack trace, and writes nothing", () => {
    const { run, out } = build(SPRING_SPEC, ["--pdf"], { [CHROMIUM_ENV]: fakeChromium });
    expect(run.status, run.stderr).toBe(2);
    expect(run.stderr).toMatch(/KEEL_CHROMIUM|Chromium/);
    expect(run.stderr).not.toMatch(STACK_FRAME);
    expect(existsSync(out)).toBe(false);
  });

  it("keel build (no --pdf) still writes the HTML, no PDF, and one line on how to get PDFs", () => {
    const { run, out } = build(SPRING_SPEC, [], { [CHROMIUM_ENV]: fakeChromium });
    expect(run.status, run.stderr).toBe(0);
    expect(existsSync(join(out, "dossier.html"))).toBe(true);
    expect(existsSync(join(out, "dossier.pdf"))).toBe(false);
    const hints = run.stderr.split("\n").filter((line) => /chromium/i.test(line));
    expect(hints).toHaveLength(1);
    expect(hints[0]).toMatch(/apt-get install chromium/);
  });
});

/**
 * Chromium that is executable but fails: one that exits at once, one that never answers. Either
 * is an environment fault: everything but the PDF is written, the message says why, and the exit
 * code is 4 (README, "Exit codes"). KEEL_CHROMIUM_TIMEOUT shortens the 30 s start timeout so the
 * hanging case costs seconds.
 */
describe("keel build with a Chromium that starts but fails", () => {
  const fakes: Record<string, string> = {};

  beforeAll(() => {
    const folder = makeWorkDir();
    for (const [name, body] of Object.entries({ dead: "exit 1", hang: "sleep 600" })) {
      fakes[name] = join(folder, name);
      writeFileSync(fakes[name], `#!/bin/sh\n${body}\n`);
      chmodSync(fakes[name], 0o755);
    }
  });

  for (const kind of ["dead", "hang"] as const) {
    it(`keel build --pdf (Chromium that ${kind === "dead" ? "exits at once" : "never answers"}) exits 4 and writes everything but the PDF`, () => {
      const { run, out } = build(SPRING_SPEC, ["--pdf"], {
        [CHROMIUM_ENV]: fakes[kind],
        KEEL_CHROMIUM_TIMEOUT: "3",
      });
      expect(run.status, run.stderr).toBe(4);
      expect(run.stderr).toMatch(/dossier\.pdf/);
      expect(run.stderr).not.toMatch(STACK_FRAME);
      const written = listFiles(out);
      for (const name of ["dossier.html", "results.json", "manifest.json", "spec.json"])
        expect(written).toContain(name);
      expect(written).not.toContain("dossier.pdf");
      const manifest = JSON.parse(readFileSync(join(out, "manifest.json"), "utf8")) as {
        files: Record<string, unknown>;
      };
      expect(Object.keys(manifest.files)).not.toContain("dossier.pdf");
      expect(listFiles(run.cwd).filter((name) => name.includes(".keel-"))).toEqual([]);
    });
  }
});

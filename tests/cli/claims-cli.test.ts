/**
 * Claims through the built CLI: `keel check --claims SPEC` prints every verdict and exits 3 when
 * one is contradicted (0 when all hold, 2 for a spec without claims or with a bad claim), and the
 * dossier PDF shows the verdicts on the Summary page, the first page after the cover.
 */
import { execFileSync } from "node:child_process";
import { existsSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findChromium } from "../../src/report/render/chromium.js";
import { popplerAvailable, popplerMissingMessage } from "../fixtures/poppler.js";
import { makeWorkDir, removeWorkDirs, runKeel, STACK_FRAME } from "../fixtures/cli.js";
import { exampleSpec, SMALL_BASINS, withBasins } from "../fixtures/examples.js";
import { competitionCoexistenceStable } from "../fixtures/models.js";

afterAll(removeWorkDirs);

interface ClaimInput {
  id: string;
  kind: string;
  [key: string]: unknown;
}
interface ExampleSpec {
  id: string;
  title: string;
  claims?: ClaimInput[];
  analysis?: Record<string, unknown>;
  [key: string]: unknown;
}

const readExample = (file: string): ExampleSpec => exampleSpec(file.replace(/\.json$/, "")) as ExampleSpec;

/**
 * The example with a small basin map (claims do not read the basins, and the default map is the slow part).
 */
function fastExample(file: string, edit: (spec: ExampleSpec) => void = () => {}): string {
  const spec = withBasins(readExample(file), SMALL_BASINS) as ExampleSpec;
  delete spec.$schema; // the relative path means nothing in a temporary folder
  edit(spec);
  return JSON.stringify(spec, null, 2) + "\n";
}

/** `keel check --claims` verdict lines, "verdict  id: evidence (see where)", by claim id. */
function verdictLines(stdout: string): Map<string, { verdict: string; evidence: string }> {
  const out = new Map<string, { verdict: string; evidence: string }>();
  for (const m of stdout.matchAll(
    /^(supported|contradicted|undecided) +([A-Za-z0-9][A-Za-z0-9_.-]*): (.*)$/gm,
  ))
    out.set(m[2], { verdict: m[1], evidence: m[3] });
  return out;
}

/** The reservoir example's model in closed form: a positive, stable coexistence equilibrium? */
const coexistenceStable = competitionCoexistenceStable;

describe("keel check --claims", () => {
  it("keel check --claims specs/reservoir-competition.json exits 3 and lists each verdict, a12-decides contradicted", () => {
    const spec = readExample("reservoir-competition.json");
    const run = runKeel(["--quiet", "check", "--claims", "spec.json"], {
      files: { "spec.json": fastExample("reservoir-competition.json") },
    });
    expect(run.status, run.stderr).toBe(3);
    const verdicts = verdictLines(run.stdout);
    expect([...verdicts.keys()]).toEqual(spec.claims!.map((c) => c.id));
    /*
     * Murray 3.5 in closed form at the nominal values (K1 = 40000, K2 = 60000, a12 = 0.5,
     * a21 = 0.6): four equilibria; coexistence at ((K1 − a12 K2), (K2 − a21 K1))/(1 − a12 a21)
     * = (14285.7, 51428.6), a stable node since a12 < K1/K2 and a21 < K2/K1; the exclusion
     * threshold a12 = K1/K2 = 0.6667 lies above 0.5. Only a12-decides fails: a21's range
     * [0.3, 1.8] crosses K2/K1, where perch exclude bream although a12 < K1/K2.
     */
    for (const id of [
      "four-equilibria",
      "coexistence-stable",
      "survey-coexists",
      "a12-below",
      "exclusion-threshold",
    ])
      expect(verdicts.get(id)?.verdict, id).toBe("supported");
    const decides = verdicts.get("a12-decides")!;
    expect(decides.verdict).toBe("contradicted");
    // the counterexample, recomputed from the closed form at the values printed
    const at = Object.fromEntries(
      [...decides.evidence.matchAll(/\b(r1|r2|K1|K2|a12|a21) = ([-\d.e+]+)/g)].map((m) => [
        m[1],
        Number(m[2]),
      ]),
    );
    expect(Object.keys(at).sort()).toEqual(["K1", "K2", "a12", "a21", "r1", "r2"]);
    expect(at.a12 < at.K1 / at.K2).toBe(true);
    expect(decides.evidence).toMatch(/the condition holds but no stable coexistence equilibrium exists/);
    expect(coexistenceStable(at)).toBe(false);
    expect(run.stdout).toMatch(/^5 supported, 1 contradicted, 0 undecided$/m);
  });

  it("keel check --claims specs/grazer-forage.json exits 0 with every claim supported", () => {
    const spec = readExample("grazer-forage.json");
    const run = runKeel(["--quiet", "check", "--claims", "spec.json"], {
      files: { "spec.json": fastExample("grazer-forage.json") },
    });
    expect(run.status, run.stdout + run.stderr).toBe(0);
    const verdicts = verdictLines(run.stdout);
    expect([...verdicts.keys()]).toEqual(spec.claims!.map((c) => c.id));
    for (const [id, v] of verdicts) expect(v.verdict, id).toBe("supported");
    expect(run.stdout).toMatch(
      new RegExp(`^${spec.claims!.length} supported, 0 contradicted, 0 undecided$`, "m"),
    );
  });

  it("keel check --claims on a spec without claims exits 2 and says so", () => {
    const run = runKeel(["--quiet", "check", "--claims", "spec.json"], {
      files: { "spec.json": fastExample("grazer-forage.json", (s) => delete s.claims) },
    });
    expect(run.status, run.stdout + run.stderr).toBe(2);
    expect(run.stderr).toMatch(/spec\.json states no claims/);
    expect(run.stdout).toBe("");
  });
});

/** The reservoir example holds six valid claims; the bad one is appended as claims[6]. */
const BAD_INDEX = 6;
const badClaims: { what: string; claim: ClaimInput; path: string; message: RegExp }[] = [
  {
    what: "an unknown scenario",
    claim: { id: "bad", kind: "scenario-fate", scenario: "no-such-scenario", reaches: "equilibrium" },
    path: "scenario",
    message: /'no-such-scenario'/,
  },
  {
    what: "a state missing from near",
    claim: { id: "bad", kind: "equilibrium-type", near: { N: 100 }, type: "saddle" },
    path: "near",
    message: /'S'/,
  },
  {
    what: "an unknown parameter",
    claim: { id: "bad", kind: "parameter-side", parameter: "a99", side: "below" },
    path: "parameter",
    message: /'a99' is not a declared parameter/,
  },
  {
    what: "a condition with a state in it",
    claim: { id: "bad", kind: "condition-decides", condition: "a12 < N/K2", attractor: "coexistence" },
    path: "condition",
    message: /'N' is a state/,
  },
  {
    what: "an attractor keel cannot name",
    claim: { id: "bad", kind: "condition-decides", condition: "a12 < K1/K2", attractor: "bogus" },
    path: "attractor",
    message: /'bogus' is not an attractor keel can name/,
  },
  {
    what: "a duplicate claim id",
    claim: { id: "four-equilibria", kind: "equilibrium-count", count: 4 },
    path: "id",
    message: /already used at claims\[0\]\.id/,
  },
];

describe("keel refuses a bad claim with exit 2 and its JSON path", () => {
  const cases = badClaims.map(
    (c) =>
      [
        `keel check --claims with ${c.what} exits 2 at claims[${BAD_INDEX}].${c.path}, and keel build writes nothing`,
        c,
      ] as const,
  );
  it.each(cases)("%s", (_name, { claim, path, message }) => {
    const text = fastExample("reservoir-competition.json", (s) => {
      s.claims = [...s.claims!, claim];
    });
    expect((JSON.parse(text) as ExampleSpec).claims!.length).toBe(BAD_INDEX + 1);
    const work = makeWorkDir();
    writeFileSync(join(work, "spec.json"), text);
    const check = runKeel(["--quiet", "check", "--claims", "spec.json"], { cwd: work });
    expect(check.status, check.stdout + check.stderr).toBe(2);
    const line = check.stderr.split("\n").find((l) => l.includes(`at claims[${BAD_INDEX}].${path}:`));
    expect(line, check.stderr).toBeDefined();
    expect(line).toMatch(message);
    expect(check.stderr).not.toMatch(STACK_FRAME);
    expect(check.stdout).toBe("");
    const build = runKeel(["--quiet", "build", "spec.json", "--no-pdf", "--out", "out"], { cwd: work });
    expect(build.status).toBe(2);
    expect(build.stderr).toContain(`at claims[${BAD_INDEX}].${path}:`);
    expect(existsSync(join(work, "out"))).toBe(false);
  });
});

const chromium = findChromium(process.env);
const canPrint = chromium !== null && popplerAvailable;
if (!chromium)
  console.warn(
    "skipping the claims-in-the-PDF test: no Chromium found (set KEEL_CHROMIUM or apt-get install chromium)",
  );
else if (!popplerAvailable) console.warn(`skipping the claims-in-the-PDF test: ${popplerMissingMessage}`);

/** One page of a PDF file as poppler's pdftotext reads it. */
function pageText(pdf: string, page: number, layout = false): string {
  return execFileSync(
    "pdftotext",
    [...(layout ? ["-layout"] : []), "-enc", "UTF-8", "-f", String(page), "-l", String(page), pdf, "-"],
    { encoding: "utf8" },
  );
}

describe.skipIf(!canPrint)(
  "the dossier PDF shows a contradicted claim on the Summary page, the first after the cover",
  () => {
    let pdf: string;
    let title: string;
    beforeAll(() => {
      const work = makeWorkDir();
      // the claims name a12 alone; studying only it keeps the build quick
      writeFileSync(
        join(work, "spec.json"),
        fastExample("reservoir-competition.json", (s) => {
          s.analysis = { ...s.analysis, parameters: ["a12"] };
        }),
      );
      title = readExample("reservoir-competition.json").title;
      const run = runKeel(["--quiet", "build", "spec.json", "--pdf", "--out", "out"], { cwd: work });
      if (run.status !== 0) throw new Error(`keel build failed (exit ${run.status}):\n${run.stderr}`);
      pdf = join(work, "out", "dossier.pdf");
    });

    it("pdftotext -f 1 -l 1 (the cover) shows the title and no summary", () => {
      const cover = pageText(pdf, 1);
      expect(cover.replace(/\s+/g, " ")).toContain(title.replace(/\s+/g, " "));
      expect(cover).not.toMatch(/Summary of findings/);
    });

    it("pdftotext -f 2 -l 2 holds the Summary with claim a12-decides marked contradicted", () => {
      const page = pageText(pdf, 2);
      expect(page).toMatch(/Summary of findings/);
      expect(page).toContain("a12-decides");
      expect(page).toMatch(/\bcontradicted\b/);
      expect(page).toMatch(/5 supported, 1 contradicted, 0 undecided/);
      // with the table's columns kept, the claim and its verdict share a row
      expect(pageText(pdf, 2, true)).toMatch(/a12-decides\b.*\bcontradicted\b/);
    });
  },
);

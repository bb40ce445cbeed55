/**
 * The dossier end to end: every example spec built once with the built CLI,
 * then its HTML read as a browser would (sections, no URL, escaped spec text) and its PDF read
 * with poppler as an outside reader (page count, the equilibria table, the summary's page).
 * Basin grids are cut to 64 × 64 so the builds stay quick; nothing checked here depends on them.
 */
import { existsSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHROMIUM_ENV, findChromium } from "../../src/report/render/chromium.js";
import { renderPdf } from "../../src/report/render/pdf.js";
import { makeWorkDir, PROJECT_ROOT, removeWorkDirs, runKeel, type CliResult } from "../fixtures/cli.js";
import { pdfinfo, pdftotext, popplerAvailable, popplerMissingMessage } from "../fixtures/poppler.js";

const chromium = findChromium(process.env);
const canPrint = chromium !== null && popplerAvailable;
if (chromium === null)
  console.warn(
    `skipping dossier PDF checks: no Chromium found (set ${CHROMIUM_ENV} or apt-get install chromium)`,
  );
else if (!popplerAvailable) console.warn(`skipping dossier PDF checks: ${popplerMissingMessage}`);

/** 2023-11-14T22:13:20Z; SOURCE_DATE_EPOCH is seconds since 1970 (reproducible-builds.org, "SOURCE_DATE_EPOCH" specification). */
const EPOCH = "1700000000";
const EPOCH_DATE = "2023-11-14";
const SMALL_BASINS = { resolution: 64, coarse: 16 };

/**
 * Page counts measured on A4 with Chromium 156, at the small basin grid and at full resolution
 * alike: reservoir-competition 18, grazer-forage 19. The range catches a dossier that collapses
 * (a section lost) or sprawls (a table split row by row); it is not a layout snapshot.
 */
const PAGE_RANGE = { min: 12, max: 28 };

/** U+2212, the minus sign the dossier prints (Unicode Standard, chapter 6, "Mathematical symbols"). */
const MINUS = "\u2212";

interface Built {
  id: string;
  dir: string;
  run: CliResult;
  html: string;
  results: Results;
  pdf: Uint8Array | null;
}

/** The parts of results.json these checks read. */
interface Results {
  spec: { id: string; sha256: string };
  keel: string;
  equilibria: { id: string }[];
  basins: { attractors: string[] };
  conditions: { studies: unknown[]; invasion: unknown[] };
}

/** A copy of `spec` with a small basin grid, written into `dir`; returns its path. */
function writeSmallSpec(dir: string, spec: Record<string, unknown>): string {
  const analysis = { ...(spec.analysis as object | undefined), basins: SMALL_BASINS };
  const file = join(dir, `${spec.id as string}.json`);
  writeFileSync(file, JSON.stringify({ ...spec, analysis }, null, 2));
  return file;
}

function buildSpec(spec: Record<string, unknown>): Built {
  const work = makeWorkDir();
  const file = writeSmallSpec(work, spec);
  const dir = join(work, "out");
  const run = runKeel(["build", file, "--out", dir], { cwd: work, env: { SOURCE_DATE_EPOCH: EPOCH } });
  if (run.status !== 0) throw new Error(`keel build ${String(spec.id)} exited ${run.status}: ${run.stderr}`);
  const pdfPath = join(dir, "dossier.pdf");
  return {
    id: spec.id as string,
    dir,
    run,
    html: readFileSync(join(dir, "dossier.html"), "utf8"),
    results: JSON.parse(readFileSync(join(dir, "results.json"), "utf8")) as Results,
    pdf: existsSync(pdfPath) ? new Uint8Array(readFileSync(pdfPath)) : null,
  };
}

const SPECS_DIR = join(PROJECT_ROOT, "specs");
const exampleSpecs = readdirSync(SPECS_DIR)
  .filter((f) => f.endsWith(".json"))
  .sort()
  .map(
    (f) => JSON.parse(readFileSync(join(SPECS_DIR, f), "utf8")) as Record<string, unknown> & { id: string },
  );

// ---- reading HTML without a browser: enough for markup we generate ourselves ----

/** Character references the HTML serialiser and Handlebars write (WHATWG HTML, section 13.1.4). */
function decodeEntities(text: string): string {
  const named: Record<string, string> = { lt: "<", gt: ">", amp: "&", quot: '"', apos: "'", nbsp: "\u00a0" };
  return text.replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);/gi, (whole, ref: string) => {
    if (ref[0] === "#")
      return String.fromCodePoint(
        ref[1] === "x" || ref[1] === "X" ? parseInt(ref.slice(2), 16) : Number(ref.slice(1)),
      );
    return named[ref.toLowerCase()] ?? whole;
  });
}

/** The page's text as a reader sees it: markup, <style> and <title> dropped, references decoded. */
function visibleText(html: string): string {
  const body = html.includes("<body") ? html.slice(html.indexOf("<body")) : html;
  return decodeEntities(body.replace(/<style[\s\S]*?<\/style>/gi, "").replace(/<[^>]+>/g, ""));
}

/** Every start tag's name and attribute names (quoted values removed first, since they are text). */
function startTags(html: string): { name: string; attributes: string[] }[] {
  return [...html.matchAll(/<([a-zA-Z][\w:-]*)((?:[^>"']|"[^"]*"|'[^']*')*)>/g)].map(([, name, rest]) => ({
    name: name.toLowerCase(),
    attributes: [...rest.replace(/"[^"]*"|'[^']*'/g, "").matchAll(/([^\s=/]+)\s*=/g)].map((a) =>
      a[1].toLowerCase(),
    ),
  }));
}

/** Values of every src, href and xlink:href attribute. */
function linkValues(html: string): string[] {
  return [...html.matchAll(/\s(?:src|href|xlink:href)\s*=\s*("([^"]*)"|'([^']*)'|([^\s>]+))/gi)].map(
    (m) => m[2] ?? m[3] ?? m[4],
  );
}

/** Text with all white space removed, so a line broken by the PDF's layout still matches. */
const squeeze = (s: string) => s.replace(/\s+/g, "");

/** Section ids in document order, each with the text of its first h2 (null for the cover). */
function sectionOutline(html: string): { id: string; heading: string | null }[] {
  const starts = [...html.matchAll(/<section\b[^>]*\bid="([^"]+)"[^>]*>/g)];
  return starts.map((m, k) => {
    const end = k + 1 < starts.length ? starts[k + 1].index : html.length;
    const h2 = /<h2[^>]*>([\s\S]*?)<\/h2>/.exec(html.slice(m.index, end));
    return { id: m[1], heading: h2 ? decodeEntities(h2[1].replace(/<[^>]+>/g, "")).trim() : null };
  });
}

/** The dossier's sections in their fixed order; optional ones appear when their analysis has something to say. */
function expectedOutline(results: Results): { id: string; heading: string | null }[] {
  return [
    { id: "cover", heading: null },
    { id: "summary", heading: "Summary of findings" },
    { id: "model", heading: "Model" },
    { id: "equilibria", heading: "Equilibria" },
    { id: "portrait", heading: "Phase portrait" },
    ...(results.basins.attractors.length > 0 ? [{ id: "basins", heading: "Basins of attraction" }] : []),
    ...(results.conditions.studies.length + results.conditions.invasion.length > 0
      ? [{ id: "conditions", heading: "Deciding conditions" }]
      : []),
    { id: "methods", heading: "Methods and provenance" },
    { id: "cautions", heading: "Cautions" },
  ];
}

/** Rows of the equilibria table as the HTML prints them: the text of each cell. */
function equilibriaRows(html: string): string[][] {
  const table = /<table class="equilibria-table[^"]*">[\s\S]*?<tbody>([\s\S]*?)<\/tbody>/.exec(html);
  if (!table) throw new Error("no equilibria table in the HTML");
  return [...table[1].matchAll(/<tr>([\s\S]*?)<\/tr>/g)].map((row) =>
    [...row[1].matchAll(/<td[^>]*>([\s\S]*?)<\/td>/g)].map((cell) =>
      decodeEntities(cell[1].replace(/<[^>]+>/g, "")).trim(),
    ),
  );
}

/** The running header Chromium prints on every page: the model id, then "spec <hash>…". */
function withoutRunningHeader(page: string, id: string): string[] {
  return page
    .split("\n")
    .map((l) => l.trim())
    .filter((l) => l !== "" && l !== id && !/^spec [0-9a-f]{16}…$/.test(l) && !/^page \d+ of \d+$/.test(l));
}

afterAll(removeWorkDirs);

/** Each example is built once per file; later suites reuse the build. */
const builtExamples = new Map<string, Built>();
function buildExample(spec: Record<string, unknown> & { id: string }): Built {
  if (!builtExamples.has(spec.id)) builtExamples.set(spec.id, buildSpec(spec));
  return builtExamples.get(spec.id)!;
}

for (const spec of exampleSpecs)
  describe(`keel build specs/${spec.id}.json: the dossier`, () => {
    let built: Built;
    let text: string[] = []; // PDF text, one entry per page

    beforeAll(() => {
      built = buildExample(spec);
      if (canPrint && built.pdf) text = pdftotext(built.pdf).split("\f");
    });

    it("buildDossier(example) prints every section, in order, under its heading", () => {
      expect(sectionOutline(built.html)).toEqual(expectedOutline(built.results));
    });

    it("buildDossier(example) puts title, id, date from SOURCE_DATE_EPOCH, spec hash and keel version on the cover", () => {
      const cover = /<section class="cover"[\s\S]*?<\/section>/.exec(built.html)![0];
      const coverText = visibleText(cover);
      for (const fact of [
        spec.title as string,
        spec.id,
        EPOCH_DATE,
        built.results.spec.sha256,
        `keel ${built.results.keel}`,
      ]) {
        expect(coverText).toContain(fact);
      }
    });

    it("buildDossier(example) refers to no URL: no script, link, @import, remote src/href or url() but data:", () => {
      const html = built.html;
      const tagNames = new Set(startTags(html).map((t) => t.name));
      for (const name of ["script", "link", "iframe", "object", "embed", "base"])
        expect(tagNames, `<${name}>`).not.toContain(name);
      expect(html).not.toMatch(/@import/i);
      for (const value of linkValues(html)) expect(value, "src/href value").toMatch(/^(data:|#)/);
      for (const img of html.matchAll(/<img\b[^>]*>/gi)) expect(img[0]).toMatch(/\ssrc\s*=\s*["']?data:/i);
      const urls = [...html.matchAll(/url\(\s*(["']?)([^"')\s]{0,12})/gi)].map((m) => m[2]);
      expect(urls.length).toBeGreaterThan(0); // the inlined KaTeX fonts: the check did look
      for (const target of urls) expect(target).toMatch(/^data:/);
      // the example specs mention no web address, so none may appear anywhere, markup or text
      expect(html).not.toMatch(/https?:|(?:src|href)\s*=\s*["']?\/\//i);
    });

    it("keel build(example) reports no blocked network request while printing", () => {
      expect(built.run.stderr).not.toMatch(/blocked/i);
    });

    describe.skipIf(!canPrint)("its PDF", () => {
      it(`keel build(example) prints between ${PAGE_RANGE.min} and ${PAGE_RANGE.max} pages, as pdfinfo counts them`, () => {
        const pages = Number(pdfinfo(built.pdf!).Pages);
        expect(pages).toBeGreaterThanOrEqual(PAGE_RANGE.min);
        expect(pages).toBeLessThanOrEqual(PAGE_RANGE.max);
        expect(text.filter((p) => p.trim() !== "").length).toBe(pages);
      });

      it("keel build(example) PDF text holds every equilibria-table value as the HTML prints it, row by row", () => {
        const rows = equilibriaRows(built.html);
        expect(rows.map((r) => r[0])).toEqual(built.results.equilibria.map((e) => e.id));
        const all = squeeze(text.join("\n"));
        const table = all.slice(
          all.indexOf(squeeze("Every equilibrium found")),
          all.indexOf(squeeze("Jacobian at each equilibrium")),
        );
        expect(table.length).toBeGreaterThan(0);
        for (const row of rows) {
          // each cell in order after the row's id: pdftotext reads the table row by row
          let at = table.indexOf(row[0]);
          for (const cell of row) {
            const found = table.indexOf(squeeze(cell), at);
            expect(found, `${row[0]}: "${cell}" in the PDF's equilibria table`).toBeGreaterThanOrEqual(0);
            at = found + squeeze(cell).length;
          }
        }
        // negative values keep the true minus sign through the PDF, as printed in the HTML
        const negatives = rows.flat().filter((c) => c.startsWith(MINUS));
        expect(negatives.length).toBeGreaterThan(0);
        for (const cell of negatives) expect(table).toContain(squeeze(cell));
      });

      it("keel build(example) PDF numbers the section headings 1, 2, 3… in document order", () => {
        const lines = text
          .join("\n")
          .split("\n")
          .map((l) => l.trim());
        let at = -1;
        for (const [k, section] of expectedOutline(built.results).slice(1).entries()) {
          const found = lines.indexOf(`${k + 1}\u2002${section.heading}`, at + 1);
          const plain = lines.indexOf(`${k + 1} ${section.heading}`, at + 1);
          const where = found >= 0 ? found : plain;
          expect(where, `"${k + 1} ${section.heading}" after line ${at}`).toBeGreaterThan(at);
          at = where;
        }
      });

      it("keel build(example) fits the Summary of findings on page 2; page 3 starts the Model section", () => {
        const summary = /<section class="summary"[\s\S]*?<\/section>/.exec(built.html)![0];
        const headings = [...summary.matchAll(/<h3>([\s\S]*?)<\/h3>/g)].map((h) => decodeEntities(h[1]));
        expect(headings.length).toBeGreaterThan(2);
        const page2 = text[1];
        expect(page2).toContain("Summary of findings");
        for (const h of headings) expect(page2, `summary heading "${h}" on page 2`).toContain(h);
        expect(withoutRunningHeader(text[2], spec.id)[0]).toMatch(/^\d+\s+Model$/);
      });
    });
  });

describe.skipIf(!canPrint)("renderPdf(dossier HTML with an injected remote image)", () => {
  // The templates escape all spec text, so a request can only be injected behind them, here.
  // .invalid never resolves (RFC 6761, section 6.4), so the check needs no DNS.
  const REMOTE = "http://example.invalid/x.png";

  it("renderPdf(dossier + <img src=http://…>) blocks the request and lists it in blockedRequests", async () => {
    const built = buildExample(exampleSpecs[0]);
    const html = built.html.replace("</body>", `<img src="${REMOTE}" alt="">\n</body>`);
    expect(html).toContain(REMOTE);
    const printed = await renderPdf(html, {
      chromiumPath: chromium!,
      paper: "a4",
      headerLeft: built.id,
      headerRight: "spec test",
    });
    expect(printed.blockedRequests).toEqual([REMOTE]);
    expect(printed.pageCount).toBeGreaterThanOrEqual(PAGE_RANGE.min);
  });
});

/** Markup and template syntax a hostile or careless spec might carry (OWASP XSS Filter Evasion Cheat Sheet, first entries). */
const PAYLOAD = `<script>alert(1)</script> <img src=x onerror=alert(1)> {{constructor.constructor('x')()}}`;

/** Each free-text field of the spec, marked so its copy can be found in the output. */
function hostileSpec(base: Record<string, unknown>): Record<string, unknown> {
  const spec = structuredClone(base) as Record<string, unknown> & {
    states: { label: string }[];
    parameters: { label: string; source: string }[];
    assumptions: { text: string }[];
    claims: { text: string }[];
    scenarios: { label: string }[];
    cautions: string[];
  };
  const mark = (field: string) => `[${field}] ${PAYLOAD}`;
  spec.id = "hostile-text";
  spec.title = mark("title");
  spec.purpose = mark("purpose");
  spec.authors = [mark("author")];
  spec.organisation = mark("organisation");
  spec.states[0].label = mark("state");
  spec.parameters[0].label = mark("parameter");
  spec.parameters[0].source = mark("source");
  spec.assumptions[0].text = mark("assumption");
  spec.claims[0].text = mark("claim");
  spec.scenarios[0].label = mark("scenario");
  spec.cautions = [...spec.cautions, mark("caution")];
  return spec;
}
const FIELDS = [
  "title",
  "purpose",
  "author",
  "organisation",
  "state",
  "parameter",
  "source",
  "assumption",
  "claim",
  "scenario",
  "caution",
];
/** Fields printed in running text or figure labels, where pdftotext keeps the whole string in one run. */
const FULL_WIDTH_FIELDS = [
  "title",
  "purpose",
  "author",
  "organisation",
  "state",
  "assumption",
  "scenario",
  "caution",
];

describe("keel build(spec whose text carries <script>, <img onerror> and {{…}})", () => {
  const base = exampleSpecs.find((s) => s.id === "reservoir-competition") ?? exampleSpecs[0];
  let built: Built;

  beforeAll(() => {
    built = buildSpec(hostileSpec(base));
  });

  it("buildDossier(hostile text) emits no script or img element and no on* attribute", () => {
    const tags = startTags(built.html);
    expect(tags.filter((t) => t.name === "script" || t.name === "img")).toEqual([]);
    expect(tags.flatMap((t) => t.attributes).filter((a) => a.startsWith("on"))).toEqual([]);
    expect(built.html).not.toMatch(/<script|<img/i);
  });

  it("buildDossier(hostile text) prints each field's text escaped, so it reads back literally", () => {
    const escaped = "&lt;script&gt;alert(1)&lt;/script&gt;";
    const readable = visibleText(built.html);
    for (const field of FIELDS) {
      expect(built.html, field).toContain(`[${field}] ${escaped}`);
      expect(readable, field).toContain(`[${field}] ${PAYLOAD}`);
    }
    expect(decodeEntities(/<title>([\s\S]*?)<\/title>/.exec(built.html)![1])).toContain(`[title] ${PAYLOAD}`);
  });

  it("buildDossier(hostile text) leaves {{…}} as text: Handlebars does not evaluate data", () => {
    // Handlebars escapes & < > " ' ` = in {{expr}} output and never re-reads it as a template (handlebarsjs.com, "HTML escaping")
    expect(built.html).toContain("{{constructor.constructor(");
    expect(
      visibleText(built.html).split("{{constructor.constructor('x')()}}").length - 1,
    ).toBeGreaterThanOrEqual(FIELDS.length);
  });

  it.skipIf(!canPrint)("keel build(hostile text) PDF shows the literal characters", () => {
    const all = squeeze(pdftotext(built.pdf!));
    for (const field of FIELDS) expect(all, field).toContain(squeeze(`[${field}] <script>alert(1)`));
    for (const field of FULL_WIDTH_FIELDS) expect(all, field).toContain(squeeze(`[${field}] ${PAYLOAD}`));
  });
});

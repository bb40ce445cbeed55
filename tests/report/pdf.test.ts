import { createHash } from "node:crypto";
import { chmodSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { PDFDict, PDFDocument, PDFHexString, PDFName, PDFString } from "pdf-lib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHROMIUM_ENV, findChromium } from "../../src/report/render/chromium.js";
import { PdfRenderError, renderPdf, type PdfRenderResult } from "../../src/report/render/pdf.js";
import {
  pdfPageSize,
  pdfinfo,
  pdftotext,
  popplerAvailable,
  popplerMissingMessage,
} from "../fixtures/poppler.js";

const chromium = findChromium(process.env);
const canPrint = chromium !== null && popplerAvailable;
if (chromium === null) {
  console.warn(
    `skipping PDF rendering tests: no Chromium found (set ${CHROMIUM_ENV} or apt-get install chromium)`,
  );
} else if (!popplerAvailable) {
  console.warn(`skipping PDF rendering tests: ${popplerMissingMessage}`);
}

/**
 * Paper sizes in PostScript points: A4 is 210 × 297 mm (ISO 216:2007, table 1), letter is
 * 8.5 × 11 in (ANSI/ASME Y14.1-2012, table 1); 72 pt = 1 in = 25.4 mm.
 */
const A4_PT = { width: (210 / 25.4) * 72, height: (297 / 25.4) * 72 }; // 595.28 × 841.89
const LETTER_PT = { width: 612, height: 792 };
/**
 * Chromium 156 (measured) writes A4 as 595.92 × 841.92 pt: it rounds the sheet to its own
 * device units. 0.64 pt is 0.23 mm, far inside a printer's feed tolerance; 1 pt bounds it.
 */
const PAPER_TOL_PT = 1;

const MODEL_ID = "reservoir-competition";
const SPEC_HASH = createHash("sha256").update("keel pdf test spec").digest("hex");
const FOOTER_NOTE = `invented demo <b>not bold</b> & "quoted"`;

/**
 * Three sections, each short enough for one page on either paper, each starting a new page with
 * `break-before: page` (W3C, CSS Fragmentation Module Level 3, section 3.1), so the PDF has
 * exactly three pages on A4 and on letter.
 */
const SECTIONED_PAGES = 3;
const SECTIONED_HTML = `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>Two competing stocks in a reservoir</title>
<style>
  body { font: 11pt/1.4 "DejaVu Serif", serif; }
  section + section { break-before: page; }
  table { border-collapse: collapse; } td, th { border: 1px solid #888; padding: 2pt 6pt; }
</style></head>
<body>
  <section><h1>Model</h1><p>An invented scenario for the test.</p>
    <h2>Parameters</h2>
    <table><thead><tr><th>name</th><th>value</th><th>unit</th></tr></thead>
      <tbody><tr><td>r1</td><td>0.5</td><td>1/year</td></tr><tr><td>K1</td><td>48000</td><td>fish</td></tr></tbody></table>
  </section>
  <section><h1>Equilibria</h1>
    <table><thead><tr><th>id</th><th>N</th><th>S</th><th>trace</th><th>type</th></tr></thead>
      <tbody><tr><td>E1</td><td>0</td><td>40000</td><td>-0.3125</td><td>saddle</td></tr>
             <tr><td>E3</td><td>31250</td><td>12500</td><td>-0.7071</td><td>stable-node</td></tr></tbody></table>
    <h2>Jacobian</h2><p>Evaluated at each equilibrium.</p>
  </section>
  <section><h1>Phase portrait</h1>
    <svg xmlns="http://www.w3.org/2000/svg" width="300" height="200" viewBox="0 0 300 200">
      <rect x="1" y="1" width="298" height="198" fill="none" stroke="#333"/>
      <circle cx="150" cy="100" r="6" fill="#222"/>
      <text x="160" y="96" font-size="12">E3 stable-node</text>
    </svg>
  </section>
</body></html>`;

/** Runs `action` with os.tmpdir() pointing at `folder` (it follows TMPDIR), then restores it. */
async function withTmpdir<T>(folder: string, action: () => Promise<T>): Promise<T> {
  const saved = process.env.TMPDIR;
  process.env.TMPDIR = folder;
  try {
    return await action();
  } finally {
    if (saved === undefined) delete process.env.TMPDIR;
    else process.env.TMPDIR = saved;
  }
}

interface OutlineItem {
  title: string;
  children: OutlineItem[];
}

/** The PDF's document outline (ISO 32000-1:2008, section 12.3.3), read with pdf-lib. */
async function readOutline(pdf: Uint8Array): Promise<OutlineItem[] | null> {
  const doc = await PDFDocument.load(pdf, { updateMetadata: false });
  const root = doc.catalog.lookupMaybe(PDFName.of("Outlines"), PDFDict);
  return root ? readSiblings(root.lookupMaybe(PDFName.of("First"), PDFDict)) : null;
}

function readSiblings(first: PDFDict | undefined): OutlineItem[] {
  const items: OutlineItem[] = [];
  for (let node = first; node; node = node.lookupMaybe(PDFName.of("Next"), PDFDict)) {
    const title = node.lookupMaybe(PDFName.of("Title"), PDFString, PDFHexString);
    items.push({
      title: title?.decodeText() ?? "",
      children: readSiblings(node.lookupMaybe(PDFName.of("First"), PDFDict)),
    });
  }
  return items;
}

describe.skipIf(!canPrint).each([
  { paper: "a4" as const, expected: A4_PT, popplerName: "A4" },
  { paper: "letter" as const, expected: LETTER_PT, popplerName: "letter" },
])("renderPdf(sectioned dossier, $paper)", ({ paper, expected, popplerName }) => {
  let result: PdfRenderResult;
  let info: Record<string, string>;
  let text: string;

  beforeAll(async () => {
    result = await renderPdf(SECTIONED_HTML, {
      chromiumPath: chromium!,
      paper,
      headerLeft: MODEL_ID,
      headerRight: SPEC_HASH,
      footerNote: FOOTER_NOTE,
    });
    info = pdfinfo(result.pdf);
    text = pdftotext(result.pdf);
  });

  it(`renderPdf(sectioned, ${paper}) prints ${SECTIONED_PAGES} pages, as pdfinfo counts them`, () => {
    expect(Number(info.Pages)).toBe(SECTIONED_PAGES);
    expect(result.pageCount).toBe(SECTIONED_PAGES);
  });

  it(`renderPdf(sectioned, ${paper}) prints on ${popplerName} paper`, () => {
    const size = pdfPageSize(info);
    expect(Math.abs(size.width - expected.width)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(Math.abs(size.height - expected.height)).toBeLessThanOrEqual(PAPER_TOL_PT);
    expect(size.name).toBe(popplerName);
  });

  it(`renderPdf(sectioned, ${paper}) keeps the table values, the running header and the page numbers`, () => {
    for (const value of ["48000", "1/year", "40000", "-0.3125", "31250", "stable-node", "E3 stable-node"]) {
      expect(text).toContain(value);
    }
    const pages = text.split("\f");
    for (let n = 1; n <= SECTIONED_PAGES; n++) {
      expect(pages[n - 1]).toContain(MODEL_ID);
      expect(pages[n - 1]).toContain(SPEC_HASH);
      expect(pages[n - 1]).toContain(`page ${n} of ${SECTIONED_PAGES}`);
    }
  });

  it(`renderPdf(sectioned, ${paper}) escapes the footer note, so its markup prints as text`, () => {
    expect(text).toContain(FOOTER_NOTE);
  });

  it(`renderPdf(sectioned, ${paper}) is tagged and titled from <title>`, () => {
    expect(info.Tagged).toBe("yes");
    expect(info.Title).toBe("Two competing stocks in a reservoir");
  });

  it(`renderPdf(sectioned, ${paper}) builds the outline from the h1/h2 headings`, async () => {
    expect(await readOutline(result.pdf)).toEqual([
      { title: "Model", children: [{ title: "Parameters", children: [] }] },
      { title: "Equilibria", children: [{ title: "Jacobian", children: [] }] },
      { title: "Phase portrait", children: [] },
    ]);
  });

  it(`renderPdf(sectioned, ${paper}) blocks nothing in a self-contained page`, () => {
    expect(result.blockedRequests).toEqual([]);
  });
});

describe.skipIf(!canPrint)("renderPdf(page that reaches for the network)", () => {
  // A local server stands in for the outside world: it counts every request that gets out.
  let server: Server;
  const arrived: string[] = [];
  let local = "";
  let result: PdfRenderResult;
  let profileParent = "";

  // .invalid never resolves (RFC 6761, section 6.4), so no test depends on real DNS.
  const outside = {
    image: "http://example.invalid/x.png",
    stylesheet: "http://example.invalid/style.css",
    fetch: "http://example.invalid/data.json",
  };

  beforeAll(async () => {
    server = createServer((request, response) => {
      arrived.push(request.url ?? "");
      response.end("reached");
    });
    server.on("upgrade", (request, socket) => {
      arrived.push(request.url ?? "");
      socket.destroy();
    });
    await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
    local = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const html = `<!doctype html><html><head><meta charset="utf-8">
      <link rel="stylesheet" href="${outside.stylesheet}"><link rel="stylesheet" href="${local}/style.css">
      </head><body><p>A page that tries to phone home.</p>
      <img src="${outside.image}" alt=""><img src="${local}/x.png" alt="">
      <script>
        fetch(${JSON.stringify(outside.fetch)}).catch(() => {});
        fetch(${JSON.stringify(`${local}/data.json`)}).catch(() => {});
        new WebSocket(${JSON.stringify(`${local.replace("http", "ws")}/socket`)});
      </script></body></html>`;
    // The throw-away profile lands in a folder of our own, so the test can see it removed.
    profileParent = mkdtempSync(join(tmpdir(), "keel-pdf-test-"));
    result = await withTmpdir(profileParent, () =>
      renderPdf(html, { chromiumPath: chromium!, paper: "a4", headerLeft: MODEL_ID, headerRight: SPEC_HASH }),
    );
  });

  afterAll(() => {
    server?.close();
    if (profileParent) rmSync(profileParent, { recursive: true, force: true });
  });

  it("renderPdf(leaky page) refuses and lists the image, the stylesheet, the fetch and the WebSocket", () => {
    expect(result.blockedRequests).toEqual(
      expect.arrayContaining([
        outside.image,
        outside.stylesheet,
        outside.fetch,
        `${local}/x.png`,
        `${local}/style.css`,
        `${local}/data.json`,
        `${local.replace("http", "ws")}/socket`,
      ]),
    );
  });

  it("renderPdf(leaky page) lets no request reach the server", () => {
    expect(arrived).toEqual([]);
  });

  it("renderPdf(leaky page) still prints it, with no outline since it has no headings", async () => {
    expect(Number(pdfinfo(result.pdf).Pages)).toBe(1);
    expect(await readOutline(result.pdf)).toBeNull();
  });

  it("renderPdf(page without <title>) titles the PDF with the header's model id, not about:blank", () => {
    expect(pdfinfo(result.pdf).Title).toBe(MODEL_ID);
  });

  it("renderPdf(leaky page) removes its Chromium profile", () => {
    expect(readdirSync(profileParent)).toEqual([]);
  });
});

describe("renderPdf(a Chromium that fails to start)", () => {
  it("renderPdf(broken executable) throws PdfRenderError naming the path and removes the profile", async () => {
    const folder = mkdtempSync(join(tmpdir(), "keel-pdf-test-"));
    const fake = join(folder, "chromium");
    writeFileSync(fake, "#!/bin/sh\necho 'this is not a browser' >&2\nexit 1\n");
    chmodSync(fake, 0o755);
    const profileParent = join(folder, "tmp");
    mkdirSync(profileParent);
    try {
      const failure = await withTmpdir(profileParent, () =>
        renderPdf("<p>x</p>", { chromiumPath: fake, paper: "a4", headerLeft: "a", headerRight: "b" }).then(
          () => null,
          (error: unknown) => error,
        ),
      );
      expect(failure).toBeInstanceOf(PdfRenderError);
      expect((failure as Error).message).toContain(`could not start Chromium at ${fake}`);
      expect(readdirSync(profileParent)).toEqual([]);
    } finally {
      rmSync(folder, { recursive: true, force: true });
    }
  });
});

describe("findChromium", () => {
  let folder: string;
  let first: string;
  let second: string;
  let notExecutable: string;

  beforeAll(() => {
    folder = mkdtempSync(join(tmpdir(), "keel-find-chromium-"));
    [first, second, notExecutable] = ["first", "second", "plain"].map((name) => join(folder, name));
    for (const file of [first, second, notExecutable]) writeFileSync(file, "#!/bin/sh\n");
    chmodSync(first, 0o755);
    chmodSync(second, 0o755);
    chmodSync(notExecutable, 0o644);
  });

  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it("findChromium({ KEEL_CHROMIUM }) returns that path ahead of the usual locations", () => {
    expect(findChromium({ [CHROMIUM_ENV]: second }, [first])).toBe(second);
  });

  it("findChromium({ KEEL_CHROMIUM: missing file }) returns null instead of another browser", () => {
    expect(findChromium({ [CHROMIUM_ENV]: join(folder, "missing") }, [first])).toBeNull();
  });

  it("findChromium({}, locations) returns the first executable file in the list", () => {
    expect(findChromium({}, [join(folder, "missing"), notExecutable, folder, first, second])).toBe(first);
  });

  it("findChromium({}, bogus locations) returns null", () => {
    expect(findChromium({}, [join(folder, "missing"), notExecutable, folder])).toBeNull();
  });
});

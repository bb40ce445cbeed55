import { describe, expect, it } from "vitest";
import {
  compileFigure,
  normalizeSvgNumbers,
  renderSvg,
  SVG_DECIMALS,
  stripNamespaces,
  toStandaloneSvg,
} from "../../src/report/render/svg.js";

/** A small chart with awkward numbers and a label that holds markup. */
const chart = () => ({
  width: 200,
  height: 120,
  config: { font: "DejaVu Sans, sans-serif", aria: false },
  data: {
    values: [
      { x: 1 / 3, y: Math.PI, label: "<b>bold</b> & co" },
      { x: 2 / 3, y: Math.E, label: "second" },
    ],
  },
  layer: [
    {
      mark: { type: "line" },
      encoding: { x: { field: "x", type: "quantitative" }, y: { field: "y", type: "quantitative" } },
    },
    {
      mark: { type: "text", dx: 5 },
      encoding: {
        x: { field: "x", type: "quantitative" },
        y: { field: "y", type: "quantitative" },
        text: { field: "label" },
      },
    },
  ],
});

describe("renderSvg", () => {
  it("renderSvg(chart) gives SVG markup without namespace URLs", async () => {
    const svg = await renderSvg(chart());
    expect(svg).toMatch(/^<svg [^>]*width="\d+" height="\d+"/);
    expect(svg.endsWith("</svg>")).toBe(true);
    expect(svg).not.toMatch(/xmlns|http|url\(/);
  });

  it("renderSvg(chart) is byte-identical on a second render", async () => {
    expect(await renderSvg(chart())).toBe(await renderSvg(chart()));
  });

  it("renderSvg(chart) keeps at most SVG_DECIMALS decimals in every coordinate", async () => {
    const svg = await renderSvg(chart());
    const tags = svg.match(/<[^>]+>/g)!.join("\n");
    expect(tags).not.toMatch(new RegExp(`\\d\\.\\d{${SVG_DECIMALS + 1},}`));
  });

  it("renderSvg(chart with a markup label) prints the label as escaped text", async () => {
    const svg = await renderSvg(chart());
    expect(svg).toContain("&lt;b&gt;bold&lt;/b&gt; &amp; co");
    expect(svg).not.toContain("<b>");
  });

  it("renderSvg(chart with a data URL) rejects: the loader fetches nothing", async () => {
    const spec = { ...chart(), data: { url: "http://127.0.0.1:9/data.json" } };
    await expect(renderSvg(spec)).rejects.toThrow(/tried to load/);
  });

  it("renderSvg(chart with an href channel) rejects rather than ship a link", async () => {
    const spec = chart();
    const layer = spec.layer[0] as { mark: unknown; encoding: Record<string, unknown> };
    spec.layer[0] = {
      mark: { type: "point" },
      encoding: { ...layer.encoding, href: { value: "https://example.org" } },
    } as never;
    await expect(renderSvg(spec)).rejects.toThrow(/asks for a link/);
  });

  it("renderSvg(chart) collects vega-lite warnings instead of printing them", async () => {
    const spec = chart();
    (spec.layer[0].encoding as Record<string, unknown>).x = {
      field: "x",
      type: "quantitative",
      aggregate: "no-such-op",
    };
    const diagnostics = { warnings: [] as string[] };
    await renderSvg(spec, diagnostics);
    expect(diagnostics.warnings.join("\n")).toMatch(/no-such-op/);
    const warnings: string[] = [];
    compileFigure(chart(), warnings);
    expect(warnings).toEqual([]);
  });
});

describe("SVG post-processing", () => {
  it("normalizeSvgNumbers(markup) rounds numeric attributes and leaves text content alone", () => {
    const svg =
      '<g transform="translate(39.99999999999999,15.0004)"><text x="1e-7" font-size="10px">3.14159265 widgets</text></g>';
    expect(normalizeSvgNumbers(svg)).toBe(
      '<g transform="translate(40,15)"><text x="0" font-size="10px">3.14159265 widgets</text></g>',
    );
  });

  it("normalizeSvgNumbers(-0.0001) writes 0, never -0", () => {
    expect(normalizeSvgNumbers('<path d="M-0.0001,2.5L1,1"/>')).toBe('<path d="M0,2.5L1,1"/>');
  });

  it("stripNamespaces / toStandaloneSvg remove and restore the SVG namespace", () => {
    const raw =
      '<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="1"></svg>';
    const inline = stripNamespaces(raw);
    expect(inline).toBe('<svg width="1"></svg>');
    expect(toStandaloneSvg(inline)).toBe('<svg xmlns="http://www.w3.org/2000/svg" width="1"></svg>');
  });
});

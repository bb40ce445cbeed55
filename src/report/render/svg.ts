import { compile, type TopLevelSpec } from "vega-lite";
import * as vega from "vega";
import type { LoggerInterface, Spec as VegaSpec } from "vega";
import { vegaTextWidth } from "./textWidth.js";

/**
 * vega-lite spec → vega spec → scenegraph → SVG markup, in Node, with no canvas and no network.
 *
 *   1. compile with vega-lite, collecting its warnings;
 *   2. parse with vega and run a headless View (renderer "none") whose loader refuses every request,
 *      measuring text with our own font table (textWidth.ts) rather than a canvas or a guess;
 *   3. view.toSVG();
 *   4. make the markup fit for inlining in a file that holds no URL, and byte-stable:
 *      drop the namespace attributes, round coordinates to a fixed precision, and refuse any
 *      reference (url(), href, script) rather than ship it.
 */

/** Decimals kept in coordinates and lengths: 1/1000 px, far below what screen or print resolves. */
export const SVG_DECIMALS = 3;

/** Attributes whose values are numbers (or lists, paths, transforms of numbers). */
const NUMERIC_ATTRIBUTES = new Set([
  "d",
  "transform",
  "x",
  "y",
  "x1",
  "x2",
  "y1",
  "y2",
  "cx",
  "cy",
  "r",
  "rx",
  "ry",
  "dx",
  "dy",
  "width",
  "height",
  "viewBox",
  "stroke-width",
  "stroke-dasharray",
  "stroke-dashoffset",
  "stroke-miterlimit",
  "font-size",
  "opacity",
  "fill-opacity",
  "stroke-opacity",
  "points",
]);

/** Markup that would make the page reach out, or run code. */
const FORBIDDEN = [/\bhref\s*=/i, /<script/i, /<foreignObject/i, /<image/i, /\son[a-z]+\s*=/i];

export interface RenderDiagnostics {
  /** Warnings from vega-lite's compiler and from vega, as text. */
  warnings: string[];
}

function collectingLogger(sink: string[], source: string, errors: string[] = sink): LoggerInterface {
  let level = 2; // warnings and errors
  const logger: LoggerInterface = {
    level(l?: number) {
      if (l === undefined) return level as unknown as LoggerInterface;
      level = l;
      return logger;
    },
    error(...args: readonly unknown[]) {
      errors.push(`${source} error: ${args.map(String).join(" ")}`);
      return logger;
    },
    warn(...args: readonly unknown[]) {
      sink.push(`${source}: ${args.map(String).join(" ")}`);
      return logger;
    },
    info() {
      return logger;
    },
    debug() {
      return logger;
    },
  } as LoggerInterface;
  return logger;
}

/**
 * A loader that fetches nothing and notes what was asked: figures carry their data inline, so
 * any request is a bug. (vega only logs a failed load and draws on without the data.) sanitize
 * answers "no link" rather than failing: vega's SVG writer asks it for every href and does not
 * handle a rejection; links are refused before rendering, in renderSvg.
 */
function refusingLoader(requests: string[]) {
  const refuse = (uri: string) => {
    requests.push(String(uri));
    return Promise.reject(new Error(`figure tried to load ${uri}`));
  };
  return { load: refuse, http: refuse, file: refuse, sanitize: () => Promise.resolve({ href: null }) };
}

/** Step 1 alone: the vega spec, with vega-lite's warnings appended to `warnings`. */
export function compileFigure(spec: Record<string, unknown>, warnings: string[] = []): VegaSpec {
  return compile(spec as unknown as TopLevelSpec, { logger: collectingLogger(warnings, "vega-lite") }).spec;
}

function roundNumber(text: string): string {
  const v = Number(text);
  if (!Number.isFinite(v)) return text;
  const r = Number(v.toFixed(SVG_DECIMALS));
  return String(r === 0 ? 0 : r);
}

/** Rounds every number inside the numeric attributes of every tag; text content is left alone. */
export function normalizeSvgNumbers(svg: string): string {
  return svg.replace(/<[^>]+>/g, (tag) =>
    tag.replace(/\s([a-zA-Z-]+)="([^"]*)"/g, (whole, name: string, value: string) =>
      NUMERIC_ATTRIBUTES.has(name)
        ? ` ${name}="${value.replace(/-?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?/gi, roundNumber)}"`
        : whole,
    ),
  );
}

/** Namespace declarations are URLs; an SVG inlined in HTML takes its namespace from the parser. */
export function stripNamespaces(svg: string): string {
  return svg.replace(/\sxmlns(?::[a-z]+)?="[^"]*"/g, "");
}

/** The namespace back on, for an SVG written as a file of its own (a browser will not draw it without). */
export function toStandaloneSvg(inline: string): string {
  return inline.replace(/^<svg\b/, '<svg xmlns="http://www.w3.org/2000/svg"');
}

/** vega's text measurer is a module-level setting (not in its typings); ours is the same for every figure. */
function useOwnTextMetrics(): void {
  const metrics = (vega as unknown as { textMetrics?: { width: unknown } }).textMetrics;
  if (!metrics) throw new Error("vega no longer exports textMetrics: figure layout would depend on a canvas");
  metrics.width = vegaTextWidth;
}

/** vega-lite spec → SVG markup for inlining (no namespace, no URL, no script, fixed precision). */
export async function renderSvg(
  spec: Record<string, unknown>,
  diagnostics: RenderDiagnostics = { warnings: [] },
): Promise<string> {
  const vegaSpec = compileFigure(spec, diagnostics.warnings);
  if (/"href"/.test(JSON.stringify(vegaSpec)))
    throw new Error("figure spec asks for a link (href): figures must hold no URL");
  useOwnTextMetrics();
  const errors: string[] = [];
  const requests: string[] = [];
  const view = new vega.View(vega.parse(vegaSpec), {
    renderer: "none",
    loader: refusingLoader(requests) as never,
    logger: collectingLogger(diagnostics.warnings, "vega", errors),
  });
  try {
    const raw = await view.toSVG();
    if (requests.length) throw new Error(`figure tried to load ${requests.join(", ")}`);
    if (errors.length) throw new Error(`figure did not render cleanly: ${errors.join("; ")}`);
    const svg = normalizeSvgNumbers(stripNamespaces(raw));
    // only markup is checked: text content is escaped, and a label may mention anything
    const rawTags = svg.match(/<[^>]+>/g)?.join("\n") ?? "";
    // a url() reference would sit in an attribute value; the other patterns are markup, so
    // values are left out for them. vega copies label text (escaped, inert) into aria-label,
    // which no renderer follows: a label that mentions url( is text, not a reference
    const referenceValues = rawTags.replace(/aria-label="[^"]*"/g, 'aria-label=""');
    if (/url\(/i.test(referenceValues)) throw new Error("rendered SVG contains forbidden markup url(");
    const tags = rawTags.replace(/"[^"]*"/g, '""');
    for (const pattern of FORBIDDEN) {
      // our figures never ask for these; reaching here is a bug in a figure builder
      if (pattern.test(tags)) throw new Error(`rendered SVG contains forbidden markup ${pattern}`);
    }
    return svg;
  } finally {
    view.finalize();
  }
}

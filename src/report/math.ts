import katex from "katex";
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { dirname, join } from "node:path";

/**
 * Mathematics typeset on the server with KaTeX: synchronous, deterministic, and needing no
 * script in the page; its fonts are inlined below so the dossier stays one self-contained file.
 * Each formula carries MathML as well, for screen readers and for archives.
 */
export function renderMath(tex: string, display = false): string {
  const html = katex.renderToString(tex, {
    displayMode: display,
    output: "htmlAndMathml",
    throwOnError: false,
    strict: "ignore",
    trust: false,
  });
  // the MathML namespace attribute is a URL the HTML parser does not need
  // namespace attributes are URLs the HTML parser does not need (MathML, and SVG in stretchy delimiters)
  return html.replace(/ xmlns="http:\/\/www\.w3\.org\/(1998\/Math\/MathML|2000\/svg)"/g, "");
}

/** Fonts keel's formulas can use (no calligraphic, fraktur, script or typewriter faces). */
const INLINED_FONTS = [
  ["KaTeX_AMS", "normal", "normal", "KaTeX_AMS-Regular"],
  ["KaTeX_Main", "normal", "normal", "KaTeX_Main-Regular"],
  ["KaTeX_Main", "bold", "normal", "KaTeX_Main-Bold"],
  ["KaTeX_Main", "normal", "italic", "KaTeX_Main-Italic"],
  ["KaTeX_Main", "bold", "italic", "KaTeX_Main-BoldItalic"],
  ["KaTeX_Math", "normal", "italic", "KaTeX_Math-Italic"],
  ["KaTeX_Math", "bold", "italic", "KaTeX_Math-BoldItalic"],
  ["KaTeX_Size1", "normal", "normal", "KaTeX_Size1-Regular"],
  ["KaTeX_Size2", "normal", "normal", "KaTeX_Size2-Regular"],
  ["KaTeX_Size3", "normal", "normal", "KaTeX_Size3-Regular"],
  ["KaTeX_Size4", "normal", "normal", "KaTeX_Size4-Regular"],
] as const;

let cachedCss: string | null = null;

/** KaTeX's stylesheet with its font files inlined as data URIs (and no other URL). */
export function mathStylesheet(): string {
  if (cachedCss) return cachedCss;
  const require = createRequire(import.meta.url);
  const dist = dirname(require.resolve("katex/dist/katex.css"));
  const css = readFileSync(join(dist, "katex.css"), "utf8")
    .replace(/\/\*[\s\S]*?\*\//g, "")
    .replace(/@font-face\s*\{[^}]*\}/g, "");
  const faces = INLINED_FONTS.map(([family, weight, style, file]) => {
    const data = readFileSync(join(dist, "fonts", `${file}.woff2`)).toString("base64");
    return `@font-face{font-family:${family};font-weight:${weight};font-style:${style};src:url(data:font/woff2;base64,${data}) format("woff2")}`;
  });
  cachedCss = faces.join("\n") + "\n" + css;
  return cachedCss;
}

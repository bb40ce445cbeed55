/**
 * Static checks of a dossier's markup (HTML, and the SVG figures beside it): nothing in it runs,
 * loads or links out (OWASP Cross-Site Scripting Prevention Cheat Sheet: script elements, event
 * handler attributes, javascript: URLs, CSS url( and @import), and no raw control, bidirectional or
 * zero-width character survives (README "Limits": they are shown as ⟨U+XXXX⟩).
 */

import { codePointName, firstIn, INVISIBLE_IN_MARKUP } from "./chars.js";

const TAG = /<([a-zA-Z][\w:.-]*)((?:[^>"']|"[^"]*"|'[^']*')*)>/g;
const ATTRIBUTE = /([^\s"'>/=]+)(?:\s*=\s*(?:"([^"]*)"|'([^']*)'|([^\s>]+)))?/g;
const STYLE_BLOCK = /<style[^>]*>([\s\S]*?)<\/style>/gi;
/** Attributes a browser follows as a URL (HTML Living Standard; SVG 2 for xlink:href). */
const URL_ATTRIBUTES = new Set([
  "href",
  "src",
  "xlink:href",
  "action",
  "formaction",
  "data",
  "srcset",
  "background",
  "poster",
  "ping",
  "manifest",
  "cite",
]);
/** Attributes whose value a browser may follow as a script URL: the URL ones, CSS, SVG animation values. */
const SCRIPT_URL_ATTRIBUTES = new Set([...URL_ATTRIBUTES, "style", "values", "to", "from", "by"]);
/** Elements that load or navigate on their own. */
const LOADING_ELEMENTS = new Set([
  "script",
  "iframe",
  "frame",
  "object",
  "embed",
  "link",
  "base",
  "applet",
  "portal",
  "img",
  "audio",
  "video",
  "source",
  "form",
]);
/**
 * Invisible characters KaTeX writes itself (keel's markup, not user text, which arrives escaped
 * and so can never form these tags): the zero-width space that struts its vertical lists, and
 * U+2061 FUNCTION APPLICATION after an operator name such as max or tanh in its MathML, as
 * MathML 3 §3.2.5.5 recommends.
 */
const KATEX_OWN = /<span class="vlist-s">\u200b<\/span>|<mo>\u2061<\/mo>/g;

const decodeEntities = (s: string): string =>
  s
    .replace(/&#x([0-9a-f]+);?/gi, (_, h: string) => String.fromCodePoint(parseInt(h, 16)))
    .replace(/&#(\d+);?/g, (_, d: string) => String.fromCodePoint(Number(d)))
    .replace(/&colon;/gi, ":")
    .replace(/&quot;/g, '"')
    .replace(/&apos;/g, "'")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&amp;/g, "&");

/** A CSS text's url( and @import that reach outside the document (keel inlines its fonts as data:). */
function cssProblems(css: string, where: string): string[] {
  const problems: string[] = [];
  for (const m of css.matchAll(/url\(\s*(['"]?)([^)'"]*)/gi))
    if (!/^(data:|#)/i.test(m[2])) problems.push(`${where}: url(${m[2].slice(0, 60)})`);
  if (/@import/i.test(css)) problems.push(`${where}: @import`);
  if (/expression\s*\(/i.test(css)) problems.push(`${where}: expression(`);
  return problems;
}

function tagProblems(tag: string, attributes: string): string[] {
  const problems: string[] = [];
  const name = tag.toLowerCase();
  if (LOADING_ELEMENTS.has(name)) problems.push(`<${name}> element`);
  if (name === "meta" && /http-equiv/i.test(attributes)) problems.push("<meta http-equiv>");
  for (const m of attributes.matchAll(ATTRIBUTE)) {
    const attr = m[1].toLowerCase();
    const value = decodeEntities(m[2] ?? m[3] ?? m[4] ?? "");
    if (attr.startsWith("on")) problems.push(`<${name} ${attr}=…> event handler`);
    if (URL_ATTRIBUTES.has(attr) && !/^(#|data:image\/|$)/i.test(value.trim()))
      problems.push(`<${name} ${attr}="${value.slice(0, 60)}">`);
    if (attr === "style") problems.push(...cssProblems(value, `<${name} style>`));
    // only where a browser reads the value as a URL or CSS: in an id or aria-label it is inert text
    if (SCRIPT_URL_ATTRIBUTES.has(attr) && /javascript:|vbscript:/i.test(value.replace(/\s/g, "")))
      problems.push(`<${name} ${attr}> holds a script URL`);
  }
  return problems;
}

/** Every problem found in one file's markup, each a short description. */
export function markupProblems(markup: string, file: string): string[] {
  const problems: string[] = [];
  if (/<script/i.test(markup)) problems.push("<script");
  for (const m of markup.matchAll(TAG)) problems.push(...tagProblems(m[1], m[2]));
  for (const m of markup.matchAll(STYLE_BLOCK)) problems.push(...cssProblems(m[1], "<style>"));
  const invisible = firstIn(markup.replace(KATEX_OWN, ""), INVISIBLE_IN_MARKUP);
  if (invisible) problems.push(`raw ${codePointName(invisible)}`);
  return [...new Set(problems)].map((p) => `${file}: ${p}`);
}

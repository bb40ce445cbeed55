/**
 * Sets of characters the checks look for, as code-point ranges tested one character at a time
 * rather than as regular-expression classes (a class of raw controls is what no-control-regex
 * rejects, and a range list is easier to read and to share).
 */

/** Inclusive [first, last] code-point ranges. */
export type CodePointRanges = readonly (readonly [number, number])[];

/** C0 controls but tab, LF and CR (those three are ordinary text layout). */
const C0_BUT_LAYOUT: CodePointRanges = [
  [0x00, 0x08],
  [0x0b, 0x0c],
  [0x0e, 0x1f],
];
/** DEL and the C1 controls. */
const DEL_AND_C1: CodePointRanges = [[0x7f, 0x9f]];
/** Zero-width space, non-joiner, joiner; LRM, RLM. */
const ZERO_WIDTH_AND_MARKS: CodePointRanges = [[0x200b, 0x200f]];
/** Bidirectional embeddings and overrides, and isolates (CVE-2021-42574). */
const BIDI: CodePointRanges = [
  [0x202a, 0x202e],
  [0x2066, 0x2069],
];

/** Raw characters that act on a terminal or reorder its text; keel writes them as ⟨U+XXXX⟩. */
export const TERMINAL_ACTIVE: CodePointRanges = [
  ...C0_BUT_LAYOUT,
  ...DEL_AND_C1,
  ...ZERO_WIDTH_AND_MARKS,
  ...BIDI,
];

/** What must not stay raw in a dossier's markup: the above, line/paragraph separators, invisible operators, BOM. */
export const INVISIBLE_IN_MARKUP: CodePointRanges = [
  ...TERMINAL_ACTIVE,
  [0x2028, 0x2029],
  [0x2060, 0x2064],
  [0xfeff, 0xfeff],
];

/** What a case name must not print raw in a report: every control (layout too), and the invisible ones. */
export const UNPRINTABLE_IN_NAME: CodePointRanges = [
  [0x00, 0x1f],
  ...DEL_AND_C1,
  ...ZERO_WIDTH_AND_MARKS,
  [0x2028, 0x202e],
  [0x2060, 0x2069],
  [0xfeff, 0xfeff],
];

const inRanges = (cp: number, ranges: CodePointRanges): boolean =>
  ranges.some(([first, last]) => cp >= first && cp <= last);

/** The first character of `text` in `ranges`, or null. */
export function firstIn(text: string, ranges: CodePointRanges): string | null {
  for (const ch of text) if (inRanges(ch.codePointAt(0)!, ranges)) return ch;
  return null;
}

/** `text` with every character in `ranges` replaced by `replace(ch)`. */
export function replaceIn(text: string, ranges: CodePointRanges, replace: (ch: string) => string): string {
  let out = "";
  for (const ch of text) out += inRanges(ch.codePointAt(0)!, ranges) ? replace(ch) : ch;
  return out;
}

/** "U+00E9" for "é". */
export const codePointName = (ch: string): string =>
  `U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}`;

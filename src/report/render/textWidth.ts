/**
 * Text widths for layout, without a canvas. vega sizes a figure from the bounds of its text;
 * with no canvas it guesses 0.8 em per character, which for our font is a third too wide, so
 * figures came out wider than their plots and keys. Here: the advance widths of DejaVu Sans, the
 * font every figure names first. The table only places and sizes things; the viewer's font draws
 * the glyphs. Fixed numbers also make the layout independent of whether a canvas package happens
 * to be installed.
 *
 * Advance widths in font units (2048 per em) of DejaVu Sans Book, from memory; the test compares
 * them with the font's own hmtx table when the font is installed. Characters not listed take
 * a typical lower-case advance.
 */
const UNITS_PER_EM = 2048;
const DEFAULT_ADVANCE = 1253;
/** DejaVu Sans Bold runs about this much wider than Book (mean over lower-case letters and digits). */
const BOLD_FACTOR = 1.13;

const ADVANCE: Record<string, number> = {
  " ": 651,
  "0": 1303,
  "1": 1303,
  "2": 1303,
  "3": 1303,
  "4": 1303,
  "5": 1303,
  "6": 1303,
  "7": 1303,
  "8": 1303,
  "9": 1303,
  a: 1255,
  b: 1300,
  c: 1126,
  d: 1300,
  e: 1260,
  f: 721,
  g: 1300,
  h: 1298,
  i: 569,
  j: 569,
  k: 1186,
  l: 569,
  m: 1995,
  n: 1298,
  o: 1253,
  p: 1300,
  q: 1300,
  r: 842,
  s: 1067,
  t: 803,
  u: 1298,
  v: 1212,
  w: 1675,
  x: 1212,
  y: 1212,
  z: 1075,
  A: 1401,
  B: 1405,
  C: 1430,
  D: 1577,
  E: 1294,
  F: 1178,
  G: 1587,
  H: 1540,
  I: 604,
  J: 604,
  K: 1343,
  L: 1141,
  M: 1767,
  N: 1532,
  O: 1612,
  P: 1235,
  Q: 1612,
  R: 1423,
  S: 1300,
  T: 1251,
  U: 1499,
  V: 1401,
  W: 2025,
  X: 1403,
  Y: 1251,
  Z: 1403,
  ".": 651,
  ",": 651,
  ":": 690,
  ";": 690,
  "(": 799,
  ")": 799,
  "[": 799,
  "]": 799,
  "{": 1303,
  "}": 1303,
  "-": 739,
  "/": 690,
  "\\": 690,
  "|": 690,
  _: 1024,
  "'": 563,
  '"': 942,
  "!": 821,
  "?": 1087,
  "&": 1597,
  "%": 1946,
  "*": 1024,
  "#": 1716,
  "=": 1716,
  "+": 1716,
  "<": 1716,
  ">": 1716,
  "^": 1716,
  "~": 1716,
  "\u2212": 1716,
  "\u00d7": 1716,
  "\u2026": 2048,
  "\u00b2": 821,
  "\u2081": 821,
  "\u2082": 821,
  "\u03c4": 1233,
  "\u0394": 1401,
  "\u03bb": 1212,
  "\u03c1": 1300,
};

export function textWidthPx(text: string, fontSize: number, bold = false): number {
  let units = 0;
  for (const ch of text) units += ADVANCE[ch] ?? DEFAULT_ADVANCE;
  return (units / UNITS_PER_EM) * fontSize * (bold ? BOLD_FACTOR : 1);
}

/** The shape vega's textMetrics.width expects: (item, text) → px. */
export function vegaTextWidth(
  item: { fontSize?: number; fontWeight?: string | number },
  text: string,
): number {
  const size = item.fontSize != null ? +item.fontSize || 0 : 11;
  const weight = item.fontWeight;
  const bold =
    weight === "bold" ||
    (typeof weight === "number" && weight >= 600) ||
    weight === "600" ||
    weight === "700";
  return textWidthPx(text == null ? "" : String(text), size, bold);
}

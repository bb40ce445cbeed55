import { lineLayer, positionEncoding, symbolLayer, symbolRow, type SymbolRow } from "./layers.js";
import { ARROWHEAD_PATH, ARROWHEAD_SIZE, FIELD_ARROW_PATH, FIELD_ARROW_SIZE, FIELD_STYLE, FONT_SIZE, INK, KEY_WIDTH, START_MARKER, type LineStyle, type MarkerStyle } from "./palette.js";

/**
 * A figure's key, drawn as its own small view from the palette entries the marks use: one row
 * per colour, dash and shape in the figure, each with a sample of the mark and its meaning.
 */
export type KeyEntry =
  | { kind: "line"; style: LineStyle; start?: boolean; head?: boolean }
  | { kind: "symbol"; marker: MarkerStyle }
  | { kind: "field" };

/** px between rows, and from the top to the first row. */
const ROW = 19;
const TOP = 10;
/** px between the lines of a wrapped label. */
const LINE_HEIGHT = 12;
const SAMPLE = [4, 30] as const;
const TEXT_X = 36;
/**
 * Characters per key line: the text column's width over 5.9 px, about the mean advance of
 * DejaVu Sans at 10 px in running text (from memory; checked by eye on rendered keys).
 * Longer labels wrap at spaces rather than run off the figure.
 */
const LINE_CHARS = Math.floor((KEY_WIDTH - TEXT_X) / 5.9);

/** Greedy word wrap; a single word longer than a line stays whole. */
export function wrapLabel(text: string, width = LINE_CHARS): string[] {
  const lines: string[] = [];
  let line = "";
  for (const word of text.split(/\s+/).filter(Boolean)) {
    if (line && line.length + 1 + word.length > width) { lines.push(line); line = word; }
    else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines.length ? lines : [""];
}

export function buildKey(entries: KeyEntry[], height: number) {
  const enc = {
    x: positionEncoding("x", [0, KEY_WIDTH], null, null),
    y: positionEncoding("y", [0, height], null, null),
  };
  const layers: Record<string, unknown>[] = [];
  const symbols: SymbolRow[] = [];
  const texts: { x: number; y: number; text: string[] }[] = [];
  const mid = (SAMPLE[0] + SAMPLE[1]) / 2;
  let y = height - TOP + ROW;
  let lines = 1;
  const label = (text: string) => {
    const wrapped = wrapLabel(text);
    // top of the first line half a font size above the sample's centre line
    texts.push({ x: TEXT_X, y: y + FONT_SIZE.legend / 2 + 1, text: wrapped });
    lines = wrapped.length;
  };
  entries.forEach((entry, k) => {
    y -= ROW + (lines - 1) * LINE_HEIGHT;
    if (entry.kind === "line") {
      const rows = SAMPLE.map((x, i) => ({ x, y, k: `key${k}`, i }));
      layers.push(lineLayer(`key_line_${k}`, rows, entry.style, enc));
      if (entry.start) symbols.push(symbolRow(SAMPLE[0], y, { ...START_MARKER, angle: 0, fill: entry.style.color, stroke: entry.style.color, strokeWidth: 0 }, "start"));
      if (entry.head) symbols.push(symbolRow(mid + 2, y, { shape: ARROWHEAD_PATH, angle: 90, fill: entry.style.color, stroke: entry.style.color, strokeWidth: 0, size: ARROWHEAD_SIZE }, "direction"));
      label(entry.style.label);
    } else if (entry.kind === "symbol") {
      symbols.push(symbolRow(mid, y, entry.marker, entry.marker.label));
      label(entry.marker.label);
    } else {
      symbols.push(symbolRow(mid, y, { shape: FIELD_ARROW_PATH, angle: 90, fill: "transparent", stroke: FIELD_STYLE.color, strokeWidth: FIELD_STYLE.strokeWidth, size: FIELD_ARROW_SIZE }, "field"));
      label(FIELD_STYLE.label);
    }
  });
  if (symbols.length) layers.push(symbolLayer("key_symbols", symbols, enc));
  layers.push({
    name: "key_text",
    data: { values: texts },
    mark: { type: "text", align: "left", baseline: "top", fontSize: FONT_SIZE.legend, lineHeight: LINE_HEIGHT, color: INK },
    encoding: { ...enc, text: { field: "text", type: "nominal" } },
  });
  return { width: KEY_WIDTH, height, view: { stroke: null }, layer: layers };
}

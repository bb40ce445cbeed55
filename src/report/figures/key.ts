import { lineLayer, positionEncoding, symbolLayer, symbolRow, textLayer, type SymbolRow } from "./layers.js";
import {
  arrowheadMarker,
  fieldArrowMarker,
  FIELD_STYLE,
  FONT_SIZE,
  INK,
  KEY_WIDTH,
  startMarker,
  type LineStyle,
  type MarkerStyle,
} from "./palette.js";

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
    if (line && line.length + 1 + word.length > width) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines.length ? lines : [""];
}

/** One row of the key: its entry, the y of its sample (key coordinates, upward) and its wrapped label. */
interface KeyRow {
  entry: KeyEntry;
  y: number;
  lines: string[];
}

const entryLabel = (entry: KeyEntry): string =>
  entry.kind === "line"
    ? entry.style.label
    : entry.kind === "symbol"
      ? entry.marker.label
      : FIELD_STYLE.label;

/** Rows from the top down; a row sits lower by the extra lines of the label above it. */
function layoutKeyRows(entries: KeyEntry[], height: number): KeyRow[] {
  let y = height - TOP + ROW;
  let lines = 1;
  return entries.map((entry) => {
    y -= ROW + (lines - 1) * LINE_HEIGHT;
    const wrapped = wrapLabel(entryLabel(entry));
    lines = wrapped.length;
    return { entry, y, lines: wrapped };
  });
}

const SAMPLE_MID = (SAMPLE[0] + SAMPLE[1]) / 2;

/** The symbols of a row's sample: a line's start marker and arrowhead, a marker, a field arrow. */
function sampleSymbols({ entry, y }: KeyRow): SymbolRow[] {
  if (entry.kind === "symbol") return [symbolRow(SAMPLE_MID, y, entry.marker, entry.marker.label)];
  if (entry.kind === "field") return [symbolRow(SAMPLE_MID, y, fieldArrowMarker(90), "field")];
  const color = entry.style.color;
  return [
    ...(entry.start ? [symbolRow(SAMPLE[0], y, startMarker(color), "start")] : []),
    ...(entry.head ? [symbolRow(SAMPLE_MID + 2, y, arrowheadMarker(color, 90), "direction")] : []),
  ];
}

function sampleLines(rows: KeyRow[], enc: Record<string, unknown>) {
  return rows.flatMap(({ entry, y }, k) =>
    entry.kind === "line"
      ? [
          lineLayer(
            `key_line_${k}`,
            SAMPLE.map((x, i) => ({ x, y, k: `key${k}`, i })),
            entry.style,
            enc,
          ),
        ]
      : [],
  );
}

function labelTextLayer(rows: KeyRow[], enc: Record<string, unknown>) {
  // top of the first line half a font size above the sample's centre line
  const texts = rows.map(({ y, lines }) => ({ x: TEXT_X, y: y + FONT_SIZE.legend / 2 + 1, text: lines }));
  const mark = {
    align: "left",
    baseline: "top",
    fontSize: FONT_SIZE.legend,
    lineHeight: LINE_HEIGHT,
    color: INK,
  };
  return textLayer("key_text", texts, mark, enc);
}

/** The key as a view of `height` px: line samples, then every symbol, then the labels. */
export function buildKey(entries: KeyEntry[], height: number) {
  const enc = {
    x: positionEncoding("x", [0, KEY_WIDTH], null, null),
    y: positionEncoding("y", [0, height], null, null),
  };
  const rows = layoutKeyRows(entries, height);
  const symbols = rows.flatMap(sampleSymbols);
  const layers = [
    ...sampleLines(rows, enc),
    ...(symbols.length ? [symbolLayer("key_symbols", symbols, enc)] : []),
    labelTextLayer(rows, enc),
  ];
  return { width: KEY_WIDTH, height, view: { stroke: null }, layer: layers };
}

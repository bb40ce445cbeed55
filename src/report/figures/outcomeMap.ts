import type { OutcomeMapResult } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { textWidthPx } from "../render/textWidth.js";
import { markerBox, placeLabels, roundData, toPlot, type PlotFrame, type ScreenBox } from "./geometry.js";
import { buildKey, type KeyEntry } from "./key.js";
import {
  keyedFigure,
  labelLayers,
  lineLayer,
  parameterAxisTitle,
  pathRows,
  positionEncoding,
  symbolLayer,
  symbolRow,
  type VegaLiteSpec,
} from "./layers.js";
import { cellLayer, regionCellRows, swatch } from "./cells.js";
import {
  FONT_SIZE,
  INK,
  NOMINAL_COLOR,
  NOMINAL_MARKER,
  OUTCOME_MAP_PLOT,
  PAPER,
  REGION_FILLS,
  THRESHOLD_CURVE_STYLES,
} from "./palette.js";

/**
 * Two-parameter outcome map: each grid cell filled by the outcome at its centre (outcomes named
 * A, B, C… in the key and in the regions; the caption spells each out), the threshold curves
 * over it, dashed by kind, and the current values as a star.
 */

/** Curve kinds in key order. */
const CURVE_KINDS = ["saddle-node", "transcritical", "hopf", "boundary-crossing"];
/** Halo under region letters (px), as under other labels. */
const LETTER_HALO = 3;
const LETTER_SIZE = 12;

/** "A", "B", … "Z", then "AA", "AB", …: the names of the outcomes, in legend order. */
export function outcomeLetter(index: number): string {
  return index < 26
    ? String.fromCharCode(65 + index)
    : outcomeLetter(Math.floor(index / 26) - 1) + String.fromCharCode(65 + (index % 26));
}

export function outcomeMapFrame(map: OutcomeMapResult): PlotFrame {
  return {
    lo: [map.ranges[0][0], map.ranges[1][0]],
    hi: [map.ranges[0][1], map.ranges[1][1]],
    ...OUTCOME_MAP_PLOT,
  };
}

/** Fills by legend index; more outcomes than fills reuse them in turn (the letters still tell them apart). */
export const outcomeFills = (map: OutcomeMapResult) =>
  map.legend.map((_, k) => REGION_FILLS[k % REGION_FILLS.length]);

/**
 * Where each outcome's letter goes: the centre of its cell farthest (on screen) from any cell of
 * another outcome, from the plot's edge and from the star; first in row order on ties.
 */
export function letterPositions(
  frame: PlotFrame,
  map: OutcomeMapResult,
): { index: number; x: number; y: number }[] {
  const cx = (a: number) => frame.lo[0] + ((a + 0.5) / map.nx) * (frame.hi[0] - frame.lo[0]);
  const cy = (b: number) => frame.lo[1] + ((b + 0.5) / map.ny) * (frame.hi[1] - frame.lo[1]);
  const screen = map.cells.map((_, c) => toPlot(frame, cx(c % map.nx), cy(Math.floor(c / map.nx))));
  const star = toPlot(frame, map.nominal[0], map.nominal[1]);
  const best = new Map<number, { c: number; d: number }>();
  map.cells.forEach((label, c) => {
    const [u, v] = screen[c];
    let d = Math.min(u, frame.width - u, v, frame.height - v, Math.hypot(u - star[0], v - star[1]));
    for (let o = 0; o < map.cells.length; o++) {
      if (map.cells[o] !== label) d = Math.min(d, Math.hypot(screen[o][0] - u, screen[o][1] - v));
    }
    const held = best.get(label);
    if (!held || d > held.d) best.set(label, { c, d });
  });
  return [...best.entries()]
    .sort(([a], [b]) => a - b)
    .map(([index, { c }]) => ({
      index,
      x: roundData(cx(c % map.nx)),
      y: roundData(cy(Math.floor(c / map.nx))),
    }));
}

export function buildOutcomeMapFigure(spec: NormalizedSpec, map: OutcomeMapResult): VegaLiteSpec {
  const [p1, p2] = map.parameters.map((n) => spec.parameters.find((p) => p.name === n)!);
  const frame = outcomeMapFrame(map);
  const enc = {
    x: positionEncoding("x", [frame.lo[0], frame.hi[0]], parameterAxisTitle(p1), { tickCount: 6 }),
    y: positionEncoding("y", [frame.lo[1], frame.hi[1]], parameterAxisTitle(p2), { tickCount: 6 }),
  };
  const fills = outcomeFills(map);
  const names = map.legend.map((_, k) => `outcome ${outcomeLetter(k)}`);
  const layers: Record<string, unknown>[] = [
    cellLayer("cells", regionCellRows(frame, map, names, fills, false), enc),
  ];
  const key: KeyEntry[] = map.legend.map((_, k): KeyEntry => ({
    kind: "symbol",
    marker: swatch(fills[k], names[k]),
  }));

  const kinds = [
    ...CURVE_KINDS,
    ...new Set(map.curves.map((c) => c.kind).filter((k) => !CURVE_KINDS.includes(k))),
  ];
  for (const kind of kinds) {
    const style = THRESHOLD_CURVE_STYLES[kind] ?? THRESHOLD_CURVE_STYLES["boundary-crossing"];
    const paths = map.curves
      .map((c, k) => ({ c, k }))
      .filter(({ c }) => c.kind === kind)
      .map(({ c, k }) => ({
        key: `curve${k}`,
        line: { x: c.points.map((p) => p[0]), y: c.points.map((p) => p[1]) },
      }));
    const rows = pathRows(frame, paths);
    if (!rows.length) continue;
    layers.push(lineLayer(`curves_${kind}`, rows, style, enc));
    key.push({ kind: "line", style });
  }

  const letters = letterPositions(frame, map);
  const letterRows = letters.map((l) => ({ x: l.x, y: l.y, text: outcomeLetter(l.index) }));
  const letterMark = {
    type: "text",
    align: "center",
    baseline: "middle",
    fontSize: LETTER_SIZE,
    fontWeight: "bold",
    color: INK,
  };
  const letterEnc = { ...enc, text: { field: "text", type: "nominal" } };
  layers.push({
    name: "letters_halo",
    data: { values: letterRows },
    mark: { ...letterMark, color: PAPER, stroke: PAPER, strokeWidth: LETTER_HALO, strokeJoin: "round" },
    encoding: letterEnc,
  });
  layers.push({ name: "letters", data: { values: letterRows }, mark: letterMark, encoding: letterEnc });

  const [n1, n2] = map.nominal;
  const inside = n1 >= frame.lo[0] && n1 <= frame.hi[0] && n2 >= frame.lo[1] && n2 <= frame.hi[1];
  if (inside) {
    const star = symbolRow(n1, n2, NOMINAL_MARKER, "now");
    layers.push(symbolLayer("now", [star], enc));
    const occupied: ScreenBox[] = [
      markerBox(frame, star.x, star.y),
      ...letterRows.map((l) => markerBox(frame, l.x, l.y)),
    ];
    const label = placeLabels(
      frame,
      [{ x: star.x, y: star.y, text: "now" }],
      (t) => textWidthPx(t, FONT_SIZE.annotation),
      occupied,
    );
    layers.push(...labelLayers("now_label", label, enc, { color: NOMINAL_COLOR, fontStyle: "italic" }));
    key.push({ kind: "symbol", marker: NOMINAL_MARKER });
  }
  return keyedFigure(
    { width: frame.width, height: frame.height, layer: layers },
    buildKey(key, frame.height),
  );
}

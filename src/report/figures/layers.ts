import { formatUnit } from "../format.js";
import type { NormalizedParameter, NormalizedState } from "../../spec/types.js";
import { drawablePieces, roundData, type PlacedLabel, type PlotFrame, type Polyline } from "./geometry.js";
import { figureConfig, FONT_SIZE, INK, PAPER, type LineStyle, type MarkerStyle } from "./palette.js";

/**
 * Small constructors for vega-lite layers. Every layer carries its own inline data and constant
 * styling (no colour scales, no legends from vega-lite): the figure's key is drawn by key.ts from
 * the same palette entries, so the key and the marks cannot disagree.
 */

/** A vega-lite spec as plain JSON: inline data only, no URLs. */
export type VegaLiteSpec = Record<string, unknown>;

export interface LineRow {
  x: number;
  y: number;
  k: string;
  i: number;
}
export interface SymbolRow {
  x: number;
  y: number;
  shape: string;
  angle: number;
  fill: string;
  stroke: string;
  strokeWidth: number;
  size: number;
  /** What the mark is (an equilibrium id, a scenario name), for tests and users reading the spec. */
  what: string;
}
export interface TextRow {
  x: number;
  y: number;
  text: string;
}

/** Axis title for a state: its label and name, then its unit. */
export function stateAxisTitle(state: NormalizedState): string {
  const head = state.label && state.label !== state.name ? `${state.label}, ${state.name}` : state.name;
  return state.unit ? `${head} (${formatUnit(state.unit)})` : head;
}

export function parameterAxisTitle(p: Pick<NormalizedParameter, "name" | "label" | "unit">): string {
  const head = p.label && p.label !== p.name ? `${p.label}, ${p.name}` : p.name;
  return p.unit ? `${head} (${formatUnit(p.unit)})` : head;
}

export function positionEncoding(
  field: "x" | "y",
  domain: [number, number],
  title: string | null,
  axis: Record<string, unknown> | null = {},
) {
  return {
    field,
    type: "quantitative",
    scale: { domain, nice: false, zero: false },
    axis: axis === null ? null : { title, ...axis },
  };
}

export function lineRows(key: string, line: Polyline): LineRow[] {
  return line.x.map((x, i) => ({ x: roundData(x), y: roundData(line.y[i]), k: key, i }));
}

/** Rows for every drawable (clipped, thinned) piece of each keyed path. */
export function pathRows(frame: PlotFrame, paths: { key: string; line: Polyline }[]): LineRow[] {
  return paths.flatMap(({ key, line }) =>
    drawablePieces(frame, line).flatMap((piece, p) => lineRows(`${key}#${p}`, piece)),
  );
}

export function lineLayer(
  name: string,
  rows: LineRow[],
  style: Omit<LineStyle, "label">,
  encoding: Record<string, unknown>,
  interpolate = "linear",
) {
  return {
    name,
    data: { values: rows },
    mark: {
      type: "line",
      color: style.color,
      strokeWidth: style.strokeWidth,
      ...(style.strokeDash.length ? { strokeDash: style.strokeDash } : {}),
      strokeCap: "round",
      strokeJoin: "round",
      interpolate,
    },
    encoding: {
      ...encoding,
      detail: { field: "k", type: "nominal" },
      order: { field: "i", type: "quantitative" },
    },
  };
}

/** The line layer of the drawable pieces of keyed paths, or null when none is left to draw. */
export function pathLayer(
  name: string,
  frame: PlotFrame,
  paths: { key: string; line: Polyline }[],
  style: Omit<LineStyle, "label">,
  encoding: Record<string, unknown>,
  interpolate = "linear",
): Record<string, unknown> | null {
  const rows = pathRows(frame, paths);
  return rows.length ? lineLayer(name, rows, style, encoding, interpolate) : null;
}

/** A text layer: each row's `text` drawn at (x, y) with one constant mark style. */
export function textLayer(
  name: string,
  rows: { x: number; y: number; text: string | string[] }[],
  mark: Record<string, unknown>,
  encoding: Record<string, unknown>,
) {
  return {
    name,
    data: { values: rows },
    mark: { type: "text", ...mark },
    encoding: { ...encoding, text: { field: "text", type: "nominal" } },
  };
}

/** A stacked panel's title, at its top left: it names the state and its unit. */
export function panelTitle(text: string) {
  return {
    text,
    anchor: "start",
    frame: "group",
    fontSize: FONT_SIZE.axisTitle,
    fontWeight: "normal",
    color: INK,
    offset: 4,
  };
}

/** The whole figure: the plot (or stacked panels) with its key to the right. */
export function keyedFigure(plot: VegaLiteSpec, key: VegaLiteSpec): VegaLiteSpec {
  return { config: figureConfig(), padding: 6, hconcat: [plot, key] };
}

export function symbolRow(x: number, y: number, marker: Omit<MarkerStyle, "label">, what: string): SymbolRow {
  const { shape, angle, fill, stroke, strokeWidth, size } = marker;
  return { x: roundData(x), y: roundData(y), shape, angle, fill, stroke, strokeWidth, size, what };
}

/** Symbols styled per row: each channel reads its value straight from the datum (scale: null). */
export function symbolLayer(name: string, rows: SymbolRow[], encoding: Record<string, unknown>) {
  const raw = (field: string, type: string) => ({ field, type, scale: null });
  return {
    name,
    data: { values: rows },
    mark: { type: "point", filled: true, opacity: 1 },
    encoding: {
      ...encoding,
      shape: raw("shape", "nominal"),
      angle: raw("angle", "quantitative"),
      fill: raw("fill", "nominal"),
      stroke: raw("stroke", "nominal"),
      strokeWidth: raw("strokeWidth", "quantitative"),
      size: raw("size", "quantitative"),
    },
  };
}

/** px of paper-coloured outline under label text, so labels stay legible over arrows and lines. */
const HALO_WIDTH = 3;

/** Placed labels as text layers, one per alignment (vega-lite has no align channel), each over a paper-coloured halo. */
export function labelLayers(
  name: string,
  placed: PlacedLabel[],
  encoding: Record<string, unknown>,
  mark: Record<string, unknown> = {},
) {
  return (["left", "right"] as const)
    .map((side) => ({
      side,
      rows: placed.filter((p) => p.align === side).map(({ x, y, text }): TextRow => ({ x, y, text })),
    }))
    .filter(({ rows }) => rows.length > 0)
    .flatMap(({ side, rows }) => {
      const text = {
        type: "text",
        align: side,
        baseline: "middle",
        fontSize: FONT_SIZE.annotation,
        color: INK,
        ...mark,
      };
      const enc = { ...encoding, text: { field: "text", type: "nominal" } };
      return [
        {
          name: `${name}_${side}_halo`,
          data: { values: rows },
          mark: { ...text, color: PAPER, stroke: PAPER, strokeWidth: HALO_WIDTH, strokeJoin: "round" },
          encoding: enc,
        },
        { name: `${name}_${side}`, data: { values: rows }, mark: text, encoding: enc },
      ];
    });
}

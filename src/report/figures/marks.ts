import type { CycleResult, EquilibriumResult } from "../../analysis/types.js";
import type { NormalizedState } from "../../spec/types.js";
import { textWidthPx } from "../render/textWidth.js";
import { placeLabels, type PlacedLabel, type PlotFrame, type ScreenBox } from "./geometry.js";
import type { KeyEntry } from "./key.js";
import { pathLayer, positionEncoding, stateAxisTitle, symbolRow, type SymbolRow } from "./layers.js";
import {
  classifyForDrawing,
  EQUILIBRIUM_CLASSES,
  EQUILIBRIUM_MARKERS,
  FONT_SIZE,
  LINE_STYLES,
} from "./palette.js";

/**
 * Marks drawn the same way in several figures: equilibria by class with bold labels and their
 * key rows (portrait, basin map, trace–determinant diagram), periodic orbits by stability and the
 * state-window axes (portrait, basin map).
 */

/** Axes of the state window: few x ticks, since labels like "60,000" need the room. */
export function stateWindowEncoding(frame: PlotFrame, [sa, sb]: NormalizedState[]) {
  return {
    x: positionEncoding("x", [frame.lo[0], frame.hi[0]], stateAxisTitle(sa), { tickCount: 4 }),
    y: positionEncoding("y", [frame.lo[1], frame.hi[1]], stateAxisTitle(sb), { tickCount: 6 }),
  };
}

/** The equilibria whose point (states x, y) lies in the window. */
export function equilibriaInWindow(frame: PlotFrame, equilibria: EquilibriumResult[], [x, y]: string[]) {
  return equilibria.filter((e) => {
    const u = e.point[x],
      v = e.point[y];
    return u >= frame.lo[0] && u <= frame.hi[0] && v >= frame.lo[1] && v <= frame.hi[1];
  });
}

/** A marker row per equilibrium at its point (states x, y), shaped by its class. */
export const equilibriumRows = (equilibria: EquilibriumResult[], [x, y]: string[]): SymbolRow[] =>
  equilibria.map((e) => symbolRow(e.point[x], e.point[y], EQUILIBRIUM_MARKERS[classifyForDrawing(e)], e.id));

/** Equilibrium labels (bold), each clear of the `occupied` boxes and of the labels before it. */
export const placeEquilibriumLabels = (
  frame: PlotFrame,
  items: { x: number; y: number; text: string }[],
  occupied: ScreenBox[],
): PlacedLabel[] => placeLabels(frame, items, (t) => textWidthPx(t, FONT_SIZE.annotation, true), occupied);

/** A key row for each class among the drawn equilibria, in the palette's order. */
export function equilibriumKey(drawn: EquilibriumResult[]): KeyEntry[] {
  const classes = new Set(drawn.map(classifyForDrawing));
  return EQUILIBRIUM_CLASSES.filter((c) => classes.has(c)).map((c): KeyEntry => ({
    kind: "symbol",
    marker: EQUILIBRIUM_MARKERS[c],
  }));
}

/** Periodic orbits, attracting ones first, each group a layer and a key row when any is drawn. */
export function cycleLayers(frame: PlotFrame, cycles: CycleResult[], enc: Record<string, unknown>) {
  const layers: Record<string, unknown>[] = [];
  const key: KeyEntry[] = [];
  for (const attracting of [true, false]) {
    const style = attracting ? LINE_STYLES.cycleStable : LINE_STYLES.cycleOther;
    const paths = cycles
      .filter((c) => (c.stability === "stable") === attracting)
      .map((c) => ({ key: c.id, line: c.orbit }));
    const layer = pathLayer(attracting ? "cycles_attracting" : "cycles_other", frame, paths, style, enc);
    if (!layer) continue;
    layers.push(layer);
    key.push({ kind: "line", style });
  }
  return { layers, key };
}

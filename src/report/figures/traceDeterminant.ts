import type { EquilibriumResult, Results } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { clipPolyline, markerBox, roundData, toPlot, type PlotFrame } from "./geometry.js";
import { buildKey, type KeyEntry } from "./key.js";
import {
  keyedFigure,
  labelLayers,
  lineLayer,
  lineRows,
  positionEncoding,
  symbolLayer,
  symbolRow,
  textLayer,
  type VegaLiteSpec,
} from "./layers.js";
import { equilibriumKey, placeEquilibriumLabels } from "./marks.js";
import {
  classifyForDrawing,
  EQUILIBRIUM_MARKERS,
  FONT_SIZE,
  FRAME,
  LINE_STYLES,
  TRACE_DETERMINANT_PLOT,
} from "./palette.js";

/**
 * The trace–determinant plane: the parabola τ² = 4Δ, the axes τ = 0 and Δ = 0, region names,
 * and every equilibrium at (trace, determinant) of its Jacobian.
 *
 * Scale: when the equilibria's spectral radii ρ (largest |λ|) span more than SPREAD_LIMIT, a
 * linear plot would crowd the slow ones onto the origin, so each point is drawn at (τ/ρ, Δ/ρ²)
 * instead. That keeps its region exactly (the signs of τ, Δ and τ² − 4Δ do not change when J is
 * divided by ρ > 0) and puts every point in |τ/ρ| ≤ 2, |Δ/ρ²| ≤ 1. The caption says which.
 */
export const SPREAD_LIMIT = 10;

/** Room around the points: the vertical range is this much larger than the largest |Δ| (or τ²/4). */
const HEADROOM = 1.25;
/** The horizontal range reaches this factor beyond where the parabola leaves the top of the plot. */
const PARABOLA_MARGIN = 1.15;
const PARABOLA_SAMPLES = 241;
/** Points closer than this (px) share one label, "E2, E3". */
const LABEL_MERGE_PX = 8;

export interface TracePlacement {
  mode: "linear" | "normalised";
  points: { id: string; x: number; y: number; trace: number; determinant: number; radius: number }[];
  /** Half-widths of the plotted ranges: τ-like axis [-T, T], Δ-like axis [-D, D]. */
  T: number;
  D: number;
}

const spectralRadius = (e: EquilibriumResult) =>
  Math.max(0, ...e.eigenvalues.map((l) => Math.hypot(l.re, l.im)));

export function placeOnTraceDeterminant(equilibria: EquilibriumResult[]): TracePlacement {
  const radii = equilibria.map(spectralRadius).filter((r) => r > 0);
  const spread = radii.length ? Math.max(...radii) / Math.min(...radii) : 1;
  const mode = spread > SPREAD_LIMIT ? "normalised" : "linear";
  const points = equilibria.map((e) => {
    const radius = spectralRadius(e);
    const [x, y] =
      mode === "linear" || radius === 0
        ? [e.trace, e.determinant]
        : [e.trace / radius, e.determinant / (radius * radius)];
    return { id: e.id, x, y, trace: e.trace, determinant: e.determinant, radius };
  });
  const reach = Math.max(0, ...points.map((p) => Math.max(Math.abs(p.y), (p.x * p.x) / 4)));
  const D = reach > 0 ? HEADROOM * reach : 1;
  return { mode, points, T: 2 * Math.sqrt(D) * PARABOLA_MARGIN, D };
}

function traceDeterminantEncoding(placed: TracePlacement, timeUnit: string) {
  const rate = `1/${timeUnit}`;
  const titles =
    placed.mode === "linear"
      ? [`trace τ = λ₁ + λ₂ (${rate})`, `determinant Δ = λ₁λ₂ (${rate}²)`]
      : ["trace / spectral radius, τ/ρ", "determinant / spectral radius², Δ/ρ²"];
  return {
    x: positionEncoding("x", [-placed.T, placed.T], titles[0], { tickCount: 7 }),
    y: positionEncoding("y", [-placed.D, placed.D], titles[1], { tickCount: 7 }),
  };
}

/** The axes τ = 0 and Δ = 0, and the parabola τ² = 4Δ between nodes and foci. */
function boundaryLayers(frame: PlotFrame, { T, D }: TracePlacement, enc: Record<string, unknown>) {
  const axes = { ...LINE_STYLES.reference, strokeDash: [] };
  const tau = Array.from({ length: PARABOLA_SAMPLES }, (_, k) => -T + (2 * T * k) / (PARABOLA_SAMPLES - 1));
  const parabola = clipPolyline(frame, { x: tau, y: tau.map((t) => (t * t) / 4) });
  return [
    lineLayer("axis_trace", lineRows("tau0", { x: [0, 0], y: [-D, D] }), axes, enc),
    lineLayer("axis_determinant", lineRows("delta0", { x: [-T, T], y: [0, 0] }), axes, enc),
    lineLayer(
      "parabola",
      parabola.flatMap((p, k) => lineRows(`p${k}`, p)),
      LINE_STYLES.parabola,
      enc,
    ),
  ];
}

/** Region names, placed by the shape of the plot. */
function regionNameLayers({ T, D }: TracePlacement, enc: Record<string, unknown>) {
  // T² = 5.29 D, so the parabola passes Δ = 0.21 D at τ = ±0.4 T and Δ = 0.8 D at τ = ±0.78 T
  const regions = [
    { x: 0, y: -0.55 * D, text: "saddles (Δ < 0)" },
    { x: -0.78 * T, y: 0.3 * D, text: "stable nodes" },
    { x: 0.78 * T, y: 0.3 * D, text: "unstable nodes" },
    { x: -0.4 * T, y: 0.82 * D, text: "stable foci" },
    { x: 0.4 * T, y: 0.82 * D, text: "unstable foci" },
  ];
  const mark = { fontSize: FONT_SIZE.regionLabel, fontStyle: "italic", color: FRAME };
  return [
    textLayer(
      "regions",
      regions.map((r) => ({ x: roundData(r.x), y: roundData(r.y), text: r.text })),
      { align: "center", baseline: "middle", ...mark },
      enc,
    ),
    textLayer(
      "centres",
      [{ x: 0, y: roundData(0.95 * D), text: "centres on τ = 0" }],
      { align: "left", baseline: "middle", dx: 4, ...mark },
      enc,
    ),
  ];
}

/** Every equilibrium at its placed point, with its trace and determinant, and their labels. */
function equilibriumLayers(
  frame: PlotFrame,
  equilibria: EquilibriumResult[],
  placed: TracePlacement,
  enc: Record<string, unknown>,
) {
  const rows = equilibria.map((e, k) => {
    const p = placed.points[k];
    return {
      ...symbolRow(p.x, p.y, EQUILIBRIUM_MARKERS[classifyForDrawing(e)], e.id),
      trace: e.trace,
      determinant: e.determinant,
    };
  });
  const occupied = rows.map((r) => markerBox(frame, r.x, r.y));
  const labels = placeEquilibriumLabels(frame, mergeLabels(frame, rows), occupied);
  return [
    ...(rows.length ? [symbolLayer("equilibria", rows, enc)] : []),
    ...labelLayers("equilibrium_labels", labels, enc, { fontWeight: "bold" }),
  ];
}

export function buildTraceDeterminantFigure(results: Results, spec: NormalizedSpec): VegaLiteSpec {
  const placed = placeOnTraceDeterminant(results.equilibria);
  const frame: PlotFrame = {
    lo: [-placed.T, -placed.D],
    hi: [placed.T, placed.D],
    ...TRACE_DETERMINANT_PLOT,
  };
  const enc = traceDeterminantEncoding(placed, spec.timeUnit);
  const layers = [
    ...boundaryLayers(frame, placed, enc),
    ...regionNameLayers(placed, enc),
    ...equilibriumLayers(frame, results.equilibria, placed, enc),
  ];
  const key: KeyEntry[] = [
    { kind: "line", style: LINE_STYLES.parabola },
    ...equilibriumKey(results.equilibria),
  ];
  return keyedFigure(
    { width: frame.width, height: frame.height, layer: layers },
    buildKey(key, frame.height),
  );
}

/** Equilibria that land on (nearly) the same spot share one label. */
function mergeLabels(
  frame: PlotFrame,
  rows: { x: number; y: number; what: string }[],
): { x: number; y: number; text: string }[] {
  const groups: { x: number; y: number; ids: string[] }[] = [];
  for (const r of rows) {
    const [u, v] = toPlot(frame, r.x, r.y);
    const g = groups.find((q) => {
      const [a, b] = toPlot(frame, q.x, q.y);
      return Math.hypot(a - u, b - v) < LABEL_MERGE_PX;
    });
    if (g) g.ids.push(r.what);
    else groups.push({ x: r.x, y: r.y, ids: [r.what] });
  }
  return groups.map((g) => ({ x: g.x, y: g.y, text: g.ids.join(", ") }));
}

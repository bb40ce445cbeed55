import type { Results } from "../../analysis/types.js";
import type { DirectionFieldResult } from "../../analysis/phase/field.js";
import type { NullclinePiece, NullclineResult } from "../../analysis/phase/nullclines.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { drawablePieces, headingOf, markerBox, portraitFrame, placeLabels, plotLength, pointAlong, type PlotFrame, type Polyline } from "./geometry.js";
import { textWidthPx } from "../render/textWidth.js";
import { buildKey, type KeyEntry } from "./key.js";
import { labelLayers, lineLayer, pathRows, positionEncoding, stateAxisTitle, symbolLayer, symbolRow, type SymbolRow, type VegaLiteSpec } from "./layers.js";
import {
  ARROWHEAD_PATH, ARROWHEAD_SIZE, classifyForDrawing, EQUILIBRIUM_CLASSES, EQUILIBRIUM_MARKERS, FIELD_ARROW_PATH, FIELD_ARROW_SIZE, FIELD_STYLE,
  figureConfig, FONT_SIZE, LINE_STYLES, NULLCLINE_STYLES, START_MARKER, type LineStyle,
} from "./palette.js";

/** What the portrait needs of a nullcline: the state whose derivative vanishes, and its pieces. */
export type NullclineInput = Pick<NullclineResult, "state"> & { pieces: Pick<NullclinePiece, "points">[] };
export type FieldInput = Pick<DirectionFieldResult, "nx" | "ny" | "x" | "y" | "u" | "v">;

export interface PortraitInput {
  results: Results;
  spec: NormalizedSpec;
  nullclines: NullclineInput[] | null;
  field: FieldInput | null;
}

type KeySlot = "nullclines" | "field" | "scenarios" | "trajectories" | "separatrices" | "cycles" | "equilibria";
const KEY_SLOTS: KeySlot[] = ["nullclines", "field", "scenarios", "trajectories", "separatrices", "cycles", "equilibria"];

/** Scenario arrowheads sit half way along the drawn path; the key calls this "direction". */
const HEAD_AT = 0.5;
/** Portrait trajectories shorter than this on screen (px) get no arrowhead: it would hide the line. */
const MIN_HEAD_PATH_PX = 40;


const polyline = (p: { x: number[]; y: number[] }): Polyline => ({ x: p.x, y: p.y });

function headRow(frame: PlotFrame, line: Polyline, fraction: number, color: string, size: number, what: string): SymbolRow | null {
  const at = pointAlong(frame, line, fraction);
  if (!at) return null;
  return symbolRow(at.x, at.y, { shape: ARROWHEAD_PATH, angle: at.angle, fill: color, stroke: color, strokeWidth: 0, size }, what);
}

/** One arrow per direction-field sample, pointing along the flow on the page. */
function fieldArrowRows(frame: PlotFrame, field: FieldInput): SymbolRow[] {
  const rows: SymbolRow[] = [];
  field.y.forEach((y, j) => field.x.forEach((x, i) => {
    const u = field.u[j * field.nx + i], v = field.v[j * field.nx + i];
    if (u === null || v === null) return;
    const angle = headingOf(frame, u * (frame.hi[0] - frame.lo[0]), v * (frame.hi[1] - frame.lo[1]));
    rows.push(symbolRow(x, y, { shape: FIELD_ARROW_PATH, angle, fill: "transparent", stroke: FIELD_STYLE.color, strokeWidth: FIELD_STYLE.strokeWidth, size: FIELD_ARROW_SIZE }, "field"));
  }));
  return rows;
}

/** Each scenario's start marker and direction head, and a head where it leaves without settling. */
function scenarioMarkRows(frame: PlotFrame, results: PortraitInput["results"], lines: Polyline[]): SymbolRow[] {
  const color = LINE_STYLES.scenario.color;
  const marks: SymbolRow[] = [];
  results.scenarios.forEach((s, k) => {
    const pieces = drawablePieces(frame, lines[k]);
    if (pieces.length === 0) return;
    marks.push(symbolRow(pieces[0].x[0], pieces[0].y[0], { ...START_MARKER, angle: 0, fill: color, stroke: color, strokeWidth: 0 }, `start ${s.name}`));
    const mid = headRow(frame, pieces[0], HEAD_AT, color, ARROWHEAD_SIZE, `direction ${s.name}`);
    if (mid) marks.push(mid);
    // where the scenario does not settle in the window, a head at the end of what is drawn
    const last = pieces[pieces.length - 1];
    const end = s.fate.kind === "equilibrium" || s.fate.kind === "cycle" ? null : headRow(frame, last, 1, color, ARROWHEAD_SIZE, `end ${s.name}`);
    if (end) marks.push(end);
  });
  return marks;
}

/** The phase portrait: window, nullclines, direction field, trajectories, separatrices, periodic orbits, equilibria, and its key. */
export function buildPortraitFigure({ results, spec, nullclines, field }: PortraitInput): VegaLiteSpec {
  const frame = portraitFrame(results);
  const [sa, sb] = results.model.states.map((n) => spec.states.find((s) => s.name === n)!);
  const enc = {
    // few x ticks: labels like "60,000" need the room
    x: positionEncoding("x", [frame.lo[0], frame.hi[0]], stateAxisTitle(sa), { tickCount: 4 }),
    y: positionEncoding("y", [frame.lo[1], frame.hi[1]], stateAxisTitle(sb), { tickCount: 6 }),
  };
  const layers: Record<string, unknown>[] = [];
  // key rows in reading order, whatever order the layers are drawn in
  const key: Record<KeySlot, KeyEntry[]> = { nullclines: [], field: [], scenarios: [], trajectories: [], separatrices: [], cycles: [], equilibria: [] };
  const addLines = (name: string, paths: { key: string; line: Polyline }[], style: LineStyle, interpolate = "linear") => {
    const rows = pathRows(frame, paths);
    if (rows.length === 0) return false;
    layers.push(lineLayer(name, rows, style, enc, interpolate));
    return true;
  };

  // 1. direction field, underneath everything
  const arrows = field ? fieldArrowRows(frame, field) : [];
  if (arrows.length) { layers.push(symbolLayer("field", arrows, enc)); key.field.push({ kind: "field" }); }

  // 2. portrait trajectories: light context. Step points are sparse (long integrator steps), so a
  // centripetal Catmull–Rom curve through them reads closer to the true path than chords do.
  const portraitPaths = results.trajectories.map((t, k) => ({ key: `T${k + 1}`, line: polyline(t.path) }));
  if (addLines("trajectories", portraitPaths, LINE_STYLES.portrait, "catmull-rom")) {
    const heads = portraitPaths.flatMap(({ key: k, line }) => drawablePieces(frame, line)
      .filter((piece) => plotLength(frame, piece) >= MIN_HEAD_PATH_PX)
      .map((piece) => headRow(frame, piece, HEAD_AT, LINE_STYLES.portrait.color, ARROWHEAD_SIZE * 0.6, k)!));
    if (heads.length) layers.push(symbolLayer("trajectory_heads", heads, enc));
    key.trajectories.push({ kind: "line", style: LINE_STYLES.portrait, head: heads.length > 0 });
  }

  // 3. nullclines, told apart by dash pattern as well as colour
  (nullclines ?? []).forEach((nc) => {
    const index = results.model.states.indexOf(nc.state);
    if (index < 0) return;
    const style: LineStyle = { ...NULLCLINE_STYLES[index], label: `d${nc.state}/dt = 0 (${nc.state}-nullcline)` };
    const paths = nc.pieces.map((p, k) => ({ key: `${nc.state}${k}`, line: { x: p.points.map((q) => q[0]), y: p.points.map((q) => q[1]) } }));
    if (addLines(`nullcline_${index + 1}`, paths, style)) key.nullclines.push({ kind: "line", style });
  });

  // 4. separatrices: unstable manifolds under stable ones (the stable ones bound basins)
  for (const manifold of ["unstable", "stable"] as const) {
    const style = manifold === "stable" ? LINE_STYLES.stableManifold : LINE_STYLES.unstableManifold;
    const paths = results.separatrices.filter((s) => s.manifold === manifold).map((s) => ({ key: `${s.saddle}${s.side}`, line: polyline(s.path) }));
    if (addLines(`${manifold}_manifolds`, paths, style, "catmull-rom")) key.separatrices.unshift({ kind: "line", style });
  }

  // 5. scenario trajectories, from the dense time series
  const scenarioPaths = results.scenarios.map((s) => ({ key: s.name, line: polyline(s.series.t.length >= 2 ? s.series : s.path) }));
  const scenariosDrawn = addLines("scenarios", scenarioPaths, LINE_STYLES.scenario);

  // 6. periodic orbits (dense samples from shooting), over the scenarios that wind onto them
  for (const attracting of [true, false]) {
    const style = attracting ? LINE_STYLES.cycleStable : LINE_STYLES.cycleOther;
    const paths = results.cycles.filter((c) => (c.stability === "stable") === attracting).map((c) => ({ key: c.id, line: polyline(c.orbit) }));
    if (addLines(attracting ? "cycles_attracting" : "cycles_other", paths, style)) key.cycles.push({ kind: "line", style });
  }

  // 7. scenario start markers and direction heads
  const marks = scenariosDrawn ? scenarioMarkRows(frame, results, scenarioPaths.map((p) => p.line)) : [];
  if (scenariosDrawn) {
    layers.push(symbolLayer("scenario_marks", marks, enc));
    key.scenarios.push({ kind: "line", style: LINE_STYLES.scenario, start: true, head: true });
  }

  // 8. equilibria by class; then labels, equilibria first, each clear of markers and earlier labels
  const inside = results.equilibria.filter((e) => {
    const x = e.point[sa.name], y = e.point[sb.name];
    return x >= frame.lo[0] && x <= frame.hi[0] && y >= frame.lo[1] && y <= frame.hi[1];
  });
  const eqRows = inside.map((e) => symbolRow(e.point[sa.name], e.point[sb.name], EQUILIBRIUM_MARKERS[classifyForDrawing(e)], e.id));
  if (eqRows.length) layers.push(symbolLayer("equilibria", eqRows, enc));
  const starts = marks.filter((m) => m.what.startsWith("start "));
  const occupied = [...eqRows, ...starts].map((r) => markerBox(frame, r.x, r.y));
  const eqLabels = placeLabels(frame, eqRows.map((r) => ({ x: r.x, y: r.y, text: r.what })), (t) => textWidthPx(t, FONT_SIZE.annotation, true), occupied);
  const scenarioLabels = placeLabels(frame, starts.map((m) => ({ x: m.x, y: m.y, text: m.what.slice("start ".length) })), (t) => textWidthPx(t, FONT_SIZE.annotation), occupied);
  layers.push(...labelLayers("equilibrium_labels", eqLabels, enc, { fontWeight: "bold" }));
  layers.push(...labelLayers("scenario_labels", scenarioLabels, enc, { color: LINE_STYLES.scenario.color, fontStyle: "italic" }));
  const classes = new Set(inside.map(classifyForDrawing));
  for (const c of EQUILIBRIUM_CLASSES) if (classes.has(c)) key.equilibria.push({ kind: "symbol", marker: EQUILIBRIUM_MARKERS[c] });

  // nothing to draw still gets its axes: two invisible corner points hold the scales
  if (layers.length === 0) {
    layers.push({ name: "window", data: { values: [{ x: frame.lo[0], y: frame.lo[1] }, { x: frame.hi[0], y: frame.hi[1] }] }, mark: { type: "point", opacity: 0 }, encoding: enc });
  }
  return {
    config: figureConfig(),
    padding: 6,
    hconcat: [
      { width: frame.width, height: frame.height, layer: layers },
      buildKey(KEY_SLOTS.flatMap((slot) => key[slot]), frame.height),
    ],
  };
}

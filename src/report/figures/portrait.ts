import type { Results } from "../../analysis/types.js";
import type { DirectionFieldResult } from "../../analysis/phase/field.js";
import type { NullclinePiece, NullclineResult } from "../../analysis/phase/nullclines.js";
import type { NormalizedSpec } from "../../spec/types.js";
import {
  drawablePieces,
  headingOf,
  markerBox,
  portraitFrame,
  placeLabels,
  plotLength,
  pointAlong,
  type PlotFrame,
  type Polyline,
} from "./geometry.js";
import { textWidthPx } from "../render/textWidth.js";
import { buildKey, type KeyEntry } from "./key.js";
import {
  keyedFigure,
  labelLayers,
  pathLayer,
  symbolLayer,
  symbolRow,
  type SymbolRow,
  type VegaLiteSpec,
} from "./layers.js";
import {
  cycleLayers,
  equilibriaInWindow,
  equilibriumKey,
  equilibriumRows,
  placeEquilibriumLabels,
  stateWindowEncoding,
} from "./marks.js";
import {
  ARROWHEAD_SIZE,
  arrowheadMarker,
  fieldArrowMarker,
  FONT_SIZE,
  LINE_STYLES,
  NULLCLINE_STYLES,
  startMarker,
  type LineStyle,
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

/** Scenario arrowheads sit half way along the drawn path; the key calls this "direction". */
const HEAD_AT = 0.5;
/** Portrait trajectories shorter than this on screen (px) get no arrowhead: it would hide the line. */
const MIN_HEAD_PATH_PX = 40;

const polyline = (p: { x: number[]; y: number[] }): Polyline => ({ x: p.x, y: p.y });

function headRow(
  frame: PlotFrame,
  line: Polyline,
  fraction: number,
  color: string,
  size: number,
  what: string,
): SymbolRow | null {
  const at = pointAlong(frame, line, fraction);
  if (!at) return null;
  return symbolRow(at.x, at.y, arrowheadMarker(color, at.angle, size), what);
}

/** One arrow per direction-field sample, pointing along the flow on the page. */
function fieldArrowRows(frame: PlotFrame, field: FieldInput): SymbolRow[] {
  const rows: SymbolRow[] = [];
  field.y.forEach((y, j) =>
    field.x.forEach((x, i) => {
      const u = field.u[j * field.nx + i],
        v = field.v[j * field.nx + i];
      if (u === null || v === null) return;
      const angle = headingOf(frame, u * (frame.hi[0] - frame.lo[0]), v * (frame.hi[1] - frame.lo[1]));
      rows.push(symbolRow(x, y, fieldArrowMarker(angle), "field"));
    }),
  );
  return rows;
}

/** Each scenario's start marker and direction head, and a head where it leaves without settling. */
function scenarioMarkRows(
  frame: PlotFrame,
  results: PortraitInput["results"],
  lines: Polyline[],
): SymbolRow[] {
  const color = LINE_STYLES.scenario.color;
  const marks: SymbolRow[] = [];
  results.scenarios.forEach((s, k) => {
    const pieces = drawablePieces(frame, lines[k]);
    if (pieces.length === 0) return;
    marks.push(symbolRow(pieces[0].x[0], pieces[0].y[0], startMarker(color), `start ${s.name}`));
    const mid = headRow(frame, pieces[0], HEAD_AT, color, ARROWHEAD_SIZE, `direction ${s.name}`);
    if (mid) marks.push(mid);
    // where the scenario does not settle in the window, a head at the end of what is drawn
    const last = pieces[pieces.length - 1];
    const end =
      s.fate.kind === "equilibrium" || s.fate.kind === "cycle"
        ? null
        : headRow(frame, last, 1, color, ARROWHEAD_SIZE, `end ${s.name}`);
    if (end) marks.push(end);
  });
  return marks;
}

type Encoding = Record<string, unknown>;
type Layer = Record<string, unknown>;
/** Some layers and the key rows that explain them. */
interface PortraitPart {
  layers: Layer[];
  key: KeyEntry[];
}

/** The direction field, underneath everything. */
function fieldPart(frame: PlotFrame, field: FieldInput | null, enc: Encoding): PortraitPart {
  const arrows = field ? fieldArrowRows(frame, field) : [];
  if (!arrows.length) return { layers: [], key: [] };
  return { layers: [symbolLayer("field", arrows, enc)], key: [{ kind: "field" }] };
}

/**
 * The portrait trajectories: light context, with a head on each piece long enough to carry one.
 * Step points are sparse (long integrator steps), so a centripetal Catmull–Rom curve through
 * them reads closer to the true path than chords do.
 */
function trajectoryPart(frame: PlotFrame, results: Results, enc: Encoding): PortraitPart {
  const paths = results.trajectories.map((t, k) => ({ key: `T${k + 1}`, line: polyline(t.path) }));
  const layer = pathLayer("trajectories", frame, paths, LINE_STYLES.portrait, enc, "catmull-rom");
  if (!layer) return { layers: [], key: [] };
  const color = LINE_STYLES.portrait.color;
  const heads = paths.flatMap(({ key, line }) =>
    drawablePieces(frame, line)
      .filter((piece) => plotLength(frame, piece) >= MIN_HEAD_PATH_PX)
      .map((piece) => headRow(frame, piece, HEAD_AT, color, ARROWHEAD_SIZE * 0.6, key)!),
  );
  return {
    layers: [layer, ...(heads.length ? [symbolLayer("trajectory_heads", heads, enc)] : [])],
    key: [{ kind: "line", style: LINE_STYLES.portrait, head: heads.length > 0 }],
  };
}

/** The nullclines, told apart by dash pattern as well as colour. */
function nullclinePart(frame: PlotFrame, states: string[], nullclines: NullclineInput[], enc: Encoding) {
  const part: PortraitPart = { layers: [], key: [] };
  for (const nc of nullclines) {
    const index = states.indexOf(nc.state);
    if (index < 0) continue;
    const label = `d${nc.state}/dt = 0 (${nc.state}-nullcline)`;
    const style: LineStyle = { ...NULLCLINE_STYLES[index], label };
    const paths = nc.pieces.map((p, k) => ({
      key: `${nc.state}${k}`,
      line: { x: p.points.map((q) => q[0]), y: p.points.map((q) => q[1]) },
    }));
    const layer = pathLayer(`nullcline_${index + 1}`, frame, paths, style, enc);
    if (!layer) continue;
    part.layers.push(layer);
    part.key.push({ kind: "line", style });
  }
  return part;
}

const outsideFrame = (frame: PlotFrame, x: number, y: number) =>
  !(x >= frame.lo[0] && x <= frame.hi[0] && y >= frame.lo[1] && y <= frame.hi[1]);

/**
 * A manifold's path cut at every step between two points outside the window: the curve between
 * them is not resolved there (a separatrix that has left runs on, sparsely sampled, as it blows
 * up), so its chord, which may cut across the window, is not drawn.
 */
export function resolvedRuns(frame: PlotFrame, line: Polyline): Polyline[] {
  const runs: Polyline[] = [];
  let run: Polyline = { x: [], y: [] };
  line.x.forEach((x, k) => {
    const y = line.y[k];
    const out = outsideFrame(frame, x, y);
    const n = run.x.length;
    if (n && out && outsideFrame(frame, run.x[n - 1], run.y[n - 1])) {
      if (n >= 2) runs.push(run);
      run = { x: [], y: [] };
    }
    run.x.push(x);
    run.y.push(y);
  });
  if (run.x.length >= 2) runs.push(run);
  return runs;
}

/** The separatrices: unstable manifolds drawn under stable ones (the stable ones bound basins), listed after them. */
function separatrixPart(frame: PlotFrame, results: Results, enc: Encoding): PortraitPart {
  const part: PortraitPart = { layers: [], key: [] };
  for (const manifold of ["unstable", "stable"] as const) {
    const style = manifold === "stable" ? LINE_STYLES.stableManifold : LINE_STYLES.unstableManifold;
    const paths = results.separatrices
      .filter((s) => s.manifold === manifold)
      .flatMap((s) =>
        resolvedRuns(frame, polyline(s.path)).map((line, j) => ({ key: `${s.saddle}${s.side}.${j}`, line })),
      );
    const layer = pathLayer(`${manifold}_manifolds`, frame, paths, style, enc, "catmull-rom");
    if (!layer) continue;
    part.layers.push(layer);
    part.key.unshift({ kind: "line", style });
  }
  return part;
}

/** The scenario trajectories from their dense time series, and their start markers and heads. */
function scenarioParts(frame: PlotFrame, results: Results, enc: Encoding) {
  const paths = results.scenarios.map((s) => ({
    key: s.name,
    line: polyline(s.series.t.length >= 2 ? s.series : s.path),
  }));
  const layer = pathLayer("scenarios", frame, paths, LINE_STYLES.scenario, enc);
  if (!layer) return { lines: [], marks: [], starts: [], key: [] };
  const marks = scenarioMarkRows(
    frame,
    results,
    paths.map((p) => p.line),
  );
  return {
    lines: [layer],
    marks: [symbolLayer("scenario_marks", marks, enc)],
    starts: marks.filter((m) => m.what.startsWith("start ")),
    key: [{ kind: "line", style: LINE_STYLES.scenario, start: true, head: true } satisfies KeyEntry],
  };
}

/** The equilibria in the window by class; then labels, equilibria first, each clear of markers and earlier labels. */
function equilibriumPart(
  frame: PlotFrame,
  results: Results,
  starts: SymbolRow[],
  enc: Encoding,
): PortraitPart {
  const inside = equilibriaInWindow(frame, results.equilibria, results.model.states);
  const rows = equilibriumRows(inside, results.model.states);
  const occupied = [...rows, ...starts].map((r) => markerBox(frame, r.x, r.y));
  const eqLabels = placeEquilibriumLabels(
    frame,
    rows.map((r) => ({ x: r.x, y: r.y, text: r.what })),
    occupied,
  );
  const scenarioLabels = placeLabels(
    frame,
    starts.map((m) => ({ x: m.x, y: m.y, text: m.what.slice("start ".length) })),
    (t) => textWidthPx(t, FONT_SIZE.annotation),
    occupied,
  );
  const scenarioMark = { color: LINE_STYLES.scenario.color, fontStyle: "italic" };
  const layers = [
    ...(rows.length ? [symbolLayer("equilibria", rows, enc)] : []),
    ...labelLayers("equilibrium_labels", eqLabels, enc, { fontWeight: "bold" }),
    ...labelLayers("scenario_labels", scenarioLabels, enc, scenarioMark),
  ];
  return { layers, key: equilibriumKey(inside) };
}

/** Nothing to draw still gets its axes: two invisible corner points hold the scales. */
const windowCornersLayer = (frame: PlotFrame, enc: Encoding): Layer => ({
  name: "window",
  data: {
    values: [
      { x: frame.lo[0], y: frame.lo[1] },
      { x: frame.hi[0], y: frame.hi[1] },
    ],
  },
  mark: { type: "point", opacity: 0 },
  encoding: enc,
});

/** The phase portrait: window, nullclines, direction field, trajectories, separatrices, periodic orbits, equilibria, and its key. */
export function buildPortraitFigure({ results, spec, nullclines, field }: PortraitInput): VegaLiteSpec {
  const frame = portraitFrame(results);
  const states = results.model.states.map((n) => spec.states.find((s) => s.name === n)!);
  const enc = stateWindowEncoding(frame, states);
  const fieldArrows = fieldPart(frame, field, enc);
  const trajectories = trajectoryPart(frame, results, enc);
  const nullclineLines = nullclinePart(frame, results.model.states, nullclines ?? [], enc);
  const separatrices = separatrixPart(frame, results, enc);
  const scenarios = scenarioParts(frame, results, enc);
  // periodic orbits (dense samples from shooting) over the scenarios that wind onto them
  const cycles = cycleLayers(frame, results.cycles, enc);
  const equilibria = equilibriumPart(frame, results, scenarios.starts, enc);
  const layers = [
    ...fieldArrows.layers,
    ...trajectories.layers,
    ...nullclineLines.layers,
    ...separatrices.layers,
    ...scenarios.lines,
    ...cycles.layers,
    ...scenarios.marks,
    ...equilibria.layers,
  ];
  // key rows in reading order, whatever order the layers are drawn in
  const key = [
    ...nullclineLines.key,
    ...fieldArrows.key,
    ...scenarios.key,
    ...trajectories.key,
    ...separatrices.key,
    ...cycles.key,
    ...equilibria.key,
  ];
  const plot = {
    width: frame.width,
    height: frame.height,
    layer: layers.length ? layers : [windowCornersLayer(frame, enc)],
  };
  return keyedFigure(plot, buildKey(key, frame.height));
}

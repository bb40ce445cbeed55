import type { ParameterStudyResult, Results } from "../../analysis/types.js";
import type { BranchResult } from "../../analysis/parameters/continuation/index.js";
import type { NormalizedParameter, NormalizedSpec } from "../../spec/types.js";
import { formatNumber } from "../format.js";
import { textWidthPx } from "../render/textWidth.js";
import {
  markerBox,
  placeLabels,
  roundData,
  toScreen,
  type PlotFrame,
  type Polyline,
  type ScreenBox,
} from "./geometry.js";
import { feasibleRuns } from "./feasible.js";
import { CYCLE_KEY_LABELS, cycleBranchLayers, type CycleKind } from "./amplitude.js";
import { buildKey, type KeyEntry } from "./key.js";
import {
  keyedFigure,
  labelLayers,
  lineLayer,
  panelTitle,
  parameterAxisTitle,
  pathLayer,
  positionEncoding,
  stateAxisTitle,
  symbolLayer,
  symbolRow,
  textLayer,
  type VegaLiteSpec,
} from "./layers.js";
import {
  BIFURCATION_PANEL,
  BRANCH_STYLES,
  FONT_SIZE,
  LINE_STYLES,
  NOMINAL_COLOR,
  NOMINAL_STYLE,
  SPECIAL_POINT_MARKERS,
} from "./palette.js";

/**
 * Bifurcation diagram of one studied parameter: every continued branch of equilibria, one panel
 * per state on a shared parameter axis, drawn solid where stable, dashed where unstable and
 * dotted where the linearisation does not decide; the located special points marked by kind
 * and labelled; the current value as a vertical rule. Each panel's y range is the state's
 * window. Branches continue through infeasible states (negative populations); those parts are
 * cut off in every panel, at the bound they cross (feasible.ts).
 */

export type BranchStability = keyof typeof BRANCH_STYLES;
type Encoding = Record<string, unknown>;

/** px between the two panels (vega-lite's concat spacing); the key spans both. */
const PANEL_SPACING = 14;
/** Height of a panel's title line (px), for sizing the key beside the panels. */
const TITLE_HEIGHT = 18;
/** A special point within this fraction of the window height outside it is drawn on the edge (location and rounding slack). */
const EDGE_SLACK = 1e-6;

const stabilityOf = (stable: boolean | null): BranchStability =>
  stable === true ? "stable" : stable === false ? "unstable" : "undecided";

/**
 * A branch as pieces of equal stability, in the coordinate `state` against the parameter. A
 * segment between two points takes their common stability; where one end is undecided (a
 * single point at a bifurcation, where an eigenvalue is zero) it takes the other's; where
 * stable meets unstable, each half takes its own end's.
 */
export function branchPieces(
  branch: BranchResult,
  state: string,
): { stability: BranchStability; line: Polyline }[] {
  const pts = branch.points;
  const pieces: { stability: BranchStability; line: Polyline }[] = [];
  const extend = (stability: BranchStability, x0: number, y0: number, x1: number, y1: number) => {
    const last = pieces[pieces.length - 1];
    if (last && last.stability === stability) {
      last.line.x.push(x1);
      last.line.y.push(y1);
      return;
    }
    pieces.push({ stability, line: { x: [x0, x1], y: [y0, y1] } });
  };
  for (let k = 0; k + 1 < pts.length; k++) {
    const a = pts[k],
      b = pts[k + 1];
    const [xa, ya, xb, yb] = [a.value, a.point[state], b.value, b.point[state]];
    const sa = stabilityOf(a.stable),
      sb = stabilityOf(b.stable);
    if (sa === sb || sb === "undecided") extend(sa, xa, ya, xb, yb);
    else if (sa === "undecided") extend(sb, xa, ya, xb, yb);
    else {
      const xm = 0.5 * (xa + xb),
        ym = 0.5 * (ya + yb);
      extend(sa, xa, ya, xm, ym);
      extend(sb, xm, ym, xb, yb);
    }
  }
  return pieces;
}

/** Labels in a plot carry this many significant digits; the tables carry the full values. */
const LABEL_DIGITS = 4;
/** A number for a label in the plot, to LABEL_DIGITS significant digits. */
export const labelNumber = (v: number) => formatNumber(v, LABEL_DIGITS);

const KIND_SHORT: Record<string, string> = {
  "saddle-node": "saddle-node",
  transcritical: "transcritical",
  hopf: "Hopf",
  "boundary-crossing": "boundary",
};

/** A special point's label in the plot: its kind and parameter value ("saddle-node 1.136", "Hopf (sub) 2.5"). */
export function specialPointLabel(
  t: Pick<ParameterStudyResult["thresholds"][number], "kind" | "value" | "criticality">,
): string {
  const kind =
    t.kind === "hopf" && t.criticality
      ? `Hopf (${t.criticality === "supercritical" ? "super" : "sub"})`
      : (KIND_SHORT[t.kind] ?? t.kind);
  return `${kind} ${labelNumber(t.value)}`;
}

export function bifurcationFrame(results: Results, study: ParameterStudyResult, state: string): PlotFrame {
  const w = results.model.window[state];
  return { lo: [study.range[0], w[0]], hi: [study.range[1], w[1]], ...BIFURCATION_PANEL };
}

/** The thresholds drawn in the panel of `state`: those whose equilibrium lies in the window (to EDGE_SLACK). */
export function drawnSpecialPoints(results: Results, study: ParameterStudyResult, state: string) {
  const [lo, hi] = results.model.window[state];
  const slack = EDGE_SLACK * (hi - lo);
  return study.thresholds.filter(
    (t) =>
      t.point[state] >= lo - slack &&
      t.point[state] <= hi + slack &&
      t.value >= study.range[0] &&
      t.value <= study.range[1],
  );
}

/** The shared parameter axis is titled and labelled under the last panel only. */
function panelEncoding(frame: PlotFrame, param: NormalizedParameter, last: boolean) {
  return {
    x: positionEncoding(
      "x",
      [frame.lo[0], frame.hi[0]],
      last ? parameterAxisTitle(param) : null,
      last ? { tickCount: 5 } : { tickCount: 5, labels: false },
    ),
    y: positionEncoding("y", [frame.lo[1], frame.hi[1]], null, { tickCount: 4 }),
  };
}

/** Every branch's feasible parts in `state`, one layer per stability drawn, and which stabilities were drawn. */
function branchLayers(
  study: ParameterStudyResult,
  state: string,
  frame: PlotFrame,
  enc: Encoding,
  k: number,
  feasible: (b: BranchResult) => BranchResult[],
) {
  const pieces = study.continuation.branches.flatMap((b) =>
    feasible(b).flatMap((run, r) =>
      branchPieces(run, state).map((p, i) => ({
        key: `B${b.index}.${r}.${i}`,
        line: p.line,
        stability: p.stability,
      })),
    ),
  );
  const layers: Record<string, unknown>[] = [];
  const drawn: BranchStability[] = [];
  // unstable and undecided under stable: where branches overlap, the stable one shows
  for (const stability of ["undecided", "unstable", "stable"] as const) {
    const paths = pieces.filter((p) => p.stability === stability);
    const layer = pathLayer(`branches_${stability}_${k + 1}`, frame, paths, BRANCH_STYLES[stability], enc);
    if (!layer) continue;
    layers.push(layer);
    drawn.push(stability);
  }
  return { layers, drawn };
}

/** px between the rule and its "now" label, across and down. */
const NOW_LABEL_OFFSET = 3;

/** The current value as a vertical rule, labelled "now" in the first panel, and the boxes labels keep off. */
function nominalLayers(study: ParameterStudyResult, frame: PlotFrame, enc: Encoding, k: number) {
  const now = roundData(study.nominal);
  const rule = [
    { x: now, y: frame.lo[1], k: "now", i: 0 },
    { x: now, y: frame.hi[1], k: "now", i: 1 },
  ];
  const layers: Record<string, unknown>[] = [lineLayer(`now_${k + 1}`, rule, NOMINAL_STYLE, enc)];
  // labels keep off the rule where they can
  const [ruleU] = toScreen(frame, now, frame.hi[1]);
  const occupied: ScreenBox[] = [{ left: ruleU - 1, right: ruleU + 1, top: 0, bottom: frame.height }];
  if (k > 0) return { layers, occupied };
  const mark = {
    align: "left",
    baseline: "top",
    dx: NOW_LABEL_OFFSET,
    dy: NOW_LABEL_OFFSET,
    fontSize: FONT_SIZE.annotation,
    color: NOMINAL_COLOR,
    fontStyle: "italic",
  };
  layers.push(textLayer("now_label", [{ x: now, y: frame.hi[1], text: "now" }], mark, enc));
  occupied.push({
    left: ruleU,
    right: ruleU + NOW_LABEL_OFFSET + textWidthPx("now", FONT_SIZE.annotation),
    top: 0,
    bottom: NOW_LABEL_OFFSET + FONT_SIZE.annotation + 2,
  });
  return { layers, occupied };
}

/**
 * The special points drawn in the panel of the k-th state, on the window's edge when just
 * outside it, and their labels: each point is labelled once, in the first panel that draws it.
 */
function specialPointLayers(
  results: Results,
  study: ParameterStudyResult,
  k: number,
  frame: PlotFrame,
  enc: Encoding,
  occupied: ScreenBox[],
) {
  const state = results.model.states[k];
  const specials = drawnSpecialPoints(results, study, state);
  const rows = specials.map((t) => {
    const y = Math.min(frame.hi[1], Math.max(frame.lo[1], t.point[state]));
    return symbolRow(t.value, y, SPECIAL_POINT_MARKERS[t.kind], `${t.kind} ${t.value}`);
  });
  const labelledBefore = new Set(
    results.model.states.slice(0, k).flatMap((s) => drawnSpecialPoints(results, study, s)),
  );
  const toLabel = specials.flatMap((t, i) =>
    labelledBefore.has(t) ? [] : [{ x: rows[i].x, y: rows[i].y, text: specialPointLabel(t) }],
  );
  occupied.push(...rows.map((r) => markerBox(frame, r.x, r.y)));
  const placed = placeLabels(frame, toLabel, (s) => textWidthPx(s, FONT_SIZE.annotation), occupied);
  return [
    ...(rows.length ? [symbolLayer(`special_points_${k + 1}`, rows, enc)] : []),
    ...labelLayers(`special_labels_${k + 1}`, placed, enc),
  ];
}

/** The panel of the k-th state: branches, the current value, the special points. */
function bifurcationPanel(results: Results, spec: NormalizedSpec, study: ParameterStudyResult, k: number) {
  const names = results.model.states;
  const state = spec.states.find((s) => s.name === names[k])!;
  const param = spec.parameters.find((p) => p.name === study.parameter)!;
  const frame = bifurcationFrame(results, study, names[k]);
  const enc = panelEncoding(frame, param, k === names.length - 1);
  const feasible = (b: BranchResult) => feasibleRuns(b, spec.states, results.model.window);
  const branches = branchLayers(study, names[k], frame, enc, k, feasible);
  const cycles = cycleBranchLayers(study, names[k], frame, enc, k);
  const nominal = nominalLayers(study, frame, enc, k);
  const specials = specialPointLayers(results, study, k, frame, enc, nominal.occupied);
  const view = {
    width: frame.width,
    height: frame.height,
    title: panelTitle(stateAxisTitle(state)),
    layer: [...branches.layers, ...cycles.layers, ...nominal.layers, ...specials],
  };
  return { view, drawn: branches.drawn, cycles: cycles.drawn };
}

/** Key rows: the stabilities drawn, the current value, the kinds of special point drawn. */
function bifurcationKey(
  results: Results,
  study: ParameterStudyResult,
  drawn: Set<BranchStability>,
  cycles: Set<CycleKind>,
): KeyEntry[] {
  const kinds = new Set(
    results.model.states.flatMap((s) => drawnSpecialPoints(results, study, s).map((t) => t.kind)),
  );
  const nominal = `current value (now), ${study.parameter} = ${labelNumber(study.nominal)}`;
  return [
    ...(["stable", "unstable", "undecided"] as const)
      .filter((s) => drawn.has(s))
      .map((s): KeyEntry => ({ kind: "line", style: BRANCH_STYLES[s] })),
    ...(["attracting", "other"] as const)
      .filter((c) => cycles.has(c))
      .map((c): KeyEntry => {
        const style = c === "attracting" ? LINE_STYLES.cycleStable : LINE_STYLES.cycleOther;
        return { kind: "line", style: { ...style, label: CYCLE_KEY_LABELS[c] } };
      }),
    { kind: "line", style: { ...NOMINAL_STYLE, label: nominal } },
    ...(["saddle-node", "transcritical", "hopf", "boundary-crossing"] as const)
      .filter((c) => kinds.has(c))
      .map((c): KeyEntry => ({ kind: "symbol", marker: SPECIAL_POINT_MARKERS[c] })),
  ];
}

export function buildBifurcationFigure(
  results: Results,
  spec: NormalizedSpec,
  study: ParameterStudyResult,
): VegaLiteSpec {
  const n = results.model.states.length;
  const panels = results.model.states.map((_, k) => bifurcationPanel(results, spec, study, k));
  const drawn = new Set(panels.flatMap((p) => p.drawn));
  const key = bifurcationKey(results, study, drawn, new Set(panels.flatMap((p) => p.cycles)));
  const height = n * (BIFURCATION_PANEL.height + TITLE_HEIGHT) + (n - 1) * PANEL_SPACING;
  const stacked = {
    vconcat: panels.map((p) => p.view),
    spacing: PANEL_SPACING,
    resolve: { scale: { x: "shared" } },
  };
  return keyedFigure(stacked, buildKey(key, height));
}

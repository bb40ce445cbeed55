import type { ParameterStudyResult, Results } from "../../analysis/types.js";
import type { BranchResult } from "../../analysis/parameters/continuation/index.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { formatNumber } from "../format.js";
import { textWidthPx } from "../render/textWidth.js";
import { markerBox, placeLabels, roundData, toScreen, type PlotFrame, type Polyline, type ScreenBox } from "./geometry.js";
import { buildKey, type KeyEntry } from "./key.js";
import { labelLayers, lineLayer, parameterAxisTitle, pathRows, positionEncoding, stateAxisTitle, symbolLayer, symbolRow, type VegaLiteSpec } from "./layers.js";
import { BIFURCATION_PANEL, BRANCH_STYLES, figureConfig, FONT_SIZE, INK, NOMINAL_COLOR, NOMINAL_STYLE, SPECIAL_POINT_MARKERS } from "./palette.js";

/**
 * Bifurcation diagram of one studied parameter: every continued branch of equilibria, one panel
 * per state on a shared parameter axis, drawn solid where stable, dashed where unstable and
 * dotted where the linearisation does not decide; the located special points marked by kind
 * and labelled; the current value as a vertical rule. Each panel's y range is the state's
 * window: branches continue through infeasible states (negative populations), which are cut off.
 */

export type BranchStability = keyof typeof BRANCH_STYLES;

/** px between the two panels (vega-lite's concat spacing); the key spans both. */
const PANEL_SPACING = 14;
/** Height of a panel's title line (px), for sizing the key beside the panels. */
const TITLE_HEIGHT = 18;
/** A special point within this fraction of the window height outside it is drawn on the edge (location and rounding slack). */
const EDGE_SLACK = 1e-6;

const stabilityOf = (stable: boolean | null): BranchStability => (stable === true ? "stable" : stable === false ? "unstable" : "undecided");

/** Axis title for a parameter: its label and name, then its unit. */

/**
 * A branch as pieces of equal stability, in the coordinate `state` against the parameter. A
 * segment between two points takes their common stability; where one end is undecided (a
 * single point at a bifurcation, where an eigenvalue is zero) it takes the other's; where
 * stable meets unstable, each half takes its own end's.
 */
export function branchPieces(branch: BranchResult, state: string): { stability: BranchStability; line: Polyline }[] {
  const pts = branch.points;
  const pieces: { stability: BranchStability; line: Polyline }[] = [];
  const extend = (stability: BranchStability, x0: number, y0: number, x1: number, y1: number) => {
    const last = pieces[pieces.length - 1];
    if (last && last.stability === stability) { last.line.x.push(x1); last.line.y.push(y1); return; }
    pieces.push({ stability, line: { x: [x0, x1], y: [y0, y1] } });
  };
  for (let k = 0; k + 1 < pts.length; k++) {
    const a = pts[k], b = pts[k + 1];
    const [xa, ya, xb, yb] = [a.value, a.point[state], b.value, b.point[state]];
    const sa = stabilityOf(a.stable), sb = stabilityOf(b.stable);
    if (sa === sb || sb === "undecided") extend(sa, xa, ya, xb, yb);
    else if (sa === "undecided") extend(sb, xa, ya, xb, yb);
    else {
      const xm = 0.5 * (xa + xb), ym = 0.5 * (ya + yb);
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

const KIND_SHORT: Record<string, string> = { "saddle-node": "saddle-node", transcritical: "transcritical", hopf: "Hopf", "boundary-crossing": "boundary" };

/** A special point's label in the plot: its kind and parameter value ("saddle-node 1.136", "Hopf (sub) 2.5"). */
export function specialPointLabel(t: Pick<ParameterStudyResult["thresholds"][number], "kind" | "value" | "criticality">): string {
  const kind = t.kind === "hopf" && t.criticality ? `Hopf (${t.criticality === "supercritical" ? "super" : "sub"})` : KIND_SHORT[t.kind] ?? t.kind;
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
  return study.thresholds.filter((t) => t.point[state] >= lo - slack && t.point[state] <= hi + slack && t.value >= study.range[0] && t.value <= study.range[1]);
}

export function buildBifurcationFigure(results: Results, spec: NormalizedSpec, study: ParameterStudyResult): VegaLiteSpec {
  const param = spec.parameters.find((p) => p.name === study.parameter)!;
  const names = results.model.states;
  const used = new Set<BranchStability>();
  const kinds = new Set<string>();
  const labelled = new Set<number>();
  const panels = names.map((name, k) => {
    const state = spec.states.find((s) => s.name === name)!;
    const frame = bifurcationFrame(results, study, name);
    const last = k === names.length - 1;
    const enc = {
      x: positionEncoding("x", [frame.lo[0], frame.hi[0]], last ? parameterAxisTitle(param) : null, last ? { tickCount: 5 } : { tickCount: 5, labels: false }),
      y: positionEncoding("y", [frame.lo[1], frame.hi[1]], null, { tickCount: 4 }),
    };
    const layers: Record<string, unknown>[] = [];
    const pieces = study.continuation.branches.flatMap((b) => branchPieces(b, name).map((p, i) => ({ ...p, key: `B${b.index}.${i}` })));
    // unstable and undecided under stable: where branches overlap, the stable one shows
    for (const stability of ["undecided", "unstable", "stable"] as const) {
      const rows = pathRows(frame, pieces.filter((p) => p.stability === stability));
      if (!rows.length) continue;
      layers.push(lineLayer(`branches_${stability}_${k + 1}`, rows, BRANCH_STYLES[stability], enc));
      used.add(stability);
    }
    const now = roundData(study.nominal);
    layers.push(lineLayer(`now_${k + 1}`, [{ x: now, y: frame.lo[1], k: "now", i: 0 }, { x: now, y: frame.hi[1], k: "now", i: 1 }], NOMINAL_STYLE, enc));
    // labels keep off the rule where they can
    const [ruleU] = toScreen(frame, now, frame.hi[1]);
    const occupied: ScreenBox[] = [{ left: ruleU - 1, right: ruleU + 1, top: 0, bottom: frame.height }];
    if (k === 0) {
      layers.push({
        name: "now_label",
        data: { values: [{ x: now, y: frame.hi[1], text: "now" }] },
        mark: { type: "text", align: "left", baseline: "top", dx: 3, dy: 3, fontSize: FONT_SIZE.annotation, color: NOMINAL_COLOR, fontStyle: "italic" },
        encoding: { ...enc, text: { field: "text", type: "nominal" } },
      });
      occupied.push({ left: ruleU, right: ruleU + 3 + textWidthPx("now", FONT_SIZE.annotation), top: 0, bottom: 3 + FONT_SIZE.annotation + 2 });
    }
    const specials = drawnSpecialPoints(results, study, name);
    const rows = specials.map((t) => {
      kinds.add(t.kind);
      const y = Math.min(frame.hi[1], Math.max(frame.lo[1], t.point[name]));
      return symbolRow(t.value, y, SPECIAL_POINT_MARKERS[t.kind], `${t.kind} ${t.value}`);
    });
    if (rows.length) layers.push(symbolLayer(`special_points_${k + 1}`, rows, enc));
    // each point labelled once, in the first panel that draws it
    occupied.push(...rows.map((r) => markerBox(frame, r.x, r.y)));
    const toLabel = specials.map((t, i) => ({ t, r: rows[i] })).filter(({ t }) => !labelled.has(study.thresholds.indexOf(t)));
    for (const { t } of toLabel) labelled.add(study.thresholds.indexOf(t));
    const placed = placeLabels(frame, toLabel.map(({ t, r }) => ({ x: r.x, y: r.y, text: specialPointLabel(t) })), (s) => textWidthPx(s, FONT_SIZE.annotation), occupied);
    layers.push(...labelLayers(`special_labels_${k + 1}`, placed, enc));
    return {
      width: frame.width,
      height: frame.height,
      title: { text: stateAxisTitle(state), anchor: "start", frame: "group", fontSize: FONT_SIZE.axisTitle, fontWeight: "normal", color: INK, offset: 4 },
      layer: layers,
    };
  });
  const key: KeyEntry[] = [
    ...(["stable", "unstable", "undecided"] as const).filter((s) => used.has(s)).map((s): KeyEntry => ({ kind: "line", style: BRANCH_STYLES[s] })),
    { kind: "line", style: { ...NOMINAL_STYLE, label: `current value (now), ${study.parameter} = ${labelNumber(study.nominal)}` } },
    ...(["saddle-node", "transcritical", "hopf", "boundary-crossing"] as const).filter((c) => kinds.has(c)).map((c): KeyEntry => ({ kind: "symbol", marker: SPECIAL_POINT_MARKERS[c] })),
  ];
  const height = names.length * (BIFURCATION_PANEL.height + TITLE_HEIGHT) + (names.length - 1) * PANEL_SPACING;
  return {
    config: figureConfig(),
    padding: 6,
    hconcat: [{ vconcat: panels, spacing: PANEL_SPACING, resolve: { scale: { x: "shared" } } }, buildKey(key, height)],
  };
}

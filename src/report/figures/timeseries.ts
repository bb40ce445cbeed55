import type { EquilibriumResult, Results, ScenarioResult } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { roundData } from "./geometry.js";
import { lineLayer, panelTitle, stateAxisTitle, textLayer, type VegaLiteSpec } from "./layers.js";
import { FONT_SIZE, FRAME, figureConfig, LINE_STYLES, TIME_PANEL } from "./palette.js";

/** A flat series still gets a visible y range: ± this fraction of its level (or ± 1 at level 0). */
const FLAT_SERIES_SPREAD = 0.05;

function valueDomain(values: number[]): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (!finite.length) return [0, 1];
  let lo = Math.min(...finite),
    hi = Math.max(...finite);
  if (!(hi - lo > 1e-9 * Math.max(Math.abs(lo), Math.abs(hi)))) {
    const pad = lo === 0 ? 1 : FLAT_SERIES_SPREAD * Math.abs(lo);
    lo -= pad;
    hi += pad;
  }
  return [lo, hi];
}

/** The equilibrium the scenario settles on, or null when its fate is another. */
function settledOn(results: Results, scenario: ScenarioResult): EquilibriumResult | null {
  const fate = scenario.fate;
  return fate.kind === "equilibrium" ? (results.equilibria.find((e) => e.id === fate.target) ?? null) : null;
}

function panelEncoding(
  timeDomain: [number, number],
  domain: [number, number],
  timeUnit: string,
  last: boolean,
) {
  return {
    x: {
      field: "x",
      type: "quantitative",
      scale: { domain: timeDomain, nice: false, zero: false },
      // one time axis for both panels: tick labels and title only under the lower one
      axis: last
        ? { title: `time (${timeUnit})`, tickCount: 8 }
        : { title: null, labels: false, tickCount: 8 },
    },
    y: {
      field: "y",
      type: "quantitative",
      scale: { domain, nice: true, zero: false },
      axis: { title: null, tickCount: 5 },
    },
  };
}

/** Where the scenario ends up: a dashed level with the equilibrium's id at the right. */
function levelLayers(
  k: number,
  target: EquilibriumResult,
  level: number,
  timeDomain: [number, number],
  enc: Record<string, unknown>,
) {
  const y = roundData(level);
  const rows = [
    { x: timeDomain[0], y, k: "level", i: 0 },
    { x: timeDomain[1], y, k: "level", i: 1 },
  ];
  const mark = {
    align: "right",
    baseline: "bottom",
    dx: -3,
    dy: -3,
    fontSize: FONT_SIZE.annotation,
    color: FRAME,
  };
  return [
    lineLayer(`level_${k + 1}`, rows, LINE_STYLES.reference, enc),
    textLayer(`level_label_${k + 1}`, [{ x: timeDomain[1], y, text: target.id }], mark, enc),
  ];
}

/** The panel of the k-th state: its series, over the level of the equilibrium it settles on. */
function timeSeriesPanel(
  results: Results,
  spec: NormalizedSpec,
  scenario: ScenarioResult,
  timeDomain: [number, number],
  k: number,
) {
  const names = results.model.states;
  const state = spec.states.find((s) => s.name === names[k])!;
  const series = scenario.series;
  const values = k === 0 ? series.x : series.y;
  const rows = series.t.map((t, i) => ({ x: roundData(t), y: roundData(values[i]), k: scenario.name, i }));
  const target = settledOn(results, scenario);
  const level = target ? target.point[names[k]] : null;
  const domain = valueDomain(level === null ? values : [...values, level]);
  const enc = panelEncoding(timeDomain, domain, spec.timeUnit, k === names.length - 1);
  return {
    width: TIME_PANEL.width,
    height: TIME_PANEL.height,
    // the panel title names the state and its unit, so the y axis needs none
    title: panelTitle(stateAxisTitle(state)),
    layer: [
      ...(target && level !== null ? levelLayers(k, target, level, timeDomain, enc) : []),
      lineLayer(`series_${k + 1}`, rows, LINE_STYLES.scenario, enc),
    ],
  };
}

/** Each state of one scenario against time: two panels stacked on a shared time axis (the states have different units). */
export function buildTimeSeriesFigure(
  results: Results,
  spec: NormalizedSpec,
  scenario: ScenarioResult,
): VegaLiteSpec {
  const t = scenario.series.t;
  const tEnd = t[t.length - 1] ?? 0;
  const timeDomain: [number, number] = [0, tEnd > 0 ? tEnd : 1];
  const panels = results.model.states.map((_, k) => timeSeriesPanel(results, spec, scenario, timeDomain, k));
  return { config: figureConfig(), padding: 6, vconcat: panels, resolve: { scale: { x: "shared" } } };
}

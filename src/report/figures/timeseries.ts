import type { Results, ScenarioResult } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { roundData } from "./geometry.js";
import { lineLayer, stateAxisTitle, type VegaLiteSpec } from "./layers.js";
import { FONT_SIZE, FRAME, figureConfig, INK, LINE_STYLES, TIME_PANEL } from "./palette.js";

/** A flat series still gets a visible y range: ± this fraction of its level (or ± 1 at level 0). */
const FLAT_SERIES_SPREAD = 0.05;

function valueDomain(values: number[]): [number, number] {
  const finite = values.filter(Number.isFinite);
  if (!finite.length) return [0, 1];
  let lo = Math.min(...finite), hi = Math.max(...finite);
  if (!(hi - lo > 1e-9 * Math.max(Math.abs(lo), Math.abs(hi)))) {
    const pad = lo === 0 ? 1 : FLAT_SERIES_SPREAD * Math.abs(lo);
    lo -= pad; hi += pad;
  }
  return [lo, hi];
}

/** Each state of one scenario against time: two panels stacked on a shared time axis (the states have different units). */
export function buildTimeSeriesFigure(results: Results, spec: NormalizedSpec, scenario: ScenarioResult): VegaLiteSpec {
  const names = results.model.states;
  const series = scenario.series;
  const target = scenario.fate.kind === "equilibrium" ? results.equilibria.find((e) => e.id === (scenario.fate as { target: string }).target) ?? null : null;
  const tEnd = series.t[series.t.length - 1] ?? 0;
  const timeDomain: [number, number] = [0, tEnd > 0 ? tEnd : 1];

  const panels = names.map((name, k) => {
    const state = spec.states.find((s) => s.name === name)!;
    const values = k === 0 ? series.x : series.y;
    const rows = series.t.map((t, i) => ({ x: roundData(t), y: roundData(values[i]), k: scenario.name, i }));
    const level = target ? target.point[name] : null;
    const domain = valueDomain(level === null ? values : [...values, level]);
    const last = k === names.length - 1;
    const enc = {
      x: {
        field: "x", type: "quantitative", scale: { domain: timeDomain, nice: false, zero: false },
        // one time axis for both panels: tick labels and title only under the lower one
        axis: last ? { title: `time (${spec.timeUnit})`, tickCount: 8 } : { title: null, labels: false, tickCount: 8 },
      },
      y: { field: "y", type: "quantitative", scale: { domain, nice: true, zero: false }, axis: { title: null, tickCount: 5 } },
    };
    const layers: Record<string, unknown>[] = [];
    if (target && level !== null) {
      // where the scenario ends up: a dashed level with the equilibrium's id at the right
      layers.push(lineLayer(`level_${k + 1}`, [{ x: timeDomain[0], y: roundData(level), k: "level", i: 0 }, { x: timeDomain[1], y: roundData(level), k: "level", i: 1 }], LINE_STYLES.reference, enc));
      layers.push({
        name: `level_label_${k + 1}`,
        data: { values: [{ x: timeDomain[1], y: roundData(level), text: target.id }] },
        mark: { type: "text", align: "right", baseline: "bottom", dx: -3, dy: -3, fontSize: FONT_SIZE.annotation, color: FRAME },
        encoding: { x: enc.x, y: enc.y, text: { field: "text", type: "nominal" } },
      });
    }
    layers.push(lineLayer(`series_${k + 1}`, rows, LINE_STYLES.scenario, enc));
    return {
      width: TIME_PANEL.width,
      height: TIME_PANEL.height,
      // the panel title names the state and its unit, so the y axis needs none
      title: { text: stateAxisTitle(state), anchor: "start", frame: "group", fontSize: FONT_SIZE.axisTitle, fontWeight: "normal", color: INK, offset: 4 },
      layer: layers,
    };
  });
  return { config: figureConfig(), padding: 6, vconcat: panels, resolve: { scale: { x: "shared" } } };
}

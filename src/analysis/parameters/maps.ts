import type { Model } from "../../model/types.js";
import { withParameters } from "../../model/parameters.js";
import { classifyOutcome, outcomeKey, type OutcomeResult } from "./outcomes.js";
import type { ParameterStudyResult } from "./study.js";
import { traceThresholdCurve } from "./curves.js";
import { MAP_RESOLUTION } from "../constants.js";

/**
 * Two-parameter outcome maps: a grid over both ranges labelled by outcome (the set of
 * attractors), with the threshold curves continued from the thresholds located in the
 * one-parameter studies, by natural-parameter continuation of the defining system
 * (equilibrium plus test function) in the second parameter.
 */
export interface OutcomeMapResult {
  parameters: [string, string];
  ranges: [[number, number], [number, number]];
  nominal: [number, number];
  nx: number;
  ny: number;
  /** The outcomes (attractors only), in the order first met; cells index into it. */
  legend: OutcomeResult[];
  /** Row-major from the lowest value of the second parameter. */
  cells: number[];
  /** Each curve is continued from a threshold located in the one-parameter study of `origin.parameter`. */
  curves: { kind: string; origin: { parameter: string; value: number }; points: [number, number][] }[];
}

/** The ranges of a map's two parameters, in pair order. */
export function mapRanges(model: Model, pair: [string, string]): [[number, number], [number, number]] {
  const [a, b] = pair.map((name) => model.spec.parameters.find((p) => p.name === name)!.range!);
  return [a, b];
}

/** The outcomes (attractors only) at the cell centres of row `b` of the map, by increasing first parameter. */
export function outcomeRow(
  model: Model,
  pair: [string, string],
  ranges: [[number, number], [number, number]],
  b: number,
  n = MAP_RESOLUTION,
): OutcomeResult[] {
  const [i, j] = pair.map((name) => model.parameterNames.indexOf(name));
  const row: OutcomeResult[] = [];
  for (let a = 0; a < n; a++) {
    const p = Float64Array.from(model.parameterValues);
    p[i] = ranges[0][0] + ((ranges[0][1] - ranges[0][0]) * (a + 0.5)) / n;
    p[j] = ranges[1][0] + ((ranges[1][1] - ranges[1][0]) * (b + 0.5)) / n;
    row.push(classifyOutcome(withParameters(model, p), false));
  }
  return row;
}

/** The legend (outcomes in the order first met, row by row) and the cells indexing into it. */
function assembleOutcomeGrid(rows: OutcomeResult[][]): { legend: OutcomeResult[]; cells: number[] } {
  const legend: OutcomeResult[] = [];
  const keys: string[] = [];
  const cells: number[] = [];
  for (const outcome of rows.flat()) {
    let k = keys.indexOf(outcomeKey(outcome));
    if (k < 0) {
      k = legend.length;
      keys.push(outcomeKey(outcome));
      legend.push(outcome);
    }
    cells.push(k);
  }
  return { legend, cells };
}

export function buildOutcomeMap(
  model: Model,
  pair: [string, string],
  studies: ParameterStudyResult[],
  rows: OutcomeResult[][] = Array.from({ length: MAP_RESOLUTION }, (_, b) =>
    outcomeRow(model, pair, mapRanges(model, pair), b),
  ),
): OutcomeMapResult {
  const idx = pair.map((n) => model.parameterNames.indexOf(n)) as [number, number];
  const ranges = mapRanges(model, pair);
  const { legend, cells } = assembleOutcomeGrid(rows);
  const curves: OutcomeMapResult["curves"] = [];
  for (const [which, study] of [
    [0, studies.find((s) => s.parameter === pair[0])],
    [1, studies.find((s) => s.parameter === pair[1])],
  ] as const) {
    if (!study) continue;
    for (const t of study.thresholds.filter(
      (q) => (q.decisive && q.kind !== "boundary-crossing") || (q.decisive && q.bound),
    )) {
      // continue in the other parameter; a threshold of the second parameter is continued with the roles swapped
      const order: [number, number] = which === 0 ? [idx[0], idx[1]] : [idx[1], idx[0]];
      const orderRanges: [[number, number], [number, number]] = which === 0 ? ranges : [ranges[1], ranges[0]];
      const points = traceThresholdCurve(model, order, orderRanges, t);
      curves.push({
        kind: t.kind,
        origin: { parameter: study.parameter, value: t.value },
        points: which === 0 ? points : points.map(([a, b]) => [b, a]),
      });
    }
  }
  return {
    parameters: pair,
    ranges,
    nominal: [model.parameterValues[idx[0]], model.parameterValues[idx[1]]],
    nx: MAP_RESOLUTION,
    ny: MAP_RESOLUTION,
    legend,
    cells,
    curves,
  };
}

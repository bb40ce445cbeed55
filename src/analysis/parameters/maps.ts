import type { Model } from "../../model/types.js";
import { withParameters } from "../../model/parameters.js";
import { classifyOutcome, outcomeKey, type OutcomeResult } from "./outcomes.js";
import type { ParameterStudyResult } from "./study.js";
import { traceThresholdCurve } from "./curves.js";
import { refineLabelGrid, type BoundaryCurve, type LabelGrid } from "../numeric/label-grid.js";
import type { Box } from "../numeric/window.js";
import { MAP_COARSE, MAP_RESOLUTION } from "../constants.js";

/**
 * Two-parameter outcome maps: a grid over both ranges labelled by outcome (the set of
 * attractors), refined adaptively (numeric/label-grid.ts) from a coarse uniform pass down to
 * MAP_RESOLUTION cells a side, only where neighbouring outcomes differ or a threshold curve
 * passes. The threshold curves are continued from the thresholds located in the one-parameter
 * studies, by natural-parameter continuation of the defining system (equilibrium plus test
 * function) in the second parameter, and traced before the grid so that the refinement follows
 * them.
 */
export interface OutcomeMapResult {
  parameters: [string, string];
  ranges: [[number, number], [number, number]];
  nominal: [number, number];
  nx: number;
  ny: number;
  /** Cells per side of the first, uniform pass of the refinement. */
  coarse: number;
  /** Outcomes evaluated (cell centres at every level); a uniform map evaluates nx · ny. */
  evaluations: number;
  /** Finest cells next to a cell of another outcome or crossed by a threshold curve: either side's outcome may hold in them. */
  uncertainCells: number;
  /** The outcomes (attractors only), in the order first met row by row; cells index into it. */
  legend: OutcomeResult[];
  /** Row-major from the lowest value of the second parameter. */
  cells: number[];
  /** Each curve is continued from a threshold located in the one-parameter study of `origin.parameter`. */
  curves: { kind: string; origin: { parameter: string; value: number }; points: [number, number][] }[];
}

/** Points of one map to classify: (first, second parameter) pairs, flat. */
export interface MapRequest {
  map: number;
  points: Float64Array;
}

/** The ranges of a map's two parameters, in pair order. */
export function mapRanges(model: Model, pair: [string, string]): [[number, number], [number, number]] {
  const [a, b] = pair.map((name) => model.spec.parameters.find((p) => p.name === name)!.range!);
  return [a, b];
}

/** The outcomes (attractors only) at parameter points (first, second, first, second, …) of a pair. */
export function outcomesAt(model: Model, pair: [string, string], points: ArrayLike<number>): OutcomeResult[] {
  const [i, j] = pair.map((name) => model.parameterNames.indexOf(name));
  const out: OutcomeResult[] = [];
  for (let k = 0; k + 1 < points.length; k += 2) {
    const p = Float64Array.from(model.parameterValues);
    p[i] = points[k];
    p[j] = points[k + 1];
    out.push(classifyOutcome(withParameters(model, p), false));
  }
  return out;
}

/** The threshold curves of a map, continued from the decisive thresholds of both parameters' studies. */
function traceMapCurves(
  model: Model,
  pair: [string, string],
  studies: ParameterStudyResult[],
): OutcomeMapResult["curves"] {
  const idx = pair.map((n) => model.parameterNames.indexOf(n)) as [number, number];
  const ranges = mapRanges(model, pair);
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
  return curves;
}

/** One map under refinement: its grid generator and the outcomes met so far, each once by key. */
interface MapDraft {
  pair: [string, string];
  curves: OutcomeMapResult["curves"];
  grid: Generator<Float64Array, LabelGrid, Int32Array>;
  keys: Map<string, number>;
  outcomes: OutcomeResult[];
}

function startMap(model: Model, pair: [string, string], studies: ParameterStudyResult[]): MapDraft {
  const ranges = mapRanges(model, pair);
  const box: Box = {
    lo: [ranges[0][0], ranges[1][0]],
    hi: [ranges[0][1], ranges[1][1]],
    width: [ranges[0][1] - ranges[0][0], ranges[1][1] - ranges[1][0]],
  };
  const curves = traceMapCurves(model, pair, studies);
  const boundaries: BoundaryCurve[] = curves.map((c) => ({
    x: c.points.map((q) => q[0]),
    y: c.points.map((q) => q[1]),
  }));
  const grid = refineLabelGrid(box, { resolution: MAP_RESOLUTION, coarse: MAP_COARSE }, boundaries);
  return { pair, curves, grid, keys: new Map(), outcomes: [] };
}

/** Labels for a batch of outcomes: the index of each outcome's key among those met so far. */
function internOutcomes(draft: MapDraft, found: OutcomeResult[]): Int32Array {
  return Int32Array.from(found, (o) => {
    const key = outcomeKey(o);
    let label = draft.keys.get(key);
    if (label === undefined) {
      label = draft.outcomes.length;
      draft.keys.set(key, label);
      draft.outcomes.push(o);
    }
    return label;
  });
}

/** The finished map: the legend renumbered in the order first met row by row, so it does not depend on the order of evaluation. */
function finishMap(model: Model, draft: MapDraft, grid: LabelGrid): OutcomeMapResult {
  const idx = draft.pair.map((n) => model.parameterNames.indexOf(n)) as [number, number];
  const renumber = new Map<number, number>();
  const legend: OutcomeResult[] = [];
  const cells = Array.from(grid.labels, (label) => {
    let k = renumber.get(label);
    if (k === undefined) {
      k = legend.length;
      renumber.set(label, k);
      legend.push(draft.outcomes[label]);
    }
    return k;
  });
  return {
    parameters: draft.pair,
    ranges: mapRanges(model, draft.pair),
    nominal: [model.parameterValues[idx[0]], model.parameterValues[idx[1]]],
    nx: grid.resolution,
    ny: grid.resolution,
    coarse: MAP_COARSE,
    evaluations: grid.evaluations,
    uncertainCells: grid.uncertainCells,
    legend,
    cells,
    curves: draft.curves,
  };
}

/**
 * Every map the spec asks for, refined level by level in lockstep: a generator that yields each
 * level's points of every unfinished map and takes their outcomes, in request order, from
 * whichever driver classifies them (this thread, or a worker pool).
 */
export function* refineOutcomeMaps(
  model: Model,
  studies: ParameterStudyResult[],
): Generator<MapRequest[], OutcomeMapResult[], OutcomeResult[][]> {
  const drafts = model.spec.analysis.parameterPairs.map((pair) => startMap(model, pair, studies));
  const steps = drafts.map((d) => d.grid.next(undefined as unknown as Int32Array));
  for (;;) {
    const requests: MapRequest[] = [];
    steps.forEach((s, map) => {
      if (!s.done) requests.push({ map, points: s.value });
    });
    if (!requests.length) break;
    const answers: OutcomeResult[][] = yield requests;
    requests.forEach(({ map }, k) => {
      steps[map] = drafts[map].grid.next(internOutcomes(drafts[map], answers[k]));
    });
  }
  return drafts.map((d, k) => {
    const s = steps[k];
    if (!s.done) throw new Error("outcome map refinement stopped early");
    return finishMap(model, d, s.value);
  });
}

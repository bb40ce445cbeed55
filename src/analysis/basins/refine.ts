import type { Box } from "../numeric/window.js";
import {
  refineLabelGrid,
  type BoundaryCurve,
  type LabelGrid,
  type LabelGridOptions,
} from "../numeric/label-grid.js";
import { labelName, LABEL_UNDECIDED } from "./labels.js";

export type { BoundaryCurve } from "../numeric/label-grid.js";

/** Labels a batch of starts (x0, y0, x1, y1, ...). Implementations may fan out to workers; labels depend only on each start. */
export type BatchEvaluator = (starts: Float64Array) => Promise<Int32Array>;
export type SyncBatchEvaluator = (starts: Float64Array) => Int32Array;

export type BasinGridOptions = LabelGridOptions;

export interface BasinGrid extends Omit<LabelGrid, "evaluations"> {
  /** Trajectories integrated (one per labelled cell centre). */
  trajectories: number;
}

/**
 * The basin map's adaptive refinement (numeric/label-grid.ts) over the window: the points are
 * trajectory starts, labelled by the attractor each reaches; the saddles' stable manifolds are the
 * known boundaries, and undecided starts count as uncertain cells.
 */
export function* basinRefinement(
  box: Box,
  options: BasinGridOptions,
  boundaries: readonly BoundaryCurve[] = [],
): Generator<Float64Array, BasinGrid, Int32Array> {
  const { evaluations, ...grid } = yield* refineLabelGrid(box, options, boundaries, LABEL_UNDECIDED);
  return { ...grid, trajectories: evaluations };
}

/** Run-length encoding of the label grid, row by row from the lowest second-state row: [value, count, value, count, ...]. */
export function encodeRuns(labels: Int32Array, legendIndex: (label: number) => number): number[] {
  const runs: number[] = [];
  let current = legendIndex(labels[0]);
  let count = 0;
  for (let k = 0; k < labels.length; k++) {
    const v = legendIndex(labels[k]);
    if (v === current) count++;
    else {
      runs.push(current, count);
      current = v;
      count = 1;
    }
  }
  runs.push(current, count);
  return runs;
}

export function decodeRuns(runs: number[], length: number): Int32Array {
  const out = new Int32Array(length);
  let at = 0;
  for (let k = 0; k < runs.length; k += 2) {
    out.fill(runs[k], at, at + runs[k + 1]);
    at += runs[k + 1];
  }
  if (at !== length) throw new Error(`run-length data covers ${at} cells, expected ${length}`);
  return out;
}

/** Area fraction of each label, in the order of `legend`. */
export function labelFractions(labels: Int32Array, attractors: string[]): Record<string, number> {
  const counts = new Map<number, number>();
  for (const v of labels) counts.set(v, (counts.get(v) ?? 0) + 1);
  const keys = [...counts.keys()].sort((a, b) => (a < 0 && b < 0 ? b - a : a < 0 ? 1 : b < 0 ? -1 : a - b));
  return Object.fromEntries(keys.map((k) => [labelName(k, attractors), counts.get(k)! / labels.length]));
}

export function runRefinementSync(
  gen: Generator<Float64Array, BasinGrid, Int32Array>,
  evaluate: SyncBatchEvaluator,
): BasinGrid {
  let step = gen.next(undefined as unknown as Int32Array);
  while (!step.done) step = gen.next(evaluate(step.value));
  return step.value;
}

export async function runRefinementAsync(
  gen: Generator<Float64Array, BasinGrid, Int32Array>,
  evaluate: BatchEvaluator,
): Promise<BasinGrid> {
  let step = gen.next(undefined as unknown as Int32Array);
  while (!step.done) step = gen.next(await evaluate(step.value));
  return step.value;
}

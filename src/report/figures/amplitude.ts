import type { ParameterStudyResult } from "../../analysis/types.js";
import type { CycleBranchResult } from "../../analysis/parameters/continuation/index.js";
import type { PlotFrame, Polyline } from "./geometry.js";
import { pathLayer } from "./layers.js";
import { LINE_STYLES } from "./palette.js";

/**
 * The amplitude of the cycles born at Hopf points, for the bifurcation diagram: each state's least
 * and greatest value over the orbit against the parameter (parameters/cycle-branch.ts), in the
 * periodic-orbit teal of the portrait, solid where the orbit attracts and dashed where not.
 */

export type CycleKind = "attracting" | "other";

/** One cycle branch in `state` as runs of equal stability, each a max and a min line, the first from the Hopf point's equilibrium. */
export function amplitudeRuns(
  cycle: CycleBranchResult,
  state: string,
): { kind: CycleKind; max: Polyline; min: Polyline }[] {
  const runs: { kind: CycleKind; max: Polyline; min: Polyline }[] = [];
  let last = { x: cycle.hopf, max: cycle.point[state], min: cycle.point[state] };
  for (const q of cycle.points) {
    const kind: CycleKind = q.stability === "stable" ? "attracting" : "other";
    let run = runs[runs.length - 1];
    if (!run || run.kind !== kind) {
      run = { kind, max: { x: [last.x], y: [last.max] }, min: { x: [last.x], y: [last.min] } };
      runs.push(run);
    }
    run.max.x.push(q.value);
    run.max.y.push(q.max[state]);
    run.min.x.push(q.value);
    run.min.y.push(q.min[state]);
    last = { x: q.value, max: q.max[state], min: q.min[state] };
  }
  return runs;
}

/**
 * The amplitude of each cycle branch in `state`: the least and the greatest value over the orbit
 * against the parameter, from the Hopf point's equilibrium on; solid where the orbit attracts.
 */
export function cycleBranchLayers(
  study: ParameterStudyResult,
  state: string,
  frame: PlotFrame,
  enc: Record<string, unknown>,
  k: number,
) {
  const runs = study.continuation.cycles.flatMap((c, b) =>
    amplitudeRuns(c, state).flatMap((r, i) => [
      { kind: r.kind, key: `C${b}.${i}.max`, line: r.max },
      { kind: r.kind, key: `C${b}.${i}.min`, line: r.min },
    ]),
  );
  const layers: Record<string, unknown>[] = [];
  const drawn: CycleKind[] = [];
  for (const kind of ["other", "attracting"] as const) {
    const style = kind === "attracting" ? LINE_STYLES.cycleStable : LINE_STYLES.cycleOther;
    const paths = runs.filter((r) => r.kind === kind);
    const layer = pathLayer(`cycle_amplitude_${kind}_${k + 1}`, frame, paths, style, enc);
    if (!layer) continue;
    layers.push(layer);
    drawn.push(kind);
  }
  return { layers, drawn };
}

/** Key labels of the amplitude lines. */
export const CYCLE_KEY_LABELS: Record<CycleKind, string> = {
  attracting: "periodic orbit's least and greatest value, attracting",
  other: "periodic orbit's least and greatest value, not attracting",
};

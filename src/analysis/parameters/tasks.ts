import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import type { InvasionConditionResult } from "./invasion.js";
import type { OutcomeResult } from "./outcomes.js";
import { studyParameter, type ParameterStudyResult } from "./study.js";
import { buildOutcomeMap, mapRanges, outcomeRow, type OutcomeMapResult } from "./maps.js";
import { MAP_RESOLUTION } from "../constants.js";

/**
 * The parameter work of one analysis, cut into independent tasks of plain data: each parameter's
 * study, and each row of each outcome map. A task names no function and holds no compiled code,
 * so a worker thread can run it on its own compilation of the same spec; the answers are put
 * together in task order, so they do not depend on where or in which order the tasks ran.
 */
export type ParameterTask =
  | { kind: "study"; parameter: string; invasion: InvasionConditionResult[] }
  /** map: the pair's index in the spec's analysis.parameterPairs; row: from the lowest value of its second parameter. */
  | { kind: "map-row"; map: number; pair: [string, string]; row: number };

export type ParameterTaskResult =
  | { kind: "study"; study: ParameterStudyResult; diagnostics: Diagnostic[] }
  | { kind: "map-row"; outcomes: OutcomeResult[] };

/** Runs tasks somewhere (in this thread, or on a worker pool) and answers in task order. */
export type ParameterTaskRunner = (model: Model, tasks: ParameterTask[]) => Promise<ParameterTaskResult[]>;

/** Every study the spec asks for, then every row of every map. */
export function planParameterTasks(model: Model, invasion: InvasionConditionResult[]): ParameterTask[] {
  const studies = model.spec.analysis.parameters.map((parameter): ParameterTask => ({
    kind: "study",
    parameter,
    invasion,
  }));
  const rows = model.spec.analysis.parameterPairs.flatMap((pair, map) =>
    Array.from({ length: MAP_RESOLUTION }, (_, row): ParameterTask => ({ kind: "map-row", map, pair, row })),
  );
  return [...studies, ...rows];
}

/** One task, on `model` (the spec's model at its nominal values). Pure and deterministic. */
export function runParameterTask(model: Model, task: ParameterTask): ParameterTaskResult {
  if (task.kind === "study") {
    const diagnostics: Diagnostic[] = [];
    const range = model.spec.parameters.find((p) => p.name === task.parameter)!.range!;
    const study = studyParameter(model, task.parameter, range, task.invasion, diagnostics);
    return { kind: "study", study, diagnostics };
  }
  return { kind: "map-row", outcomes: outcomeRow(model, task.pair, mapRanges(model, task.pair), task.row) };
}

/**
 * The studies and maps from the tasks' answers (in task order); each study's diagnostics join
 * `diagnostics` in study order, as if the studies had run one after another here.
 */
export function assembleParameterWork(
  model: Model,
  tasks: ParameterTask[],
  answers: ParameterTaskResult[],
  diagnostics: Diagnostic[],
): { studies: ParameterStudyResult[]; maps: OutcomeMapResult[] } {
  const studies: ParameterStudyResult[] = [];
  const pairs = model.spec.analysis.parameterPairs;
  const rows: OutcomeResult[][][] = pairs.map(() => []);
  answers.forEach((answer, k) => {
    const task = tasks[k];
    if (answer.kind === "study") {
      studies.push(answer.study);
      diagnostics.push(...answer.diagnostics);
    } else if (task.kind === "map-row") rows[task.map][task.row] = answer.outcomes;
  });
  const maps = pairs.map((pair, k) => buildOutcomeMap(model, pair, studies, rows[k]));
  return { studies, maps };
}

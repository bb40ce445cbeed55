import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import type { InvasionConditionResult } from "./invasion.js";
import type { OutcomeResult } from "./outcomes.js";
import { studyParameter, type ParameterStudyResult } from "./study.js";
import { outcomesAt, refineOutcomeMaps, type MapRequest, type OutcomeMapResult } from "./maps.js";
import { MAP_POINTS_PER_TASK } from "../constants.js";

/**
 * The parameter work of one analysis, cut into independent tasks of plain data: each parameter's
 * study, then each level of each outcome map's refinement in chunks of points. A task names no
 * function and holds no compiled code, so a worker thread can run it on its own compilation of
 * the same spec; the answers are put together in task order, so they do not depend on where or
 * in which order the tasks ran.
 */
export type ParameterTask =
  | { kind: "study"; parameter: string; invasion: InvasionConditionResult[] }
  /** map: the pair's index in the spec's analysis.parameterPairs; points: (first, second) values, flat. */
  | { kind: "map-points"; map: number; pair: [string, string]; points: number[] };

export type ParameterTaskResult =
  | { kind: "study"; study: ParameterStudyResult; diagnostics: Diagnostic[] }
  | { kind: "map-points"; outcomes: OutcomeResult[] };

/** Runs tasks somewhere (in this thread, or on a worker pool) and answers in task order. */
export type ParameterTaskRunner = (model: Model, tasks: ParameterTask[]) => Promise<ParameterTaskResult[]>;

/** One task, on `model` (the spec's model at its nominal values). Pure and deterministic. */
export function runParameterTask(model: Model, task: ParameterTask): ParameterTaskResult {
  if (task.kind === "study") {
    const diagnostics: Diagnostic[] = [];
    const range = model.spec.parameters.find((p) => p.name === task.parameter)!.range!;
    const study = studyParameter(model, task.parameter, range, task.invasion, diagnostics);
    return { kind: "study", study, diagnostics };
  }
  return { kind: "map-points", outcomes: outcomesAt(model, task.pair, task.points) };
}

/** Each request's points cut into tasks of at most MAP_POINTS_PER_TASK points, in request order. */
function mapTasks(model: Model, requests: MapRequest[]): ParameterTask[] {
  const pairs = model.spec.analysis.parameterPairs;
  return requests.flatMap(({ map, points }) => {
    const tasks: ParameterTask[] = [];
    for (let k = 0; k < points.length; k += 2 * MAP_POINTS_PER_TASK)
      tasks.push({
        kind: "map-points",
        map,
        pair: pairs[map],
        points: Array.from(points.subarray(k, k + 2 * MAP_POINTS_PER_TASK)),
      });
    return tasks;
  });
}

/** The outcomes of each request, joined again from its tasks' answers. */
function joinMapAnswers(
  requests: MapRequest[],
  tasks: ParameterTask[],
  answers: ParameterTaskResult[],
): OutcomeResult[][] {
  const joined: OutcomeResult[][] = requests.map(() => []);
  answers.forEach((answer, k) => {
    const task = tasks[k];
    if (answer.kind !== "map-points" || task.kind !== "map-points")
      throw new Error("map task answered out of kind");
    joined[requests.findIndex((r) => r.map === task.map)].push(...answer.outcomes);
  });
  return joined;
}

/**
 * The parameter work as a generator of task batches: every study the spec asks for at once, then
 * the outcome maps level by level (their refinement follows the threshold curves the studies
 * located). Each study's diagnostics join `diagnostics` in study order, as if the studies had run
 * one after another here.
 */
export function* runParameterWork(
  model: Model,
  invasion: InvasionConditionResult[],
  diagnostics: Diagnostic[],
): Generator<
  ParameterTask[],
  { studies: ParameterStudyResult[]; maps: OutcomeMapResult[] },
  ParameterTaskResult[]
> {
  const studyTasks = model.spec.analysis.parameters.map((parameter): ParameterTask => ({
    kind: "study",
    parameter,
    invasion,
  }));
  const studies: ParameterStudyResult[] = [];
  if (studyTasks.length)
    for (const answer of yield studyTasks) {
      if (answer.kind !== "study") throw new Error("study task answered out of kind");
      studies.push(answer.study);
      diagnostics.push(...answer.diagnostics);
    }
  const maps = refineOutcomeMaps(model, studies);
  let step = maps.next(undefined as unknown as OutcomeResult[][]);
  while (!step.done) {
    const tasks = mapTasks(model, step.value);
    step = maps.next(joinMapAnswers(step.value, tasks, yield tasks));
  }
  return { studies, maps: step.value };
}

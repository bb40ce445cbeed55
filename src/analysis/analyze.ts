import type { Model } from "../model/types.js";
import type { Diagnostic } from "../diagnostics/issue.js";
import { KEEL_VERSION, RESULTS_FORMAT } from "../version.js";
import { findEquilibriumCandidates, type EquilibriumOptions } from "./phase/equilibria.js";
import { findSingularities } from "./phase/singularities.js";
import type { EquilibriumResult } from "./phase/equilibria.js";
import type { SingularityResult } from "./phase/singularities/types.js";
import { evaluateAssumptions } from "./checks/assumptions.js";
import type { Results } from "./types.js";
import { windowOf } from "./numeric/window.js";
import { buildFlowContext } from "./flow/follow.js";
import {
  CycleRegistry,
  flowTimeScale,
  integratePortrait,
  integrateScenarios,
  type TrajectoryOptions,
} from "./flow/trajectories.js";
import { findSeparatrices } from "./flow/manifolds.js";
import {
  assembleBasinResult,
  planBasins,
  startRefinement,
  type BasinOptions,
  type BasinPlan,
} from "./basins/index.js";
import { instantiateBasinKernel } from "./basins/kernel.js";
import { runRefinementAsync, runRefinementSync, type BatchEvaluator } from "./basins/refine.js";
import { findNullclines, type NullclineOptions } from "./phase/nullclines.js";
import { findRegions, type RegionOptions } from "./phase/regions.js";
import { findInvasionConditions } from "./parameters/invasion.js";
import {
  runParameterWork,
  runParameterTask,
  type ParameterTask,
  type ParameterTaskResult,
  type ParameterTaskRunner,
} from "./parameters/tasks.js";
import { findAssumptionFlips } from "./checks/assumptions.js";
import { checkClaims } from "./checks/claims.js";
import { computeDirectionField, type DirectionFieldOptions } from "./phase/field.js";
import {
  BASIN_ABSOLUTE_TOL_OF_WIDTH,
  BASIN_RELATIVE_TOL,
  DEFAULT_BASIN_OPTIONS,
  DEFAULT_DIRECTION_FIELD_OPTIONS,
  DEFAULT_EQUILIBRIUM_OPTIONS,
  DEFAULT_NULLCLINE_OPTIONS,
  DEFAULT_REGION_OPTIONS,
  DEFAULT_TRAJECTORY_OPTIONS,
  PORTRAIT_TIME_SCALES,
  SINGULAR_GRID_INTERVALS,
  SINGULAR_RAY_DIRECTIONS,
  SINGULAR_RAY_RADII,
  SINGULAR_ROOT_DISTANCE,
  TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH,
  TRAJECTORY_RELATIVE_TOL,
} from "./constants.js";

export interface AnalysisOptions {
  equilibria: EquilibriumOptions;
  nullclines: NullclineOptions;
  regions: RegionOptions;
  field: DirectionFieldOptions;
  trajectories: TrajectoryOptions;
  basins: BasinOptions;
}

export const DEFAULT_ANALYSIS_OPTIONS: AnalysisOptions = {
  equilibria: DEFAULT_EQUILIBRIUM_OPTIONS,
  nullclines: DEFAULT_NULLCLINE_OPTIONS,
  regions: DEFAULT_REGION_OPTIONS,
  field: DEFAULT_DIRECTION_FIELD_OPTIONS,
  trajectories: DEFAULT_TRAJECTORY_OPTIONS,
  basins: DEFAULT_BASIN_OPTIONS,
};

export type ProgressReporter = (stage: string, done: number, total: number) => void;

/** Options as the spec may set them: the spec's `analysis` block over the defaults. */
export function optionsForModel(
  model: Model,
  base: AnalysisOptions = DEFAULT_ANALYSIS_OPTIONS,
): AnalysisOptions {
  const basins = model.spec.analysis.basins;
  return { ...base, basins: { ...base.basins, ...basins } };
}

/** The model as results.json records it: states, nominal parameters, window, equations and Jacobian (text and TeX). */
function modelSummary(model: Model): Results["model"] {
  return {
    states: model.stateNames,
    parameters: Object.fromEntries(model.parameterNames.map((n, i) => [n, model.parameterValues[i]])),
    window: model.spec.window,
    equations: model.equations.map((e, i) => ({ state: model.stateNames[i], text: e.text, tex: e.tex })),
    jacobian: model.jacobian.map((row) => row.map((e) => ({ text: e.text, tex: e.tex }))),
  };
}

/** Settings every pass used, for the methods section and `verify`. */
function settingsOf(
  options: AnalysisOptions,
  portraitHorizon: number,
  basinHorizon: number,
): Results["settings"] {
  return {
    equilibria: options.equilibria,
    singularities: {
      gridIntervals: SINGULAR_GRID_INTERVALS,
      rayDirections: SINGULAR_RAY_DIRECTIONS,
      rayRadii: [...SINGULAR_RAY_RADII],
      rootDistance: SINGULAR_ROOT_DISTANCE,
    },
    nullclines: options.nullclines,
    regions: options.regions,
    field: options.field,
    trajectories: {
      ...options.trajectories,
      integrator: "odex (Hairer's GBS extrapolation, dense output); RODAS where a stretch is stiff",
      relativeTolerance: TRAJECTORY_RELATIVE_TOL,
      absoluteToleranceOfWindow: TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH,
      portraitHorizon,
    },
    basins: {
      ...options.basins,
      integrator: "Dormand–Prince 5(4), generated for the model",
      relativeTolerance: BASIN_RELATIVE_TOL,
      absoluteToleranceOfWindow: BASIN_ABSOLUTE_TOL_OF_WIDTH,
      horizon: basinHorizon,
    },
  };
}

/** Step 1: the equilibria, classified, and the singular points and lines, which the equilibrium search leaves out. */
function analyzeEquilibria(
  model: Model,
  options: AnalysisOptions,
  diagnostics: Diagnostic[],
  progress?: ProgressReporter,
): Pick<Results, "equilibria" | "equilibriumSets" | "singularities"> {
  progress?.("equilibria", 0, 1);
  const { equilibria, singular, sets } = findEquilibriumCandidates(model, options.equilibria, diagnostics);
  const singularities = findSingularities(model, singular);
  progress?.("equilibria", 1, 1);
  return { equilibria, equilibriumSets: sets, singularities };
}

/**
 * Steps 3–5: scenario trajectories, separatrices, portrait trajectories. Periodic orbits are found
 * first by the section scan around each focus, and solved as trajectories meet others.
 */
function analyzeFlows(
  model: Model,
  equilibria: EquilibriumResult[],
  singularities: SingularityResult[],
  options: AnalysisOptions,
  diagnostics: Diagnostic[],
  progress?: ProgressReporter,
) {
  const box = windowOf(model);
  const singularPoints = singularities.filter((s) => s.shape === "point");
  const forward = buildFlowContext(model, equilibria, box, 1, singularPoints);
  const backward = buildFlowContext(model, equilibria, box, -1, singularPoints);
  const registry = new CycleRegistry(model, box);
  progress?.("cycles", 0, 1);
  registry.scanSections(equilibria);
  progress?.("cycles", 1, 1);
  progress?.("trajectories", 0, 3);
  const scenarios = integrateScenarios(model, forward, registry, options.trajectories);
  progress?.("trajectories", 1, 3);
  const longest = Math.max(0, ...model.spec.scenarios.map((s) => s.horizon));
  const timeScale = flowTimeScale(equilibria);
  // the portrait's own horizon, from the flow's time scale: a scenario's horizon of 1e12 around
  // a centre would have every portrait trajectory and separatrix wind to it
  const portraitHorizon = PORTRAIT_TIME_SCALES * timeScale;
  // a basin cell's fate must agree with a scenario's from the same start: up to the longest horizon
  const basinHorizon = Math.max(longest, portraitHorizon);
  const separatrices = findSeparatrices(
    model,
    equilibria,
    box,
    forward,
    backward,
    registry,
    portraitHorizon,
    options.trajectories.maxPathPoints,
  );
  progress?.("trajectories", 2, 3);
  const trajectories = integratePortrait(
    model,
    equilibria,
    box,
    registry,
    options.trajectories,
    portraitHorizon,
    diagnostics,
    singularPoints,
  );
  progress?.("trajectories", 3, 3);
  return {
    box,
    registry,
    scenarios,
    separatrices,
    trajectories,
    portraitHorizon,
    basinHorizon,
    timeScale,
    singularPoints,
  };
}

/** What steps 1–8 give: everything but the basin map, plus the basin map's plan. */
interface CoreOutput {
  results: Omit<Results, "basins">;
  plan: BasinPlan;
}

/**
 * Steps 1–8 of the analysis, as a generator: it yields the parameter tasks of step 6 once and
 * takes their answers, in task order, from whichever driver runs them (this thread, or a worker
 * pool), so both drivers give the same Results.
 */
function* analyzeCore(
  model: Model,
  options: AnalysisOptions,
  progress?: ProgressReporter,
): Generator<ParameterTask[], CoreOutput, ParameterTaskResult[]> {
  const diagnostics: Diagnostic[] = [];
  // 1. equilibria and their stability; singular points and lines (never classified)
  const { equilibria, equilibriumSets, singularities } = analyzeEquilibria(
    model,
    options,
    diagnostics,
    progress,
  );

  // 2. geometry of the portrait: nullclines, the regions they cut out, the direction field
  progress?.("geometry", 0, 1);
  const nullclines = findNullclines(model, equilibria, options.nullclines, diagnostics);
  const regions = findRegions(model, nullclines, options.regions, diagnostics);
  const field = computeDirectionField(model, options.field);

  // 3. scenario trajectories, 4. separatrices, 5. portrait trajectories
  const flows = analyzeFlows(model, equilibria, singularities, options, diagnostics, progress);
  const {
    box,
    registry,
    scenarios,
    separatrices,
    trajectories,
    portraitHorizon,
    basinHorizon,
    timeScale,
    singularPoints,
  } = flows;

  // 6. deciding conditions: symbolic invasion rates, then thresholds by continuation and outcome
  // intervals (one task per study), then the outcome maps level by level, as tasks the driver runs
  const invasion = findInvasionConditions(model, equilibria);
  const { studies, maps } = yield* runParameterWork(model, invasion, diagnostics);
  const flips = findAssumptionFlips(model, studies);
  const assumptions = evaluateAssumptions(model).map((a, k) => ({ ...a, flips: flips[k] }));

  // 7. the spec's claims, one by one
  progress?.("claims", 0, 1);
  const claims = checkClaims({
    model,
    equilibria,
    // a count of equilibria is undecided when the list is capped or the field vanishes on a set
    equilibriaCapped: diagnostics.some((d) => d.code === "too-many-equilibria") || equilibriumSets.length > 0,
    scenarios,
    studies,
  });

  // 8. the basin map's kernel, for the attractors now known
  progress?.("basins", 0, 1);
  const plan = planBasins(
    model,
    equilibria,
    registry.cycles,
    box,
    basinHorizon,
    timeScale,
    options.basins,
    diagnostics,
    singularPoints,
    separatrices.filter((s) => s.manifold === "stable").map((s) => s.path),
  );
  const results: Omit<Results, "basins"> = {
    keel: KEEL_VERSION,
    format: RESULTS_FORMAT,
    spec: { id: model.spec.id, sha256: model.spec.sha256 },
    model: modelSummary(model),
    equilibria,
    equilibriumSets,
    singularities,
    nullclines,
    regions,
    field,
    scenarios,
    cycles: registry.cycles,
    separatrices,
    trajectories,
    thresholds: studies.flatMap((st) => st.thresholds),
    conditions: { invasion, studies, maps },
    claims,
    assumptions,
    diagnostics,
    settings: settingsOf(options, portraitHorizon, basinHorizon),
  };
  return { results, plan };
}

/** The results' key order is fixed here: basins sit after the trajectories. */
function withBasins(core: Omit<Results, "basins">, basins: Results["basins"]): Results {
  const { assumptions, diagnostics, settings, ...head } = core;
  return { ...head, basins, assumptions, diagnostics, settings };
}

/** The progress stage of a batch of parameter tasks: the studies, or a level of the outcome maps. */
export const taskStage = (tasks: ParameterTask[]) => (tasks[0]?.kind === "study" ? "thresholds" : "maps");

/** Each task in this thread, in order, with progress by task. */
function runTasksHere(
  model: Model,
  tasks: ParameterTask[],
  progress?: ProgressReporter,
): ParameterTaskResult[] {
  const stage = taskStage(tasks);
  progress?.(stage, 0, tasks.length);
  return tasks.map((task, k) => {
    const answer = runParameterTask(model, task);
    progress?.(stage, k + 1, tasks.length);
    return answer;
  });
}

/** Model → Results, every pass in this thread. Pure and deterministic. */
export function analyze(
  model: Model,
  options: AnalysisOptions = optionsForModel(model),
  progress?: ProgressReporter,
): Results {
  const core = analyzeCore(model, options, progress);
  let step = core.next(undefined as unknown as ParameterTaskResult[]);
  while (!step.done) step = core.next(runTasksHere(model, step.value, progress));
  const { results, plan } = step.value;
  const kernel = instantiateBasinKernel(plan.kernelSource);
  progress?.("basins", 0, 1);
  const grid = runRefinementSync(startRefinement(plan), (starts) => {
    const out = new Int32Array(starts.length / 2);
    kernel(starts, out);
    return out;
  });
  progress?.("basins", 1, 1);
  return withBasins(results, assembleBasinResult(plan, grid));
}

/**
 * The same Results, with the basin map's batches sent to `evaluate` and the parameter tasks to
 * `runTasks` (a worker pool; in this thread when absent). Labels depend only on each start and
 * answers come back in task order, so the answer does not depend on the number of workers.
 */
export async function analyzeAsync(
  model: Model,
  evaluate: (kernelSource: string) => BatchEvaluator,
  options: AnalysisOptions = optionsForModel(model),
  progress?: ProgressReporter,
  runTasks?: ParameterTaskRunner,
): Promise<Results> {
  const core = analyzeCore(model, options, progress);
  let step = core.next(undefined as unknown as ParameterTaskResult[]);
  while (!step.done)
    step = core.next(
      runTasks ? await runTasks(model, step.value) : runTasksHere(model, step.value, progress),
    );
  const { results, plan } = step.value;
  const batch = evaluate(plan.kernelSource);
  progress?.("basins", 0, 1);
  const grid = await runRefinementAsync(startRefinement(plan), batch);
  progress?.("basins", 1, 1);
  return withBasins(results, assembleBasinResult(plan, grid));
}

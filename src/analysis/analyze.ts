import type { Model } from "../model/types.js";
import type { Diagnostic } from "../diagnostics/issue.js";
import { KEEL_VERSION } from "../version.js";
import { DEFAULT_EQUILIBRIUM_OPTIONS, findEquilibria, type EquilibriumOptions } from "./equilibria.js";
import { evaluateAssumptions } from "./assumptions.js";
import type { Results } from "./types.js";
import { windowOf } from "./window.js";
import { buildFlowContext } from "./flow.js";
import { CycleRegistry, DEFAULT_TRAJECTORY_OPTIONS, flowTimeScale, integratePortrait, integrateScenarios, type TrajectoryOptions } from "./trajectories.js";
import { findSeparatrices } from "./manifolds.js";
import { TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH, TRAJECTORY_RELATIVE_TOL } from "./integrate.js";

export interface AnalysisOptions {
  equilibria: EquilibriumOptions;
  trajectories: TrajectoryOptions;
}

export const DEFAULT_ANALYSIS_OPTIONS: AnalysisOptions = {
  equilibria: DEFAULT_EQUILIBRIUM_OPTIONS,
  trajectories: DEFAULT_TRAJECTORY_OPTIONS,
};

/** Portrait trajectories and separatrices run this many slowest time scales (or the longest scenario horizon, if longer). */
const PORTRAIT_TIME_SCALES = 60;

export type ProgressReporter = (stage: string, done: number, total: number) => void;

/** Model → Results: every analysis pass, in a fixed order. Pure and deterministic. */
export function analyze(model: Model, options: AnalysisOptions = DEFAULT_ANALYSIS_OPTIONS, progress?: ProgressReporter): Results {
  const diagnostics: Diagnostic[] = [];
  progress?.("equilibria", 0, 1);
  const equilibria = findEquilibria(model, options.equilibria, diagnostics);
  progress?.("equilibria", 1, 1);

  const box = windowOf(model);
  const forward = buildFlowContext(model, equilibria, box, 1);
  const backward = buildFlowContext(model, equilibria, box, -1);
  const registry = new CycleRegistry(model, box);
  progress?.("trajectories", 0, 3);
  const scenarios = integrateScenarios(model, forward, registry, options.trajectories);
  progress?.("trajectories", 1, 3);
  const longest = Math.max(0, ...model.spec.scenarios.map((s) => s.horizon));
  const portraitHorizon = Math.max(longest, PORTRAIT_TIME_SCALES * flowTimeScale(equilibria));
  const separatrices = findSeparatrices(model, equilibria, box, forward, backward, registry, portraitHorizon, options.trajectories.maxPathPoints);
  progress?.("trajectories", 2, 3);
  const trajectories = integratePortrait(model, equilibria, box, registry, options.trajectories, portraitHorizon, diagnostics);
  progress?.("trajectories", 3, 3);
  return {
    keel: KEEL_VERSION,
    spec: { id: model.spec.id, sha256: model.spec.sha256 },
    model: {
      states: model.stateNames,
      parameters: Object.fromEntries(model.parameterNames.map((n, i) => [n, model.parameterValues[i]])),
      window: model.spec.window,
      equations: model.equations.map((e, i) => ({ state: model.stateNames[i], text: e.text, tex: e.tex })),
      jacobian: model.jacobian.map((row) => row.map((e) => ({ text: e.text, tex: e.tex }))),
    },
    equilibria,
    scenarios,
    cycles: registry.cycles,
    separatrices,
    trajectories,
    assumptions: evaluateAssumptions(model),
    diagnostics,
    settings: {
      equilibria: options.equilibria,
      trajectories: {
        ...options.trajectories,
        integrator: "odex (Hairer's GBS extrapolation, dense output)",
        relativeTolerance: TRAJECTORY_RELATIVE_TOL,
        absoluteToleranceOfWindow: TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH,
        portraitHorizon,
      },
    },
  };
}

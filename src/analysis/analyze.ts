import type { Model } from "../model/types.js";
import type { Diagnostic } from "../diagnostics/issue.js";
import { KEEL_VERSION } from "../version.js";
import { DEFAULT_EQUILIBRIUM_OPTIONS, findEquilibria, type EquilibriumOptions } from "./equilibria.js";
import { evaluateAssumptions } from "./assumptions.js";
import type { Results } from "./types.js";

export interface AnalysisOptions {
  equilibria: EquilibriumOptions;
}

export const DEFAULT_ANALYSIS_OPTIONS: AnalysisOptions = {
  equilibria: DEFAULT_EQUILIBRIUM_OPTIONS,
};

export type ProgressReporter = (stage: string, done: number, total: number) => void;

/** Model → Results: every analysis pass, in a fixed order. Pure and deterministic. */
export function analyze(model: Model, options: AnalysisOptions = DEFAULT_ANALYSIS_OPTIONS, progress?: ProgressReporter): Results {
  const diagnostics: Diagnostic[] = [];
  progress?.("equilibria", 0, 1);
  const equilibria = findEquilibria(model, options.equilibria, diagnostics);
  progress?.("equilibria", 1, 1);
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
    assumptions: evaluateAssumptions(model),
    diagnostics,
    settings: { equilibria: options.equilibria },
  };
}

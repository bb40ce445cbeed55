import { formatNumber } from "../format.js";
import { methodsWords } from "../words/index.js";
import type { ViewInput } from "./common.js";

/** Solvers, tolerances, grids and versions: the tolerances from analysis/constants.ts and the recorded settings. */
export function buildMethodsView({ spec, results, options }: ViewInput) {
  const context = {
    timeUnit: spec.timeUnit,
    studied: results.conditions.studies.length > 0,
    mapped: results.conditions.maps.length > 0,
    claims: results.claims.length > 0,
  };
  return {
    tolerances: methodsWords(results.settings, context),
    settings: JSON.stringify(results.settings, null, 1),
    versions: Object.entries({ keel: results.keel, node: options.nodeVersion, ...options.libraries })
      .map(([k, v]) => `${k} ${v}`)
      .join(", "),
    runTime:
      options.runSeconds === null
        ? "not recorded (reproducible build: SOURCE_DATE_EPOCH was set)"
        : `${formatNumber(options.runSeconds, 3)} s`,
  };
}

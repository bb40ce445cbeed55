import type { Diagnostic, DiagnosticDetail } from "../../diagnostics/issue.js";

type Wording = {
  [C in DiagnosticDetail["code"]]: (data: Extract<DiagnosticDetail, { code: C }>["data"]) => string;
};

/** One sentence per diagnostic code, from the numbers and ids analysis recorded. */
const DIAGNOSTIC_WORDS: Wording = {
  "undecided-trajectories": ({ undecided, total, horizon }) =>
    `${undecided} of ${total} portrait trajectories were undecided at the horizon (${horizon.toPrecision(3)})`,
  "test-function-sign-change-not-located": ({ event, branch, parameter, from, to }) =>
    `a sign change of the ${event} test function on branch ${branch} between ${parameter} = ${from} and ${to} could not be located`,
  "too-many-branches": ({ parameter, maxBranches }) =>
    `more than ${maxBranches} branches of equilibria in ${parameter}: only the first ${maxBranches} were traced`,
  "unclassified-branch-point": ({ parameter, value }) =>
    `a branch point at ${parameter} = ${value} is neither on a bound of the feasible region nor a crossing of two branches (perhaps a pitchfork); it is not reported as a threshold`,
  "bound-crossing-is-transcritical": ({ parameter, value, transcritical }) =>
    `the unverified bound crossing at ${parameter} = ${value} is the transcritical at ${transcritical}, seen from the crossing branch`,
  "special-point-unverified": ({ kind, parameter, value, residual, testResidual }) =>
    `the ${kind} at ${parameter} = ${value} did not verify (residual ${residual}, test function ${testResidual})`,
  "no-capture-region": ({ equilibrium }) =>
    `no capture region could be verified for ${equilibrium}; its basin is reported as undecided`,
  "small-regions-omitted": ({ count, minFraction, fraction }) =>
    `${count} sign regions smaller than ${minFraction} of the window (together ${+fraction.toPrecision(3)} of it) are not listed`,
  "nullcline-absent": ({ state }) =>
    `d${state}/dt is zero or undefined at every grid point of the window: no ${state}-nullcline is drawn`,
  "nullcline-non-zeros-omitted": ({ state, count }) =>
    `${count} grid-edge sign changes of d${state}/dt are not zeros (a pole or a jump) and were left out of the ${state}-nullcline`,
  "sign-change-off-equilibrium": ({ rate, nullcline, point }) =>
    `d${rate}/dt changes sign on the ${nullcline}-nullcline near ${nearWords(point)}, where no equilibrium is listed`,
  "sign-jump-on-nullcline": ({ rate, nullcline, point }) =>
    `d${rate}/dt jumps in sign (a pole or a gap in its domain) on the ${nullcline}-nullcline near ${nearWords(point)}`,
  "equilibrium-off-nullcline": ({ equilibrium, nullcline }) =>
    `equilibrium ${equilibrium} lies on no traced branch of the ${nullcline}-nullcline (an isolated zero or a tangency the grid cannot see)`,
  "too-many-equilibria": ({ max }) =>
    `more than ${max} isolated equilibria found: only the first ${max} are listed, and statements about their number are undecided`,
  "equilibrium-set": ({ set, kind }) =>
    `the field vanishes along a whole ${kind === "curve" ? "curve" : "region"} (${set}): its points are not isolated equilibria and are reported as one set, not classified; trajectories that end on it are undecided`,
  "outcome-search-budget": ({ parameter, evaluations }) =>
    `the search for outcome breaks in ${parameter} stopped after ${evaluations} outcome evaluations; the changes it had not located are reported as unresolved, not as breaks`,
};

/** A point near a sign change, to six significant digits: enough to find it, short enough to read. */
function nearWords(point: number[]): string {
  return `(${point.map((v) => +v.toPrecision(6)).join(", ")})`;
}

/** The sentence for one diagnostic, prefixed by the parameter value it was met at, if any. */
export function diagnosticWords(d: Diagnostic): string {
  const words = (DIAGNOSTIC_WORDS[d.code] as (data: Diagnostic["data"]) => string)(d.data);
  return d.at ? `at ${d.at.parameter} = ${d.at.value}: ${words}` : words;
}

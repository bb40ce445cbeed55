import { formatEigenvalues, formatNumberHtml, formatUnit } from "../format.js";
import {
  SINGULARITY_REASON_WORDS,
  TYPE_WORDS,
  borderlineWords,
  singularEvidenceWords,
  singularFactorWords,
  singularWhereWords,
} from "../words/index.js";
import { m, matrixTex, numberTex, type ViewInput } from "./common.js";

/** The equilibria table, each Jacobian typeset, and the trace–determinant figure. */
export function buildEquilibriaView({ spec, results, figure }: ViewInput) {
  const window = results.model.window;
  const outsideWindow = (point: Record<string, number>) =>
    spec.states.some((s) => point[s.name] < window[s.name][0] || point[s.name] > window[s.name][1]);
  const rows = results.equilibria.map((e) => ({
    id: e.id,
    outsideWindow: outsideWindow(e.point),
    coordinates: spec.states.map((s) => formatNumberHtml(e.point[s.name])),
    trace: formatNumberHtml(e.trace),
    determinant: formatNumberHtml(e.determinant),
    discriminant: formatNumberHtml(e.discriminant),
    eigenvalues: formatEigenvalues(e.eigenvalues, 5),
    type: TYPE_WORDS[e.type],
    // the best call stays in the Type column; a borderline call says so beside it, with its evidence
    borderline: e.borderline ? borderlineWords(e.borderline) : "",
    hyperbolic: e.hyperbolic ? "yes" : "no",
    boundary: e.onBoundary ? `on the boundary (${e.boundaryStates.join(", ")} at a bound)` : "interior",
    jacobianMath: m(`J(${e.id}) = ${matrixTex(e.jacobian.map((r) => r.map((v) => numberTex(v))))}`, true),
    undecidedNote: e.hyperbolic
      ? ""
      : "The linearisation does not decide this equilibrium's stability; higher-order terms do.",
  }));
  // singular points and lines: listed with their evidence, never with a type
  const singularities = results.singularities.map((s) => ({
    id: s.id,
    where: singularWhereWords(s),
    reason: SINGULARITY_REASON_WORDS[s.reason],
    factors: s.factors.map((f) => ({ math: m(f.tex), words: singularFactorWords(f) })),
    evidence: singularEvidenceWords(s),
  }));
  // curves and regions of equilibria: one object each, with where they lie
  const equilibriumSets = results.equilibriumSets.map((q) => ({
    id: q.id,
    kind: q.kind === "curve" ? "a curve of equilibria" : "a region where the field vanishes",
    extent: spec.states
      .map(
        (st) =>
          `${st.name} from ${formatNumberHtml(q.extent[st.name][0])} to ${formatNumberHtml(q.extent[st.name][1])}`,
      )
      .join(", "),
    roots: q.roots,
  }));
  return {
    equilibria: rows,
    equilibriumSets,
    singularities,
    stateHeaders: spec.states.map((s) => (s.unit ? `${s.name} (${formatUnit(s.unit)})` : s.name)),
    traceDeterminant: figure("trace-determinant"),
  };
}

import { nameToTex } from "../../model/tex.js";
import type { Results } from "../../analysis/types.js";
import { formatNumber, formatNumberHtml, formatUnit } from "../format.js";
import { THRESHOLD_KIND_WORDS } from "../words/index.js";
import { m, matrixTex, type ViewInput } from "./common.js";

type AssumptionFlip = Results["assumptions"][number]["flips"][number];

function flipWords(f: AssumptionFlip): string {
  if (!f.nearestThreshold)
    return `flips at ${f.parameter} = ${formatNumber(f.value)}; no threshold of ${f.parameter} was located`;
  const kind = THRESHOLD_KIND_WORDS[f.nearestThreshold.kind] ?? f.nearestThreshold.kind;
  return (
    `flips at ${f.parameter} = ${formatNumber(f.value)}: ${f.coincides ? "coincides with" : "does not coincide with"} ` +
    `the ${kind} threshold at ${formatNumber(f.nearestThreshold.value)} (relative difference ${formatNumber(f.relativeDifference ?? NaN, 2)})`
  );
}

function assumptionStatus(a: Results["assumptions"][number]): string {
  if (a.holds === null) return a.condition ? "could not be evaluated" : "not machine-checkable";
  return a.holds ? "holds at the nominal values" : "does not hold at the nominal values";
}

export function buildAssumptionsView({ results }: ViewInput) {
  return results.assumptions.map((a) => ({
    text: a.text,
    condition: a.tex ? m(a.tex) : "",
    status: assumptionStatus(a),
    detail:
      a.condition && a.lhs !== null && a.rhs !== null
        ? `left side ${formatNumber(a.lhs)}, right side ${formatNumber(a.rhs)}`
        : "",
    flips: a.flips.map(flipWords),
    holds: a.holds,
  }));
}

/** Equations typeset, the states and their windows, parameters with units and sources, assumptions. */
export function buildModelView(input: ViewInput) {
  const { spec, results } = input;
  const dotted = (name: string) => `\\frac{d${nameToTex(name)}}{dt}`;
  return {
    equations: results.model.equations.map((e) => m(`${dotted(e.state)} = ${e.tex}`, true)),
    states: spec.states.map((s) => ({
      symbol: m(nameToTex(s.name)),
      name: s.name,
      label: s.label,
      unit: formatUnit(s.unit),
      bounds: `${formatNumber(s.min)} to ${formatNumber(s.max)}`,
      window: `${formatNumber(spec.window[s.name][0])} to ${formatNumber(spec.window[s.name][1])}`,
    })),
    parameters: spec.parameters.map((p) => ({
      symbol: m(nameToTex(p.name)),
      name: p.name,
      value: formatNumberHtml(p.value),
      unit: formatUnit(p.unit),
      label: p.label,
      source: p.source,
      range: p.range ? `${formatNumber(p.range[0])} to ${formatNumber(p.range[1])}` : "—",
    })),
    assumptions: buildAssumptionsView(input),
    defaulted: spec.defaulted,
    jacobianMath: m(`J = ${matrixTex(results.model.jacobian.map((row) => row.map((e) => e.tex)))}`, true),
  };
}

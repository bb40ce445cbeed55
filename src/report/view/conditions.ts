import type { ParameterStudyResult } from "../../analysis/types.js";
import { LOCATE_TOL } from "../../analysis/constants.js";
import { nameToTex } from "../../model/tex.js";
import { formatNumber, formatNumberHtml, formatQuantity, formatUnit } from "../format.js";
import {
  THRESHOLD_KIND_WORDS,
  breakKindWords,
  intervalCondition,
  marginAmountWords,
  marginStatement,
  outcomeWords,
  pointWords,
  invasionTerms,
  stateTerms,
} from "../words/index.js";
import { m, type ViewInput } from "./common.js";

function buildInvasionView({ results }: ViewInput) {
  return results.conditions.invasion.map((q) => ({
    equilibrium: q.equilibrium,
    absent: q.absent,
    resident: !q.resident
      ? "—"
      : q.resident.closedForm
        ? m(`${nameToTex(q.resident.state)} = ${q.resident.tex}`)
        : `${q.resident.state} = ${formatNumber(Number(q.resident.text))} (numerical)`,
    rate: m(`\\lambda = ${q.rate.tex}`),
    value: formatNumberHtml(q.value),
    check: formatNumberHtml(Math.abs(q.value - q.numericEigenvalue), 2),
    invades: q.invades ? `${q.absent} can invade` : `${q.absent} cannot invade`,
    thresholds: q.thresholds
      .filter((t) => t.value !== 0)
      .map((t) => ({
        math: m(`${nameToTex(t.parameter)} ${t.invadesWhen} ${t.tex}`),
        value: formatNumber(t.value),
      })),
  }));
}

function symbolicAgreement(t: ParameterStudyResult["thresholds"][number]): string {
  if (!t.symbolic) return "";
  if (t.symbolic.difference === 0) return "matches the located value exactly";
  // a symbolic threshold at zero has no relative difference: the distance is in the parameter's unit
  if (t.symbolic.relativeDifference === null)
    return `matches the located value to ${formatNumberHtml(t.symbolic.difference, 2)}, absolute`;
  return `matches the located value to ${formatNumberHtml(t.symbolic.relativeDifference, 2)}, relative`;
}

function buildStudyView(input: ViewInput, st: ParameterStudyResult) {
  const { spec, figure } = input;
  const param = spec.parameters.find((q) => q.name === st.parameter)!;
  const states = stateTerms(spec.states);
  return {
    parameter: st.parameter,
    symbol: m(nameToTex(st.parameter)),
    label: param.label,
    nominal: formatQuantity(st.nominal, param.unit),
    range: `${formatNumber(st.range[0])} to ${formatNumber(st.range[1])}${param.unit ? " " + formatUnit(param.unit) : ""}`,
    branches: st.continuation.branches.length,
    thresholds: st.thresholds.map((t) => ({
      kind: THRESHOLD_KIND_WORDS[t.kind] ?? t.kind,
      value: formatNumberHtml(t.value, 8),
      point: pointWords(t.point, 5),
      criticality: t.criticality ?? "",
      decisive: t.decisive ? "yes" : "no",
      symbolic: t.symbolic ? m(`${t.symbolic.tex}`) : "",
      agreement: symbolicAgreement(t),
    })),
    intervals: st.intervals.map((iv) => ({
      math: m(intervalCondition(st, iv).tex),
      words: outcomeWords(iv.outcome, states),
      now: iv.containsNominal,
    })),
    margin: marginStatement(st, states, param.unit ?? ""),
    figure: figure(`bifurcation-${st.parameter}`),
  };
}

const marginOrder = (m: NonNullable<ParameterStudyResult["margin"]>) => Math.abs(m.relative ?? m.ofRange);

/** The margin of every studied parameter, nearest break first: the summary's and the conditions section's table. */
export function buildMarginsView({ spec, results }: ViewInput) {
  const states = stateTerms(spec.states);
  return (
    results.conditions.studies
      .filter((st) => st.margin)
      // by the printed measure: the percentage, or for a break at zero the fraction of the range
      .sort((x, y) => marginOrder(x.margin!) - marginOrder(y.margin!))
      .map((st) => {
        const margin = st.margin!;
        const unit = spec.parameters.find((q) => q.name === st.parameter)?.unit ?? "";
        const current = st.intervals.find((iv) => iv.containsNominal);
        return {
          parameter: st.parameter,
          symbol: m(nameToTex(st.parameter)),
          statement: marginStatement(st, states, unit),
          // the interval of this parameter over which the current outcome holds, the others fixed
          holds: current ? m(intervalCondition(st, current).tex) : "",
          now: formatQuantity(st.nominal, unit),
          // the table has no room for the long "(no local bifurcation)" gloss the threshold tables give
          threshold: `${breakKindWords(margin.to, false)} at ${formatNumberHtml(margin.to.value)}`,
          percent: margin.side === "at" ? "0" : marginAmountWords(margin, unit),
          side: margin.side === "at" ? "(on it)" : margin.side,
        };
      })
  );
}

/** At the current values every study sees the same outcome; it is printed once, above the margins. */
export function currentOutcomeWords({ spec, results }: ViewInput): string {
  const current = results.conditions.studies.flatMap((st) =>
    st.intervals.filter((iv) => iv.containsNominal),
  )[0];
  return current ? outcomeWords(current.outcome, stateTerms(spec.states)) : "";
}

/** Invasion conditions, one block per studied parameter, and the outcome maps. */
export function buildConditionsView(input: ViewInput) {
  const { results, figure } = input;
  const c = results.conditions;
  const states = stateTerms(input.spec.states);
  return {
    show: c.studies.length > 0 || c.invasion.length > 0,
    locateTolerance: formatNumberHtml(LOCATE_TOL),
    invasion: buildInvasionView(input),
    invasionTerms: invasionTerms(states),
    studies: c.studies.map((st) => buildStudyView(input, st)),
    maps: c.maps.map((mp) => ({
      pair: mp.parameters.join(" and "),
      figure: figure(`outcome-map-${mp.parameters[0]}-${mp.parameters[1]}`),
      legend: mp.legend.map((o, k) => ({
        letter: String.fromCharCode(65 + k),
        words: outcomeWords(o, states),
      })),
    })),
  };
}

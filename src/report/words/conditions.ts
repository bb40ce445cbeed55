import type {
  MarginResult,
  OutcomeIntervalResult,
  ParameterStudyResult,
} from "../../analysis/parameters/study.js";
import { ZERO_VALUE_TOL } from "../../analysis/constants.js";
import { nameToTex } from "../../model/tex.js";
import { breakKindWords, outcomeWords } from "./outcomes.js";
import type { StateTerms } from "./presence.js";

/**
 * Numbers in interval statements: six significant digits, exponent form outside [1e-3, 1e6)
 * with five; plain ASCII, so a statement can be pasted into a spec's condition.
 */
export function statementNumber(v: number): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(4).replace(/\.?0+e/, "e");
  return String(Number(v.toPrecision(6)));
}

function statementNumberTex(v: number): string {
  const s = statementNumber(v);
  const m = /^(-?[\d.]+)e([+-]?\d+)$/.exec(s);
  return m ? `${m[1]} \\times 10^{${Number(m[2])}}` : s;
}

export interface Statement {
  text: string;
  tex: string;
}

/** A break's value as printed: one at zero to the location's accuracy (ZERO_VALUE_TOL of the range) prints as 0. */
export function breakValue(study: ParameterStudyResult, v: number): number {
  return Math.abs(v) <= ZERO_VALUE_TOL * (study.range[1] - study.range[0]) ? 0 : v;
}

/** A break value as a bound: with its symbolic condition when one matched ("K1 / K2 = 1.25"). */
function boundAt(study: ParameterStudyResult, v: number): Statement {
  const s = study.thresholds.find((t) => t.value === v && t.symbolic)?.symbolic ?? null;
  const n = breakValue(study, v);
  return {
    text: s ? `${s.text} = ${statementNumber(n)}` : statementNumber(n),
    tex: s ? `${s.tex} = ${statementNumberTex(n)}` : statementNumberTex(n),
  };
}

/** Where an interval lies, as an inequality in the parameter: text and TeX. */
export function intervalCondition(study: ParameterStudyResult, iv: OutcomeIntervalResult): Statement {
  const p = study.parameter;
  const tex = nameToTex(p);
  const first = iv.from.kind === "range-end",
    last = iv.to.kind === "range-end";
  if (first && last) {
    const [lo, hi] = study.range;
    return {
      text: `${p} anywhere in ${statementNumber(lo)} to ${statementNumber(hi)}`,
      tex: `${statementNumberTex(lo)} \\le ${tex} \\le ${statementNumberTex(hi)}`,
    };
  }
  // an end the interval holds (the current value sitting on it) is a non-strict inequality
  const lt = (closed: boolean) => (closed ? { text: "<=", tex: "\\le" } : { text: "<", tex: "<" });
  const [lo, hi] = [lt(iv.fromClosed), lt(iv.toClosed)];
  if (first) {
    const b = boundAt(study, iv.to.value);
    return { text: `${p} ${hi.text} ${b.text}`, tex: `${tex} ${hi.tex} ${b.tex}` };
  }
  if (last) {
    const b = boundAt(study, iv.from.value);
    const gt = iv.fromClosed ? { text: ">=", tex: "\\ge" } : { text: ">", tex: ">" };
    return { text: `${p} ${gt.text} ${b.text}`, tex: `${tex} ${gt.tex} ${b.tex}` };
  }
  const a = boundAt(study, iv.from.value),
    b = boundAt(study, iv.to.value);
  return {
    text: `${a.text} ${lo.text} ${p} ${hi.text} ${b.text}`,
    tex: `${a.tex} ${lo.tex} ${tex} ${hi.tex} ${b.tex}`,
  };
}

/** "one attractor (x only); stocked reaches x only when H < 15". */
export function intervalStatement(
  study: ParameterStudyResult,
  iv: OutcomeIntervalResult,
  states: StateTerms,
): string {
  return `${outcomeWords(iv.outcome, states)} when ${intervalCondition(study, iv).text}`;
}

/**
 * How far the current value lies from the break: a percentage of the break's value ("52%"), or,
 * for a break at zero or at the current value, a distance in the parameter's unit ("0.2 1/year").
 */
export function marginAmountWords(margin: MarginResult, unit: string): string {
  if (margin.form === "relative" && margin.relative !== null)
    return `${Number(Math.abs(100 * margin.relative).toPrecision(3))}%`;
  const d = statementNumber(Math.abs(margin.absolute));
  return unit ? `${d} ${unit}` : d;
}

/** "52% below the transcritical", "0.2 below the Hopf threshold at 0", "at the Hopf threshold". */
export function marginWords(study: ParameterStudyResult, unit = ""): string {
  const margin = study.margin;
  if (!margin) return "";
  const what =
    margin.to.kind === "threshold"
      ? `the ${breakKindWords(margin.to, false)} threshold`
      : "the outcome change";
  const at = `${what} at ${study.parameter} = ${statementNumber(breakValue(study, margin.to.value))}`;
  if (margin.side === "at") return `on ${at}`;
  const undecided =
    margin.undecidedFrom === null
      ? ""
      : `; a scenario's fate is undecided from ${study.parameter} = ${statementNumber(margin.undecidedFrom)} towards it`;
  return `${marginAmountWords(margin, unit)} ${margin.side} ${at}${undecided}`;
}

/** The current interval's statement and how far the current value lies from its nearest break. */
export function marginStatement(study: ParameterStudyResult, states: StateTerms, unit = ""): string {
  const home = study.intervals.find((iv) => iv.containsNominal);
  if (!study.margin || !home) return "";
  return (
    `${intervalStatement(study, home, states)} (now ${study.parameter} = ${statementNumber(study.nominal)}: ` +
    `${marginWords(study, unit)})`
  );
}

import type { OutcomeIntervalResult, ParameterStudyResult } from "../../analysis/parameters/study.js";
import { nameToTex } from "../../model/tex.js";
import { outcomeWords } from "./outcomes.js";

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

/** A break value as a bound: with its symbolic condition when one matched ("K1 / K2 = 1.25"). */
function boundAt(study: ParameterStudyResult, v: number): Statement {
  const s = study.thresholds.find((t) => t.value === v && t.symbolic)?.symbolic ?? null;
  return {
    text: s ? `${s.text} = ${statementNumber(v)}` : statementNumber(v),
    tex: s ? `${s.tex} = ${statementNumberTex(v)}` : statementNumberTex(v),
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
  if (first) {
    const b = boundAt(study, iv.to.value);
    return { text: `${p} < ${b.text}`, tex: `${tex} < ${b.tex}` };
  }
  if (last) {
    const b = boundAt(study, iv.from.value);
    return { text: `${p} > ${b.text}`, tex: `${tex} > ${b.tex}` };
  }
  const a = boundAt(study, iv.from.value),
    b = boundAt(study, iv.to.value);
  return { text: `${a.text} < ${p} < ${b.text}`, tex: `${a.tex} < ${tex} < ${b.tex}` };
}

/** "one attractor (x only); stocked reaches x only when H < 15". */
export function intervalStatement(
  study: ParameterStudyResult,
  iv: OutcomeIntervalResult,
  states: string[],
): string {
  return `${outcomeWords(iv.outcome, states)} when ${intervalCondition(study, iv).text}`;
}

/** The current interval's statement and how far the current value lies from its nearest break. */
export function marginStatement(study: ParameterStudyResult, states: string[]): string {
  const margin = study.margin;
  const home = study.intervals.find((iv) => iv.containsNominal);
  if (!margin || !home) return "";
  const pct = Math.abs(100 * margin.relative);
  return (
    `${intervalStatement(study, home, states)} (now ${study.parameter} = ${statementNumber(study.nominal)}: ` +
    `${Number(pct.toPrecision(3))}% ${margin.side} the threshold)`
  );
}

import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { withParameters } from "../../model/higher.js";
import { continueEquilibria, type ContinuationResult, type SpecialPointResult } from "./continuation/index.js";
import { classifyOutcome, type OutcomeResult } from "./outcomes.js";
import type { InvasionConditionResult } from "./invasion.js";

/**
 * Deciding conditions for one parameter: the located thresholds, the partition of the range
 * into intervals of equal outcome, each stated as an inequality, and the margin of the current
 * value to the nearest threshold that changes the outcome.
 */
export interface ThresholdResult extends SpecialPointResult {
  /** The outcome differs on the two sides. */
  decisive: boolean;
  /** The symbolic invasion condition whose threshold this is, when one matches. */
  symbolic: { text: string; tex: string; value: number; relativeDifference: number; equilibrium: string; absent: string } | null;
}

export interface OutcomeIntervalResult {
  from: number;
  to: number;
  /** How each end is bounded: the range end, a located threshold, or a change found by sampling (a scenario moving into another basin). */
  fromKind: string;
  toKind: string;
  containsNominal: boolean;
  outcome: OutcomeResult;
  statement: { text: string; tex: string };
}

export interface MarginResult {
  threshold: number;
  kind: string;
  /** (threshold − value) / |threshold|. */
  relative: number;
  side: "below" | "above";
  statement: string;
}

export interface ParameterStudyResult {
  parameter: string;
  nominal: number;
  range: [number, number];
  continuation: ContinuationResult;
  thresholds: ThresholdResult[];
  intervals: OutcomeIntervalResult[];
  margin: MarginResult | null;
}

/** Outcome samples across each range, besides the located thresholds: catches changes no local bifurcation marks. */
export const OUTCOME_SAMPLES = 12;
/** A change found by sampling is bisected to this fraction of the range. */
export const SWITCH_LOCATE_TOL = 1e-6;
/** A numerical and a symbolic threshold are the same threshold when they agree to this, relatively. */
export const SYMBOLIC_MATCH_TOL = 1e-6;

function numberText(v: number): string {
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e6)) return v.toExponential(4).replace(/\.?0+e/, "e");
  return String(Number(v.toPrecision(6)));
}

function texNumber(v: number): string {
  const s = numberText(v);
  const m = /^(-?[\d.]+)e([+-]?\d+)$/.exec(s);
  return m ? `${m[1]} \\times 10^{${Number(m[2])}}` : s;
}

export function studyParameter(
  model: Model,
  parameter: string,
  range: [number, number],
  invasion: InvasionConditionResult[],
  texName: string,
  diagnostics: Diagnostic[],
): ParameterStudyResult {
  const j = model.parameterNames.indexOf(parameter);
  const nominal = model.parameterValues[j];
  const continuation = continueEquilibria(model, parameter, range, {}, diagnostics);
  const at = (v: number): OutcomeResult => {
    const p = Float64Array.from(model.parameterValues);
    p[j] = v;
    return classifyOutcome(withParameters(model, p), true);
  };
  const [lo, hi] = range;
  const located = continuation.points.filter((q) => q.value > lo && q.value < hi);
  // cuts: located thresholds, then changes between samples that no threshold explains
  const cuts: { value: number; kind: string }[] = [...new Set(located.map((q) => q.value))].sort((a, b) => a - b)
    .map((v) => ({ value: v, kind: located.find((q) => q.value === v)!.kind }));
  const samples = Array.from({ length: OUTCOME_SAMPLES }, (_, k) => lo + ((hi - lo) * (k + 0.5)) / OUTCOME_SAMPLES);
  const outcomes = new Map<number, OutcomeResult>();
  const outcomeAt = (v: number) => {
    let o = outcomes.get(v);
    if (!o) { o = at(v); outcomes.set(v, o); }
    return o;
  };
  for (let k = 0; k + 1 < samples.length; k++) {
    let a = samples[k], b = samples[k + 1];
    // a sample on a located threshold (to SWITCH_LOCATE_TOL) sees the degenerate outcome there: not a change
    const slack = SWITCH_LOCATE_TOL * (hi - lo);
    if (cuts.some((c) => c.value > a - slack && c.value < b + slack)) continue;
    const oa = outcomeAt(a), ob = outcomeAt(b);
    if (oa.signature === ob.signature) continue;
    while (b - a > SWITCH_LOCATE_TOL * (hi - lo)) {
      const m = 0.5 * (a + b);
      if (at(m).signature === oa.signature) a = m; else b = m;
    }
    cuts.push({ value: 0.5 * (a + b), kind: "outcome change" });
  }
  cuts.sort((x, y) => x.value - y.value);

  const edges = [{ value: lo, kind: "range" }, ...cuts, { value: hi, kind: "range" }];
  let intervals: { from: number; to: number; fromKind: string; toKind: string; outcome: OutcomeResult }[] = [];
  for (let k = 0; k + 1 < edges.length; k++) {
    const from = edges[k].value, to = edges[k + 1].value;
    const probe = from === to ? from : 0.5 * (from + to);
    intervals.push({ from, to, fromKind: edges[k].kind, toKind: edges[k + 1].kind, outcome: outcomeAt(probe) });
  }
  // merge neighbours with the same outcome: the cut between them does not decide anything
  const merged: typeof intervals = [];
  for (const iv of intervals) {
    const last = merged[merged.length - 1];
    if (last && last.outcome.signature === iv.outcome.signature) { last.to = iv.to; last.toKind = iv.toKind; }
    else merged.push({ ...iv });
  }
  intervals = merged;
  const decisiveValues = new Set(intervals.slice(1).map((iv) => iv.from));

  const thresholds: ThresholdResult[] = continuation.points.map((q) => {
    const match = invasion.flatMap((c) => c.thresholds.filter((t) => t.parameter === parameter).map((t) => ({ c, t })))
      .find(({ t }) => Math.abs(t.value - q.value) <= SYMBOLIC_MATCH_TOL * Math.max(Math.abs(t.value), 1e-300));
    return {
      ...q,
      decisive: decisiveValues.has(q.value),
      symbolic: match ? { text: match.t.text, tex: match.t.tex, value: match.t.value, relativeDifference: Math.abs(match.t.value - q.value) / Math.abs(match.t.value), equilibrium: match.c.equilibrium, absent: match.c.absent } : null,
    };
  });

  const symbolicFor = (v: number) => thresholds.find((t) => t.value === v && t.symbolic)?.symbolic ?? null;
  const bound = (v: number) => {
    const s = symbolicFor(v);
    return { text: s ? `${s.text} = ${numberText(v)}` : numberText(v), tex: s ? `${s.tex} = ${texNumber(v)}` : texNumber(v) };
  };
  const results: OutcomeIntervalResult[] = intervals.map((iv) => {
    const first = iv.fromKind === "range", last = iv.toKind === "range";
    let text: string, tex: string;
    if (first && last) { text = `${parameter} anywhere in ${numberText(lo)} to ${numberText(hi)}`; tex = `${texNumber(lo)} \\le ${texName} \\le ${texNumber(hi)}`; }
    else if (first) { const b = bound(iv.to); text = `${parameter} < ${b.text}`; tex = `${texName} < ${b.tex}`; }
    else if (last) { const b = bound(iv.from); text = `${parameter} > ${b.text}`; tex = `${texName} > ${b.tex}`; }
    else { const a = bound(iv.from), b = bound(iv.to); text = `${a.text} < ${parameter} < ${b.text}`; tex = `${a.tex} < ${texName} < ${b.tex}`; }
    return {
      ...iv,
      containsNominal: nominal >= iv.from && nominal <= iv.to,
      statement: { text: `${iv.outcome.words} when ${text}`, tex },
    };
  });

  let margin: MarginResult | null = null;
  const home = results.find((r) => r.containsNominal);
  if (home && results.length > 1) {
    const options = [
      home.fromKind !== "range" ? { t: home.from, kind: home.fromKind } : null,
      home.toKind !== "range" ? { t: home.to, kind: home.toKind } : null,
    ].filter((x): x is { t: number; kind: string } => x !== null);
    const nearest = options.sort((a, b) => Math.abs(a.t - nominal) - Math.abs(b.t - nominal))[0];
    if (nearest) {
      const relative = (nearest.t - nominal) / Math.abs(nearest.t);
      const side = nominal < nearest.t ? "below" : "above";
      const pct = Math.abs(100 * relative);
      margin = {
        threshold: nearest.t,
        kind: nearest.kind,
        relative,
        side,
        statement: `${home.statement.text} (now ${parameter} = ${numberText(nominal)}: ${Number(pct.toPrecision(3))}% ${side} the threshold)`,
      };
    }
  }
  return { parameter, nominal, range, continuation, thresholds, intervals: results, margin };
}

import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { withParameters } from "../../model/parameters.js";
import {
  continueEquilibria,
  type ContinuationResult,
  type SpecialPointResult,
} from "./continuation/index.js";
import type { SpecialPointKind } from "./continuation/special.js";
import { classifyOutcome, outcomeKey, type OutcomeResult } from "./outcomes.js";
import type { InvasionConditionResult } from "./invasion.js";
import {
  OUTCOME_SAMPLES,
  SWITCH_LOCATE_TOL,
  SYMBOLIC_MATCH_FLOOR,
  SYMBOLIC_MATCH_TOL,
} from "../constants.js";

/**
 * Deciding conditions for one parameter: the located thresholds, the partition of the range
 * into intervals of equal outcome, and the margin of the current value to the nearest break
 * (a value where the outcome changes).
 */
export interface ThresholdResult extends SpecialPointResult {
  /** The outcome differs on the two sides. */
  decisive: boolean;
  /** The symbolic invasion condition whose threshold this is, when one matches. */
  symbolic: {
    text: string;
    tex: string;
    value: number;
    relativeDifference: number;
    equilibrium: string;
    absent: string;
  } | null;
}

/**
 * A break: a parameter value where the outcome changes. A threshold is a break with a local
 * bifurcation; a sampled break is one found between outcome samples that no local bifurcation
 * marks (a scenario moving into another basin, say).
 */
export type BreakResult =
  | { value: number; kind: "threshold"; threshold: SpecialPointKind }
  | { value: number; kind: "sampled-break" };

/** An end of an outcome interval: a break, or an end of the studied range. */
export type IntervalEndResult = BreakResult | { value: number; kind: "range-end" };

export interface OutcomeIntervalResult {
  from: IntervalEndResult;
  to: IntervalEndResult;
  containsNominal: boolean;
  outcome: OutcomeResult;
}

export interface MarginResult {
  /** The nearest end of the current value's interval that is a break. */
  to: BreakResult;
  /** (break − value) / |break|. */
  relative: number;
  side: "below" | "above";
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

type OutcomeAt = (value: number) => OutcomeResult;

/** The outcome at each value of one parameter, the others at their nominal values; memoised. */
function outcomeSampler(model: Model, j: number): OutcomeAt {
  const seen = new Map<number, OutcomeResult>();
  return (v) => {
    let o = seen.get(v);
    if (!o) {
      const p = Float64Array.from(model.parameterValues);
      p[j] = v;
      o = classifyOutcome(withParameters(model, p), true);
      seen.set(v, o);
    }
    return o;
  };
}

/** The located thresholds strictly inside the range, once per value, in order. */
function thresholdBreaks(continuation: ContinuationResult, [lo, hi]: [number, number]): BreakResult[] {
  const inside = continuation.points.filter((q) => q.value > lo && q.value < hi);
  const values = [...new Set(inside.map((q) => q.value))].sort((a, b) => a - b);
  return values.map((value) => ({
    value,
    kind: "threshold",
    threshold: inside.find((q) => q.value === value)!.kind,
  }));
}

/** Changes between neighbouring outcome samples that no located threshold explains, bisected. */
function sampledBreaks(
  [lo, hi]: [number, number],
  located: BreakResult[],
  outcomeAt: OutcomeAt,
): BreakResult[] {
  const samples = Array.from(
    { length: OUTCOME_SAMPLES },
    (_, k) => lo + ((hi - lo) * (k + 0.5)) / OUTCOME_SAMPLES,
  );
  const tol = SWITCH_LOCATE_TOL * (hi - lo);
  const found: BreakResult[] = [];
  for (let k = 0; k + 1 < samples.length; k++) {
    let a = samples[k],
      b = samples[k + 1];
    // a sample on a break (to SWITCH_LOCATE_TOL) sees the degenerate outcome there: not a change
    if ([...located, ...found].some((c) => c.value > a - tol && c.value < b + tol)) continue;
    const left = outcomeKey(outcomeAt(a));
    if (left === outcomeKey(outcomeAt(b))) continue;
    while (b - a > tol) {
      const m = 0.5 * (a + b);
      if (outcomeKey(outcomeAt(m)) === left) a = m;
      else b = m;
    }
    found.push({ value: 0.5 * (a + b), kind: "sampled-break" });
  }
  return found;
}

/** The range cut at every break, neighbours with the same outcome merged (the cut between them decides nothing). */
function outcomeIntervals(
  range: [number, number],
  breaks: BreakResult[],
  nominal: number,
  outcomeAt: OutcomeAt,
): OutcomeIntervalResult[] {
  const ends: IntervalEndResult[] = [
    { value: range[0], kind: "range-end" },
    ...breaks,
    { value: range[1], kind: "range-end" },
  ];
  const merged: OutcomeIntervalResult[] = [];
  for (let k = 0; k + 1 < ends.length; k++) {
    const from = ends[k],
      to = ends[k + 1];
    const probe = from.value === to.value ? from.value : 0.5 * (from.value + to.value);
    const outcome = outcomeAt(probe);
    const last = merged[merged.length - 1];
    if (last && outcomeKey(last.outcome) === outcomeKey(outcome)) last.to = to;
    else merged.push({ from, to, containsNominal: false, outcome });
  }
  return merged.map((iv) => ({ ...iv, containsNominal: nominal >= iv.from.value && nominal <= iv.to.value }));
}

/** Each located point, marked decisive when an interval starts there, with its symbolic invasion condition when one matches. */
function describeThresholds(
  continuation: ContinuationResult,
  intervals: OutcomeIntervalResult[],
  invasion: InvasionConditionResult[],
): ThresholdResult[] {
  const decisiveValues = new Set(intervals.slice(1).map((iv) => iv.from.value));
  const candidates = invasion.flatMap((c) =>
    c.thresholds.filter((t) => t.parameter === continuation.parameter).map((t) => ({ c, t })),
  );
  return continuation.points.map((q) => {
    const match = candidates.find(
      ({ t }) =>
        Math.abs(t.value - q.value) <= SYMBOLIC_MATCH_TOL * Math.max(Math.abs(t.value), SYMBOLIC_MATCH_FLOOR),
    );
    const symbolic = match
      ? {
          text: match.t.text,
          tex: match.t.tex,
          value: match.t.value,
          relativeDifference: Math.abs(match.t.value - q.value) / Math.abs(match.t.value),
          equilibrium: match.c.equilibrium,
          absent: match.c.absent,
        }
      : null;
    return { ...q, decisive: decisiveValues.has(q.value), symbolic };
  });
}

/** Distance of the current value to the nearer break bounding its interval, when there is one. */
function marginOf(intervals: OutcomeIntervalResult[], nominal: number): MarginResult | null {
  const home = intervals.find((r) => r.containsNominal);
  if (!home || intervals.length < 2) return null;
  const breaks = [home.from, home.to].filter((e): e is BreakResult => e.kind !== "range-end");
  const nearest = breaks.sort((a, b) => Math.abs(a.value - nominal) - Math.abs(b.value - nominal))[0];
  if (!nearest) return null;
  return {
    to: nearest,
    relative: (nearest.value - nominal) / Math.abs(nearest.value),
    side: nominal < nearest.value ? "below" : "above",
  };
}

export function studyParameter(
  model: Model,
  parameter: string,
  range: [number, number],
  invasion: InvasionConditionResult[],
  diagnostics: Diagnostic[],
): ParameterStudyResult {
  const j = model.parameterNames.indexOf(parameter);
  const nominal = model.parameterValues[j];
  const continuation = continueEquilibria(model, parameter, range, {}, diagnostics);
  const outcomeAt = outcomeSampler(model, j);
  const located = thresholdBreaks(continuation, range);
  const breaks = [...located, ...sampledBreaks(range, located, outcomeAt)].sort((x, y) => x.value - y.value);
  const intervals = outcomeIntervals(range, breaks, nominal, outcomeAt);
  const thresholds = describeThresholds(continuation, intervals, invasion);
  return {
    parameter,
    nominal,
    range,
    continuation,
    thresholds,
    intervals,
    margin: marginOf(intervals, nominal),
  };
}

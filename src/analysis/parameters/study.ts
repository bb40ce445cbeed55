import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { withParameters } from "../../model/parameters.js";
import {
  continueEquilibria,
  type ContinuationResult,
  type SpecialPointResult,
} from "./continuation/index.js";
import { classifyOutcome, type OutcomeResult } from "./outcomes.js";
import { findOutcomeBreaks, type BreakSearchResult } from "./breaks.js";
import {
  marginOf,
  placeNominal,
  type IntervalEndResult,
  type MarginResult,
  type OutcomeIntervalResult,
} from "./margins.js";
import type { InvasionConditionResult } from "./invasion.js";
import {
  SYMBOLIC_MATCH_TOL,
  SYMBOLIC_MATCH_ZERO_TOL,
  THRESHOLD_SIDE_OFFSET,
  ZERO_VALUE_TOL,
} from "../constants.js";

export type { BreakResult, DecisionLimitResult, CutResult } from "./breaks.js";
export type { IntervalEndResult, MarginResult, OutcomeIntervalResult } from "./margins.js";

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
    /** |symbolic − located|, in the parameter's unit. */
    difference: number;
    /** difference / |symbolic|; null for a symbolic threshold at zero (to ZERO_VALUE_TOL of the range). */
    relativeDifference: number | null;
    equilibrium: string;
    absent: string;
  } | null;
}

export interface ParameterStudyResult {
  parameter: string;
  nominal: number;
  range: [number, number];
  continuation: ContinuationResult;
  thresholds: ThresholdResult[];
  intervals: OutcomeIntervalResult[];
  margin: MarginResult | null;
  /** Outcomes evaluated by the break search (each decided in full, as at the nominal values). */
  evaluations: number;
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

/** The range cut at every break and decision limit; each interval's outcome is the one its cuts saw beside them. */
function outcomeIntervals(range: [number, number], search: BreakSearchResult): OutcomeIntervalResult[] {
  const ends: IntervalEndResult[] = [
    { value: range[0], kind: "range-end" },
    ...search.cuts.map((c) => c.cut),
    { value: range[1], kind: "range-end" },
  ];
  return ends.slice(1).map((to, k) => ({
    from: ends[k],
    to,
    fromClosed: false,
    toClosed: false,
    containsNominal: false,
    outcome: k === 0 ? search.first : search.cuts[k - 1].above,
  }));
}

/** Each located point, marked decisive when the outcome differs beside it, with its symbolic invasion condition when one matches. */
function describeThresholds(
  continuation: ContinuationResult,
  search: BreakSearchResult,
  invasion: InvasionConditionResult[],
  range: [number, number],
): ThresholdResult[] {
  const width = range[1] - range[0];
  const zero = ZERO_VALUE_TOL * width;
  const candidates = invasion.flatMap((c) =>
    c.thresholds.filter((t) => t.parameter === continuation.parameter).map((t) => ({ c, t })),
  );
  return continuation.points.map((q) => {
    const match = candidates.find(({ t }) =>
      Math.abs(t.value) <= zero
        ? Math.abs(t.value - q.value) <= SYMBOLIC_MATCH_ZERO_TOL * width
        : Math.abs(t.value - q.value) <= SYMBOLIC_MATCH_TOL * Math.abs(t.value),
    );
    const difference = match ? Math.abs(match.t.value - q.value) : 0;
    const symbolic = match
      ? {
          text: match.t.text,
          tex: match.t.tex,
          value: match.t.value,
          difference,
          relativeDifference: Math.abs(match.t.value) <= zero ? null : difference / Math.abs(match.t.value),
          equilibrium: match.c.equilibrium,
          absent: match.c.absent,
        }
      : null;
    return { ...q, decisive: search.decisive.includes(q.value), symbolic };
  });
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
  const inside = continuation.points.filter((q) => q.value > range[0] && q.value < range[1]);
  const search = findOutcomeBreaks(range, inside, nominal, outcomeAt, diagnostics, parameter);
  const offset = THRESHOLD_SIDE_OFFSET * (range[1] - range[0]);
  const intervals = placeNominal(outcomeIntervals(range, search), nominal, outcomeAt(nominal), offset);
  return {
    parameter,
    nominal,
    range,
    continuation,
    thresholds: describeThresholds(continuation, search, invasion, range),
    intervals,
    margin: marginOf(intervals, nominal, range),
    evaluations: search.evaluations,
  };
}

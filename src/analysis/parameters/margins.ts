import { outcomeChange, outcomeKey, type OutcomeResult } from "./outcomes.js";
import type { BreakResult, CutResult } from "./breaks.js";
import { ZERO_VALUE_TOL } from "../constants.js";

/** An end of an outcome interval: a break, a decision limit, or an end of the studied range. */
export type IntervalEndResult = CutResult | { value: number; kind: "range-end" };

export interface OutcomeIntervalResult {
  from: IntervalEndResult;
  to: IntervalEndResult;
  /**
   * Whether each end belongs to the interval. The range's ends do; a break or limit belongs to
   * neither side (the outcome there is its own, degenerate one) except where the current value
   * sits on it: the current value's interval is closed there.
   */
  fromClosed: boolean;
  toClosed: boolean;
  containsNominal: boolean;
  outcome: OutcomeResult;
}

export interface MarginResult {
  /** The nearest break the current value's outcome reaches, across decision limits where the decided fates agree. */
  to: BreakResult;
  /** "at": the current value sits on the break, to ZERO_VALUE_TOL of the range. */
  side: "below" | "above" | "at";
  /** break − value, in the parameter's unit. */
  absolute: number;
  /** (break − value)/|break|; null where that means nothing (form "absolute"). */
  relative: number | null;
  /** absolute: the break is at zero or at the current value (to ZERO_VALUE_TOL of the range), so the margin is a distance in the parameter's unit. */
  form: "relative" | "absolute";
  /** (break − value) / the range's width: comparable across parameters in any form. */
  ofRange: number;
  /** Where, between the value and the break, some scenario's fate first turns undecided (a decision limit), or null. */
  undecidedFrom: number | null;
}

/** The decided fates of a, with b's filling those a leaves undecided. */
function mergeDecided(a: OutcomeResult, b: OutcomeResult): OutcomeResult {
  return {
    attractors: a.attractors,
    scenarios: a.scenarios.map((s, k) => (s.fate.kind === "undecided" ? b.scenarios[k] : s)),
  };
}

/**
 * The interval holding the current value: the one it lies inside, or, where it sits on a cut
 * (to `tol`), the side whose outcome is the current value's own (else one it agrees with where
 * decided, else the lower one), closed at that end.
 */
export function placeNominal(
  intervals: OutcomeIntervalResult[],
  nominal: number,
  nominalOutcome: OutcomeResult,
  tol: number,
): OutcomeIntervalResult[] {
  const on = intervals.findIndex((iv, k) => k > 0 && Math.abs(iv.from.value - nominal) <= tol);
  let home = intervals.findIndex((iv) => nominal >= iv.from.value && nominal <= iv.to.value);
  if (on > 0) {
    const sides = [on - 1, on];
    home =
      sides.find((k) => outcomeKey(intervals[k].outcome) === outcomeKey(nominalOutcome)) ??
      sides.find((k) => outcomeChange(intervals[k].outcome, nominalOutcome) !== "break") ??
      on - 1;
  }
  return intervals.map((iv, k) => ({
    ...iv,
    containsNominal: k === home,
    fromClosed: iv.from.kind === "range-end" || (k === home && k === on),
    toClosed: iv.to.kind === "range-end" || (k === home && k === on - 1),
  }));
}

/** The nearest break one way from the home interval, passing decision limits while the decided fates agree. */
function breakTowards(
  intervals: OutcomeIntervalResult[],
  home: number,
  dir: -1 | 1,
): { to: BreakResult; undecidedFrom: number | null } | null {
  let merged = intervals[home].outcome;
  let undecidedFrom: number | null = null;
  for (let k = home; ; k += dir) {
    const end = dir < 0 ? intervals[k].from : intervals[k].to;
    if (end.kind === "range-end") return null;
    if (end.kind !== "decision-limit") return { to: end, undecidedFrom };
    const next = intervals[k + dir];
    if (end.cause === "budget" || outcomeChange(merged, next.outcome) === "break") return null;
    undecidedFrom ??= end.value;
    merged = mergeDecided(merged, next.outcome);
  }
}

/** The current value's margin to the nearest break its outcome reaches, in a form that stays finite at zero. */
export function marginOf(
  intervals: OutcomeIntervalResult[],
  nominal: number,
  range: [number, number],
): MarginResult | null {
  const home = intervals.findIndex((iv) => iv.containsNominal);
  if (home < 0) return null;
  const width = range[1] - range[0];
  const tol = ZERO_VALUE_TOL * width;
  const found = [breakTowards(intervals, home, -1), breakTowards(intervals, home, 1)]
    .filter((c) => c !== null)
    .sort((a, b) => Math.abs(a.to.value - nominal) - Math.abs(b.to.value - nominal))[0];
  if (!found) return null;
  const absolute = found.to.value - nominal;
  const side = Math.abs(absolute) <= tol ? "at" : absolute > 0 ? "below" : "above";
  const relative =
    side === "at" || Math.abs(found.to.value) <= tol ? null : absolute / Math.abs(found.to.value);
  return {
    to: found.to,
    side,
    absolute,
    relative,
    form: relative === null ? "absolute" : "relative",
    ofRange: absolute / width,
    undecidedFrom: found.undecidedFrom,
  };
}

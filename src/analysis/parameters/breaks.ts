import type { Diagnostic } from "../../diagnostics/issue.js";
import type { UndecidedReason } from "../flow/follow.js";
import type { SpecialPointKind } from "./continuation/special.js";
import { outcomeChange, outcomeKey, undecidedFates, type OutcomeResult } from "./outcomes.js";
import {
  OUTCOME_EVALUATION_BUDGET,
  OUTCOME_REFINE_LEVELS,
  OUTCOME_SAMPLES,
  SWITCH_LOCATE_TOL,
  THRESHOLD_SIDE_DECADES,
  THRESHOLD_SIDE_OFFSET,
} from "../constants.js";

/**
 * A break: a parameter value where the outcome changes. A threshold is a break with a local
 * bifurcation; a sampled break is one no local bifurcation marks (a scenario crossing a
 * separatrix, say), found between outcome samples and bisected on the outcome itself. Either is
 * confirmed by the outcomes on its two sides, each decided in full.
 */
export type BreakResult =
  | { value: number; kind: "threshold"; threshold: SpecialPointKind }
  /** bracket: the nearest values evaluated on either side, each with its own, different outcome. */
  | { value: number; kind: "sampled-break"; bracket: [number, number] };

/**
 * Not a break: where a scenario's fate turns undecided (its horizon or step budget reached, or no
 * rule decided it) on one side, or (cause "budget") a change the search ran out of evaluations to
 * locate, bracket being the gap left.
 */
export interface DecisionLimitResult {
  value: number;
  kind: "decision-limit";
  bracket: [number, number];
  cause: "undecided-fate" | "budget";
  /** The scenarios undecided on either side, with their reasons. */
  undecided: { scenario: string; reason: UndecidedReason }[];
}

export type CutResult = BreakResult | DecisionLimitResult;

/** A cut with the outcomes just below and above it. */
export interface SidedCut {
  cut: CutResult;
  below: OutcomeResult;
  above: OutcomeResult;
}

export interface BreakSearchResult {
  /** The cuts in increasing order, with the outcome on each side. */
  cuts: SidedCut[];
  /** The outcome at the lowest value evaluated (the first interval's). */
  first: OutcomeResult;
  /** The located thresholds the outcome changes across (by a break: not only where a fate turns undecided). */
  decisive: number[];
  evaluations: number;
}

/** A located threshold, or several within twice the side offset of each other, seen as one. */
interface Cluster {
  /** Where its outcome is read on each side: values between are not sampled. */
  lo: number;
  hi: number;
  /** Both sides lie in the range: the threshold can be confirmed as a break. */
  inRange: boolean;
  at: { value: number; kind: SpecialPointKind };
  members: number[];
}

/** Thresholds in order, those closer than 2 · offset merged; a bifurcation names a cluster before a bound crossing. */
function clusterThresholds(
  thresholds: { value: number; kind: SpecialPointKind }[],
  offset: number,
): Cluster[] {
  const sorted = [...thresholds].sort((a, b) => a.value - b.value);
  const clusters: { members: typeof sorted }[] = [];
  for (const t of sorted) {
    const last = clusters[clusters.length - 1];
    if (last && t.value - last.members[last.members.length - 1].value < 2 * offset) last.members.push(t);
    else clusters.push({ members: [t] });
  }
  return clusters.map(({ members }) => ({
    lo: members[0].value - offset,
    hi: members[members.length - 1].value + offset,
    inRange: true,
    at: members.find((m) => m.kind !== "boundary-crossing") ?? members[0],
    members: members.map((m) => m.value),
  }));
}

/**
 * Where to read the outcome beside a threshold, or inside an end of the range: the nearest of
 * THRESHOLD_SIDE_OFFSET · 10^k of the range from `base` (k = 0 … THRESHOLD_SIDE_DECADES, within
 * `room`) whose outcome the next decade out confirms. Nearer, equilibria about to meet are one to
 * the search's tolerances and the outcome read there is neither side's.
 */
function sideReading(
  base: number,
  dir: -1 | 1,
  room: number,
  width: number,
  at: (v: number) => OutcomeResult,
): number | null {
  const offsets = Array.from(
    { length: THRESHOLD_SIDE_DECADES + 1 },
    (_, k) => THRESHOLD_SIDE_OFFSET * width * 10 ** k,
  ).filter((d) => d <= room);
  if (!offsets.length) return null;
  for (let k = 0; k + 1 < offsets.length; k++)
    if (outcomeKey(at(base + dir * offsets[k])) === outcomeKey(at(base + dir * offsets[k + 1])))
      return base + dir * offsets[k];
  return base + dir * offsets[offsets.length - 1];
}

/** Each cluster with where its two sides are read (a side outside the range: not a break in it). */
function settleSides(
  clusters: Cluster[],
  [lo, hi]: [number, number],
  at: (v: number) => OutcomeResult,
): Cluster[] {
  const width = hi - lo;
  return clusters.map((c, k) => {
    const first = c.members[0],
      last = c.members[c.members.length - 1];
    const below = k > 0 ? 0.5 * (first - clusters[k - 1].members.at(-1)!) : first - lo;
    const above = k + 1 < clusters.length ? 0.5 * (clusters[k + 1].members[0] - last) : hi - last;
    const l = sideReading(first, -1, below, width, at),
      h = sideReading(last, 1, above, width, at);
    return { ...c, lo: l ?? c.lo, hi: h ?? c.hi, inRange: l !== null && h !== null };
  });
}

/**
 * Where the range's own ends are read, as a threshold's sides are: a threshold can sit on an end
 * (continuation, starting there, sees no sign change), and the outcome exactly there is neither's.
 */
function settleEnds(
  clusters: Cluster[],
  [lo, hi]: [number, number],
  at: (v: number) => OutcomeResult,
): [number, number] {
  const width = hi - lo;
  const gap = width / OUTCOME_SAMPLES;
  const firstAt = clusters.length ? clusters[0].members[0] : hi;
  const lastAt = clusters.length ? clusters[clusters.length - 1].members.at(-1)! : lo;
  return [
    sideReading(lo, 1, Math.min(gap, 0.5 * (firstAt - lo)), width, at) ?? lo,
    sideReading(hi, -1, Math.min(gap, 0.5 * (hi - lastAt)), width, at) ?? hi,
  ];
}

/** The values sampled before any bisection: the grid between the ends' readings, the current value, each threshold's sides. */
function planSamples(
  [lo, hi]: [number, number],
  [first, last]: [number, number],
  clusters: Cluster[],
  nominal: number,
): number[] {
  const width = hi - lo;
  const blocked = (v: number) => v < first || v > last || clusters.some((c) => v > c.lo && v < c.hi);
  const base = Array.from(
    { length: OUTCOME_SAMPLES - 1 },
    (_, k) => lo + (width * (k + 1)) / OUTCOME_SAMPLES,
  );
  base.push(first, last, nominal);
  for (const c of clusters) base.push(c.lo, c.hi);
  return [...new Set(base.filter((v) => !blocked(v)))].sort((a, b) => a - b);
}

class OutcomeSearch {
  private readonly seen = new Map<number, OutcomeResult>();
  readonly cuts: SidedCut[] = [];
  readonly decisive: number[] = [];
  /** The values evaluated outside bisection brackets, and the bracket ends: neighbours among them are searched. */
  readonly anchors = new Set<number>();
  /** The brackets of the changes found (and each threshold's two sides): the gaps next to them are refined. */
  readonly brackets: [number, number][] = [];
  exhausted = false;

  constructor(
    private readonly outcomeAt: (v: number) => OutcomeResult,
    private readonly tol: number,
  ) {}

  get evaluations(): number {
    return this.seen.size;
  }

  at(v: number): OutcomeResult {
    let o = this.seen.get(v);
    if (!o) {
      o = this.outcomeAt(v);
      this.seen.set(v, o);
    }
    return o;
  }

  private get spent(): boolean {
    this.exhausted ||= this.seen.size >= OUTCOME_EVALUATION_BUDGET;
    return this.exhausted;
  }

  /** Records the change between two outcomes, bracketed by [a, b]: at the threshold when one lies between. */
  private record(a: number, b: number, below: OutcomeResult, above: OutcomeResult, at?: Cluster["at"]): void {
    const change = outcomeChange(below, above);
    if (change === "same") return;
    const value = at?.value ?? 0.5 * (a + b);
    this.anchors.add(a).add(b);
    if (at === undefined) this.brackets.push([a, b]);
    const cut: CutResult =
      change === "undecided"
        ? {
            value,
            kind: "decision-limit",
            bracket: [a, b],
            cause: "undecided-fate",
            undecided: undecidedFates(below, above),
          }
        : at
          ? { value, kind: "threshold", threshold: at.kind }
          : { value, kind: "sampled-break", bracket: [a, b] };
    this.cuts.push({ cut, below, above });
  }

  /** The change across a threshold cluster, seen from its two sides. */
  acrossThreshold(c: Cluster): void {
    const below = this.at(c.lo),
      above = this.at(c.hi);
    this.record(c.lo, c.hi, below, above, c.at);
    if (outcomeChange(below, above) === "break") this.decisive.push(...c.members);
  }

  /** Every change between a and b (evaluated, with different outcomes), each bisected on the outcome to the tolerance. */
  gap(a: number, b: number): void {
    let oa = this.at(a);
    const ob = this.at(b);
    while (outcomeKey(oa) !== outcomeKey(ob)) {
      const key = outcomeKey(oa);
      let lo = a,
        hi = b,
        ohi = ob;
      while (hi - lo > this.tol && !this.spent) {
        const m = 0.5 * (lo + hi);
        const om = this.at(m);
        if (outcomeKey(om) === key) lo = m;
        else [hi, ohi] = [m, om];
      }
      if (hi - lo > this.tol) {
        this.cuts.push({
          cut: {
            value: 0.5 * (lo + b),
            kind: "decision-limit",
            bracket: [lo, b],
            cause: "budget",
            undecided: undecidedFates(oa, ob),
          },
          below: oa,
          above: ob,
        });
        return;
      }
      this.record(lo, hi, oa, ohi);
      [a, oa] = [hi, ohi];
    }
  }
}

/**
 * An undecided sliver narrower than the tolerance between two decided outcomes is below what the
 * search resolves: the two limits around it become one break (the outcomes differ) or nothing.
 */
function mergeSlivers(cuts: SidedCut[], tol: number): SidedCut[] {
  const out: SidedCut[] = [];
  for (const c of cuts) {
    const prev = out[out.length - 1];
    const narrow =
      prev?.cut.kind === "decision-limit" &&
      c.cut.kind === "decision-limit" &&
      prev.cut.cause === "undecided-fate" &&
      c.cut.cause === "undecided-fate" &&
      c.cut.bracket[0] - prev.cut.bracket[1] <= tol;
    if (!narrow) {
      out.push(c);
      continue;
    }
    out.pop();
    const bracket: [number, number] = [
      (prev.cut as DecisionLimitResult).bracket[0],
      (c.cut as DecisionLimitResult).bracket[1],
    ];
    const change = outcomeChange(prev.below, c.above);
    const value = 0.5 * (bracket[0] + bracket[1]);
    if (change === "break")
      out.push({ cut: { value, kind: "sampled-break", bracket }, below: prev.below, above: c.above });
    else if (change === "undecided")
      out.push({
        cut: {
          value,
          kind: "decision-limit",
          bracket,
          cause: "undecided-fate",
          undecided: undecidedFates(prev.below, c.above),
        },
        below: prev.below,
        above: c.above,
      });
  }
  return out;
}

/** Searches the gap between two neighbouring anchors: across a threshold, or for every change between them. */
function searchGap(search: OutcomeSearch, clusters: Cluster[], a: number, b: number): void {
  const cluster = clusters.find((c) => c.inRange && c.lo === a && c.hi === b);
  if (cluster) search.acrossThreshold(cluster);
  else search.gap(a, b);
}

/** The two anchor gaps on each side of every change's bracket, those wider than twice the tolerance. */
function gapsBesideChanges(search: OutcomeSearch, tol: number): [number, number][] {
  const anchors = [...search.anchors].sort((x, y) => x - y);
  const isBracket = (a: number, b: number) => search.brackets.some(([x, y]) => x === a && y === b);
  const gaps = new Map<number, [number, number]>();
  for (const [x] of search.brackets) {
    const i = anchors.indexOf(x);
    for (const k of [i - 2, i - 1, i + 1, i + 2]) {
      if (k < 0 || k + 1 >= anchors.length) continue;
      const [a, b] = [anchors[k], anchors[k + 1]];
      if (b - a > 2 * tol && !isBracket(a, b)) gaps.set(k, [a, b]);
    }
  }
  return [...gaps.values()];
}

/**
 * Refinement: a switch often has company (fates switch again near a threshold, or a scenario
 * crosses several separatrices in a row, two of them inside one sample interval), so the two
 * gaps on each side of every change are halved and both halves searched, OUTCOME_REFINE_LEVELS
 * times; a change found there is refined around in turn.
 */
function refineNearChanges(search: OutcomeSearch, clusters: Cluster[], tol: number): void {
  for (let level = 0; level < OUTCOME_REFINE_LEVELS && !search.exhausted; level++) {
    const gaps = gapsBesideChanges(search, tol);
    if (!gaps.length) return;
    for (const [a, b] of gaps) {
      const m = 0.5 * (a + b);
      search.anchors.add(m);
      searchGap(search, clusters, a, m);
      searchGap(search, clusters, m, b);
    }
  }
}

/**
 * Every change of outcome across one parameter's range: the located thresholds, each confirmed
 * by the outcomes just beside it, and every change between samples (every sample interval is
 * searched, and those beside a change are refined), bisected on the outcome to SWITCH_LOCATE_TOL
 * of the range. A change to or from an undecided fate is a decision limit, never a break.
 */
export function findOutcomeBreaks(
  range: [number, number],
  thresholds: { value: number; kind: SpecialPointKind }[],
  nominal: number,
  outcomeAt: (v: number) => OutcomeResult,
  diagnostics: Diagnostic[],
  parameter: string,
): BreakSearchResult {
  const width = range[1] - range[0];
  const tol = SWITCH_LOCATE_TOL * width;
  const search = new OutcomeSearch(outcomeAt, tol);
  const clusters = settleSides(clusterThresholds(thresholds, THRESHOLD_SIDE_OFFSET * width), range, (v) =>
    search.at(v),
  );
  const ends = settleEnds(clusters, range, (v) => search.at(v));
  const points = planSamples(range, ends, clusters, nominal);
  for (const v of points) search.anchors.add(v);
  for (const c of clusters) if (c.inRange) search.brackets.push([c.lo, c.hi]);
  for (let k = 0; k + 1 < points.length; k++) searchGap(search, clusters, points[k], points[k + 1]);
  refineNearChanges(search, clusters, tol);
  if (search.exhausted)
    diagnostics.push({
      severity: "warning",
      stage: "conditions",
      code: "outcome-search-budget",
      data: { parameter, evaluations: search.evaluations },
    });
  const cuts = [...search.cuts].sort((x, y) => x.cut.value - y.cut.value);
  return {
    cuts: mergeSlivers(cuts, tol),
    first: search.at(points[0]),
    decisive: search.decisive,
    evaluations: search.evaluations,
  };
}

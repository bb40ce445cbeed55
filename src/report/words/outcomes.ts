import type {
  AttractorResult,
  OutcomeFateResult,
  OutcomeResult,
} from "../../analysis/parameters/outcomes.js";
import { rankPlace } from "../../analysis/parameters/outcomes.js";
import type { IntervalEndResult } from "../../analysis/parameters/study.js";
import { undecidedReasonWords } from "./fates.js";
import { presenceClause, presenceWords, type StateTerms } from "./presence.js";

/** Threshold kinds in words, for tables and captions. */
export const THRESHOLD_KIND_WORDS: Record<string, string> = {
  "saddle-node": "fold (saddle-node)",
  transcritical: "transcritical",
  hopf: "Hopf",
  "boundary-crossing": "boundary crossing",
};

/** A break's kind in words: its threshold kind, or a change found by sampling. */
export function breakKindWords(end: IntervalEndResult, gloss = true): string {
  if (end.kind === "threshold") return THRESHOLD_KIND_WORDS[end.threshold] ?? end.threshold;
  if (end.kind === "sampled-break") return gloss ? "outcome change (no local bifurcation)" : "outcome change";
  if (end.kind === "decision-limit")
    return gloss
      ? "limit of decided fates (not a break: a fate is undecided beyond it)"
      : "limit of decided fates";
  return "range end";
}

/** A break's kind as one short name, as claim evidence quotes it ("transcritical", "outcome change"). */
export function breakKindName(end: IntervalEndResult): string {
  return end.kind === "threshold"
    ? end.threshold
    : end.kind === "sampled-break"
      ? "outcome change"
      : end.kind === "decision-limit"
        ? "limit of decided fates"
        : "range end";
}

/** "coexistence", "N only at lower N", "the origin", "a stable cycle". */
export function attractorWords(a: AttractorResult, states: StateTerms): string {
  if (a.kind === "cycle") return "a stable cycle";
  const first = states.names[0];
  const place = rankPlace(a.rank);
  const rank =
    place === "only"
      ? ""
      : place === "lowest"
        ? ` at lower ${first}`
        : place === "highest"
          ? ` at higher ${first}`
          : ` (${a.rank.index + 1} of ${a.rank.of} by ${first})`;
  return `${presenceWords(a.present, states)}${rank}`;
}

export function outcomeFateWords(f: OutcomeFateResult, states: StateTerms): string {
  switch (f.kind) {
    case "attractor":
      return `reaches ${attractorWords(f.attractor, states)}`;
    case "equilibrium":
      return `reaches a ${f.type.replace(/-/g, " ")} ${presenceClause(f.present, states)}`;
    case "cycle":
      return `settles on a ${f.stability ?? ""} cycle`;
    case "left-window":
      return `leaves the feasible region through a bound of ${f.state}`;
    case "blow-up":
      return "blows up";
    case "undecided":
      return `is undecided (${undecidedReasonWords(f.reason)})`;
  }
}

/** The attractors in words, in alphabetical order. */
export function attractorListWords(attractors: AttractorResult[], states: StateTerms): string[] {
  return attractors.map((a) => attractorWords(a, states)).sort();
}

/** "one attractor (coexistence); survey reaches coexistence". */
export function outcomeWords(o: OutcomeResult, states: StateTerms): string {
  const names = attractorListWords(o.attractors, states);
  const head =
    names.length === 0
      ? "no attractor inside the window"
      : names.length === 1
        ? `one attractor (${names[0]})`
        : `${names.length} attractors (${names.join("; ")})`;
  if (!o.scenarios.length) return head;
  return `${head}; ${o.scenarios.map((s) => `${s.name} ${outcomeFateWords(s.fate, states)}`).join(", ")}`;
}

import type { ClaimEvidence, ClaimReference, ClaimResult } from "../../analysis/checks/claims.js";
import { attractorListWords } from "./outcomes.js";
import type { StateTerms } from "./presence.js";
import { borderlineWords, undecidedReasonWords } from "./fates.js";
import { CLAIM_ZERO_SCALE_OF_RANGE } from "../../analysis/constants.js";

/** Evidence numbers: six significant digits, plain ASCII, so a reader can paste them back into a spec. */
const fmt = (v: number) => String(Number(v.toPrecision(6)));
/** Types in words: "stable node", not "stable-node". */
const typeWords = (type: string) => type.replace(/-/g, " ");
const at = (p: Record<string, number>) =>
  Object.entries(p)
    .map(([k, v]) => `${k} = ${fmt(v)}`)
    .join(", ");
const percent = (fraction: number) => `${fmt(100 * fraction)}%`;

function equilibriumEvidence(
  e: Extract<ClaimEvidence, { kind: "count" | "count-undecided" | "count-capped" | "none-near" | "type" }>,
): string {
  switch (e.kind) {
    case "count":
      return `${e.found} ${e.stableOnly ? "stable equilibria" : "equilibria"} found in the window (claimed ${e.claimed}): ${e.equilibria.join(", ") || "none"}`;
    case "count-undecided":
      return `${e.found} stable equilibria found, and ${e.undecided} more whose stability the linearisation does not decide`;
    case "count-capped":
      return `the equilibrium search stops at ${e.cap} equilibria and reached that cap, so more may exist: a count of ${e.claimed} cannot be told`;
    case "none-near":
      return (
        `no equilibrium within ${percent(e.tolerance)} of the window of ${at(e.near)}` +
        (e.nearest ? `; the nearest is ${e.nearest.equilibrium} at ${at(e.nearest.point)}` : "")
      );
    case "type": {
      const what = `${e.equilibrium} at ${at(e.point)}`;
      const numbers = `(trace ${fmt(e.trace)}, determinant ${fmt(e.determinant)})`;
      if (e.borderline)
        return `${what} is ${borderlineWords(e.borderline)}: the linearisation's numbers do not decide whether it is a ${typeWords(e.claimedType)}`;
      if (e.matches) return `${what} is a ${typeWords(e.type)} ${numbers}`;
      if (!e.hyperbolic)
        return `${what} is ${typeWords(e.type)}: its linearisation does not decide whether it is a ${typeWords(e.claimedType)}`;
      return `${what} is a ${typeWords(e.type)}, not a ${typeWords(e.claimedType)} ${numbers}`;
    }
  }
}

function fateEvidence(
  e: Extract<ClaimEvidence, { kind: `fate-${string}` }>,
  verdict: ClaimResult["verdict"],
): string {
  switch (e.kind) {
    case "fate-undecided":
      return `the trajectory of ${e.scenario} is undecided: ${undecidedReasonWords(e.reason)}`;
    case "fate-cycle":
      return `${e.scenario} settles on the periodic orbit ${e.cycle}`;
    case "fate-other": {
      const fate = `its fate is ${e.fate}${e.target !== null ? ` ${e.target}` : ""}`;
      return e.expected === "cycle"
        ? `${e.scenario} does not settle on a periodic orbit: ${fate}`
        : `${e.scenario} does not converge to an equilibrium: ${fate}`;
    }
    case "fate-equilibrium":
      return `${e.scenario} converges to ${e.equilibrium} at ${at(e.point)}`;
    case "fate-near":
      return verdict === "supported"
        ? `${e.scenario} converges to ${e.equilibrium} at ${at(e.point)}, within ${percent(e.distance)} of the window of the claimed point`
        : `${e.scenario} converges to ${e.equilibrium} at ${at(e.point)}, ${percent(e.distance)} of the window from the claimed ${at(e.claimed)}`;
  }
}

function parameterEvidence(
  e: Extract<
    ClaimEvidence,
    {
      kind:
        | "not-studied"
        | "no-deciding-threshold"
        | "side"
        | "value-outside-range"
        | "no-threshold"
        | "threshold-value";
    }
  >,
): string {
  switch (e.kind) {
    case "not-studied":
      return `${e.parameter} was not studied`;
    case "no-deciding-threshold":
      return `no ${e.threshold === "any" ? "threshold that changes the outcome" : e.threshold + " threshold"} of ${e.parameter} lies in its range ${fmt(e.range[0])} to ${fmt(e.range[1])}`;
    case "side": {
      const where = `the ${e.threshold.kind} threshold at ${fmt(e.threshold.value)}`;
      if (e.side === "at")
        return `${e.parameter} = ${fmt(e.nominal)} lies on ${where} (to the accuracy of its location), neither below nor above it`;
      const margin =
        e.margin.relative === null ? `${fmt(e.margin.absolute)}, absolute` : percent(e.margin.relative);
      return `${e.parameter} = ${fmt(e.nominal)} lies ${e.side} ${where} (margin ${margin})`;
    }
    case "value-outside-range":
      return `the claimed value ${fmt(e.claimed)} lies outside the range searched, ${fmt(e.range[0])} to ${fmt(e.range[1])}`;
    case "no-threshold":
      return `no ${e.threshold === "any" ? "" : e.threshold + " "}threshold of ${e.parameter} lies in its range`;
    case "threshold-value": {
      const nearest = `the nearest ${e.located.kind} threshold of ${e.parameter} is at ${fmt(e.located.value)}; `;
      // a claimed zero has no relative difference: the distance is compared in the parameter's unit
      if (e.relativeDifference === null)
        return (
          nearest +
          `the claimed ${fmt(e.claimed)} differs by ${fmt(e.difference)} (allowed ${fmt(e.allowed)}: ${percent(e.tolerance * CLAIM_ZERO_SCALE_OF_RANGE)} of the range's width, since a relative difference from 0 means nothing)`
        );
      return (
        nearest +
        `the claimed ${fmt(e.claimed)} differs by ${percent(e.relativeDifference)} (allowed ${percent(e.tolerance)})`
      );
    }
  }
}

function conditionEvidence(
  e: Extract<ClaimEvidence, { kind: "counterexample" | "condition-agrees" | "too-close-to-call" }>,
  states: StateTerms,
): string {
  switch (e.kind) {
    case "counterexample":
      return (
        `at ${at(e.values)} the condition ${e.holds ? "holds" : "fails"} but ${e.present ? "a" : "no"} stable ${e.attractor} equilibrium exists ` +
        `(attractors: ${attractorListWords(e.attractors, states).join("; ") || "none"})`
      );
    case "condition-agrees":
      return (
        `at all ${e.agreeing} sampled parameter points across the ranges (Halton sequence; ${e.skipped} too close to the boundary to call) ` +
        `the condition holds exactly when a stable ${e.attractor} equilibrium exists`
      );
    case "too-close-to-call":
      return "every sample was too close to the condition's boundary to call";
  }
}

/** A claim's evidence as a sentence; `states` are the model's states (attractors are named by them). */
export function claimEvidenceWords(claim: ClaimResult, states: StateTerms): string {
  const e = claim.evidence;
  switch (e.kind) {
    case "count":
    case "count-undecided":
    case "count-capped":
    case "none-near":
    case "type":
      return equilibriumEvidence(e);
    case "fate-undecided":
    case "fate-cycle":
    case "fate-other":
    case "fate-equilibrium":
    case "fate-near":
      return fateEvidence(e, claim.verdict);
    case "counterexample":
    case "condition-agrees":
    case "too-close-to-call":
      return conditionEvidence(e, states);
    default:
      return parameterEvidence(e);
  }
}

/** The dossier heading a claim's evidence is printed under. */
export function claimReferenceWords(where: ClaimReference): string {
  switch (where.section) {
    case "equilibria":
      return where.equilibrium ? `Equilibria table, ${where.equilibrium}` : "Equilibria table";
    case "summary":
      return `Summary: outcome from each scenario (${where.scenario})`;
    case "conditions":
      return where.parameter ? `Deciding conditions: ${where.parameter}` : "Deciding conditions";
  }
}

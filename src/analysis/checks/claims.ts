import type { Model } from "../../model/types.js";
import type { ClaimSpec } from "../../spec/schema.js";
import { withParameters } from "../../model/parameters.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { BorderlineResult, EquilibriumType } from "../phase/stability.js";
import type { Fate, UndecidedReason } from "../flow/follow.js";
import type { ScenarioResult } from "../flow/trajectories.js";
import type { ParameterStudyResult } from "../parameters/study.js";
import { classifyOutcome, type AttractorResult } from "../parameters/outcomes.js";
import {
  CLAIM_ZERO_SCALE_OF_RANGE,
  CONDITION_MARGIN_TOL,
  DEFAULT_CLAIM_CONDITION_SAMPLES,
  DEFAULT_CLAIM_NEAR,
  HALTON_PRIMES,
  ZERO_VALUE_TOL,
  MAX_EQUILIBRIA,
} from "../constants.js";

type ClaimKind = ClaimSpec["kind"];
type ClaimOf<K extends ClaimKind> = Extract<ClaimSpec, { kind: K }>;
type Point = Record<string, number>;
/** A threshold kind a claim may name, or any threshold that changes the outcome. */
type ClaimedThreshold = "saddle-node" | "transcritical" | "hopf" | "boundary-crossing" | "any";
/**
 * A distance to a threshold: relative to the threshold's value, or, where that value is zero (to
 * ZERO_VALUE_TOL of the range) or the distance is, absolute in the parameter's unit.
 */
interface ClaimDistance {
  absolute: number;
  relative: number | null;
  form: "relative" | "absolute";
}

/** What a check found: the numbers behind a verdict (the report words them). */
export type ClaimEvidence =
  | { kind: "count"; stableOnly: boolean; claimed: number; found: number; equilibria: string[] }
  /** stableOnly counts: the claimed count lies between the stable ones and those plus the undecided ones. */
  | { kind: "count-undecided"; claimed: number; found: number; undecided: number }
  /** The search kept only its first `cap` equilibria (MAX_EQUILIBRIA): no count at or above it can be told. */
  | { kind: "count-capped"; claimed: number; cap: number }
  | {
      kind: "none-near";
      near: Point;
      tolerance: number;
      nearest: { equilibrium: string; point: Point; distance: number } | null;
    }
  | {
      kind: "type";
      equilibrium: string;
      point: Point;
      type: EquilibriumType;
      claimedType: ClaimOf<"equilibrium-type">["type"];
      matches: boolean;
      hyperbolic: boolean;
      trace: number;
      determinant: number;
      /** The equilibrium's borderline call, when the claimed type is one it does not decide against. */
      borderline: BorderlineResult | null;
    }
  | { kind: "fate-undecided"; scenario: string; reason: UndecidedReason; t: number }
  | { kind: "fate-cycle"; scenario: string; cycle: string; t: number }
  /** The fate is of another kind than claimed ("expected"); target: its equilibrium or cycle, when it has one. */
  | {
      kind: "fate-other";
      scenario: string;
      expected: "cycle" | "equilibrium";
      fate: Fate["kind"];
      target: string | null;
      t: number;
    }
  | { kind: "fate-equilibrium"; scenario: string; equilibrium: string; point: Point; t: number }
  | {
      kind: "fate-near";
      scenario: string;
      equilibrium: string;
      point: Point;
      claimed: Point;
      distance: number;
      tolerance: number;
    }
  | { kind: "not-studied"; parameter: string }
  | {
      kind: "no-deciding-threshold";
      parameter: string;
      threshold: ClaimedThreshold;
      nominal: number;
      range: [number, number];
    }
  | {
      kind: "side";
      parameter: string;
      nominal: number;
      threshold: { value: number; kind: string };
      /** "at": on the threshold to ZERO_VALUE_TOL of the range, neither below nor above. */
      side: "below" | "above" | "at";
      margin: ClaimDistance;
    }
  | { kind: "value-outside-range"; parameter: string; claimed: number; range: [number, number] }
  | { kind: "no-threshold"; parameter: string; threshold: ClaimedThreshold; claimed: number }
  | {
      kind: "threshold-value";
      parameter: string;
      claimed: number;
      located: { value: number; kind: string };
      /** |located − claimed|, in the parameter's unit. */
      difference: number;
      /** difference / |located| (or / |claimed| for a located threshold at zero); null for a claimed value of zero. */
      relativeDifference: number | null;
      /** The claim's tolerance, relative. */
      tolerance: number;
      /** relative: relativeDifference against tolerance; absolute: difference against allowed. */
      form: "relative" | "absolute";
      /** The largest difference accepted, in the parameter's unit. */
      allowed: number;
    }
  /** A sampled point where the condition and the attractor's existence disagree. */
  | {
      kind: "counterexample";
      attractor: string;
      values: Point;
      holds: boolean;
      present: boolean;
      attractors: AttractorResult[];
      agreeing: number;
      skipped: number;
    }
  | { kind: "condition-agrees"; attractor: string; agreeing: number; skipped: number }
  | { kind: "too-close-to-call"; agreeing: number; skipped: number };

/** Where in the dossier a reader sees the evidence. */
export interface ClaimReference {
  section: "equilibria" | "summary" | "conditions";
  equilibrium?: string;
  scenario?: string;
  parameter?: string;
}

/** Claims checked one by one against the results, each verdict with its evidence and where to see it. */
export interface ClaimResult {
  id: string;
  kind: ClaimKind;
  text: string;
  verdict: "supported" | "contradicted" | "undecided";
  evidence: ClaimEvidence;
  where: ClaimReference;
}

type Verdict = Pick<ClaimResult, "verdict" | "evidence" | "where">;

function halton(index: number, base: number): number {
  let f = 1,
    r = 0,
    i = index;
  while (i > 0) {
    f /= base;
    r += f * (i % base);
    i = Math.floor(i / base);
  }
  return r;
}

interface ClaimContext {
  model: Model;
  equilibria: EquilibriumResult[];
  /** The equilibrium search stopped at MAX_EQUILIBRIA: more may exist. */
  equilibriaCapped: boolean;
  scenarios: ScenarioResult[];
  studies: ParameterStudyResult[];
}

/** Largest distance over the states, each as a fraction of its window width. */
function windowDistance(model: Model, a: Point, b: Point): number {
  return Math.max(
    ...model.stateNames.map((n) => {
      const [lo, hi] = model.spec.window[n];
      return Math.abs(a[n] - b[n]) / (hi - lo);
    }),
  );
}

function nearest(ctx: ClaimContext, point: Point): { e: EquilibriumResult; distance: number } | null {
  let best: { e: EquilibriumResult; distance: number } | null = null;
  for (const e of ctx.equilibria) {
    const d = windowDistance(ctx.model, e.point, point);
    if (!best || d < best.distance) best = { e, distance: d };
  }
  return best;
}

function checkCount(ctx: ClaimContext, claim: ClaimOf<"equilibrium-count">): Verdict {
  const where = { section: "equilibria" } as const;
  const stable = ctx.equilibria.filter((e) => e.stable === true);
  const unsure = ctx.equilibria.filter((e) => e.stable === null).length;
  const stableOnly = claim.stableOnly ?? false;
  if (stableOnly && unsure > 0 && claim.count >= stable.length && claim.count <= stable.length + unsure)
    return {
      verdict: "undecided",
      evidence: { kind: "count-undecided", claimed: claim.count, found: stable.length, undecided: unsure },
      where,
    };
  const counted = stableOnly ? stable : ctx.equilibria;
  // the list is cut at the cap: a claim the cut could make false is undecided, never contradicted
  if (ctx.equilibriaCapped && claim.count >= counted.length)
    return {
      verdict: "undecided",
      evidence: { kind: "count-capped", claimed: claim.count, cap: MAX_EQUILIBRIA },
      where,
    };
  return {
    verdict: counted.length === claim.count ? "supported" : "contradicted",
    evidence: {
      kind: "count",
      stableOnly,
      claimed: claim.count,
      found: counted.length,
      equilibria: counted.map((e) => e.id),
    },
    where,
  };
}

/**
 * A borderline equilibrium decides neither for nor against the two types it lies between, nor
 * the degenerate node on the boundary between node and focus; a claim of stability alone is
 * decided (the borderline is within one side).
 */
function borderlineAgainst(e: EquilibriumResult, claimed: string): BorderlineResult | null {
  const b = e.borderline;
  if (!b) return null;
  const side = e.stable ? "stable" : "unstable";
  const undecided: string[] = [
    ...b.between,
    ...(b.quantity === "discriminant" ? [`${side}-degenerate-node`] : []),
  ];
  return undecided.includes(claimed) ? b : null;
}

function checkType(ctx: ClaimContext, claim: ClaimOf<"equilibrium-type">): Verdict {
  const tolerance = claim.tolerance ?? DEFAULT_CLAIM_NEAR;
  const hit = nearest(ctx, claim.near);
  if (!hit || hit.distance > tolerance) {
    const near = hit ? { equilibrium: hit.e.id, point: hit.e.point, distance: hit.distance } : null;
    return {
      verdict: "contradicted",
      evidence: { kind: "none-near", near: claim.near, tolerance, nearest: near },
      where: { section: "equilibria" },
    };
  }
  const e = hit.e;
  const matches =
    claim.type === "stable"
      ? e.stable === true
      : claim.type === "unstable"
        ? e.stable === false
        : e.type === claim.type;
  const borderline = borderlineAgainst(e, claim.type);
  return {
    verdict: borderline ? "undecided" : matches ? "supported" : e.hyperbolic ? "contradicted" : "undecided",
    evidence: {
      kind: "type",
      equilibrium: e.id,
      point: e.point,
      type: e.type,
      claimedType: claim.type,
      matches,
      hyperbolic: e.hyperbolic,
      trace: e.trace,
      determinant: e.determinant,
      borderline,
    },
    where: { section: "equilibria", equilibrium: e.id },
  };
}

function checkFate(ctx: ClaimContext, claim: ClaimOf<"scenario-fate">): Verdict {
  const sc = ctx.scenarios.find((s) => s.name === claim.scenario)!;
  const fate = sc.fate;
  const scenario = sc.name;
  const where = { section: "summary", scenario } as const;
  const target = "target" in fate ? fate.target : null;
  if (fate.kind === "undecided")
    return {
      verdict: "undecided",
      evidence: { kind: "fate-undecided", scenario, reason: fate.reason, t: fate.t },
      where,
    };
  if (claim.reaches === "cycle") {
    return fate.kind === "cycle"
      ? {
          verdict: "supported",
          evidence: { kind: "fate-cycle", scenario, cycle: fate.target, t: fate.t },
          where,
        }
      : {
          verdict: "contradicted",
          evidence: { kind: "fate-other", scenario, expected: "cycle", fate: fate.kind, target, t: fate.t },
          where,
        };
  }
  if (fate.kind !== "equilibrium")
    return {
      verdict: "contradicted",
      evidence: { kind: "fate-other", scenario, expected: "equilibrium", fate: fate.kind, target, t: fate.t },
      where,
    };
  const e = ctx.equilibria.find((q) => q.id === fate.target)!;
  if (!claim.near)
    return {
      verdict: "supported",
      evidence: { kind: "fate-equilibrium", scenario, equilibrium: e.id, point: e.point, t: fate.t },
      where,
    };
  const tolerance = claim.tolerance ?? DEFAULT_CLAIM_NEAR;
  const distance = windowDistance(ctx.model, e.point, claim.near);
  return {
    verdict: distance <= tolerance ? "supported" : "contradicted",
    evidence: {
      kind: "fate-near",
      scenario,
      equilibrium: e.id,
      point: e.point,
      claimed: claim.near,
      distance,
      tolerance,
    },
    where,
  };
}

function checkSide(ctx: ClaimContext, claim: ClaimOf<"parameter-side">): Verdict {
  const parameter = claim.parameter;
  const where = { section: "conditions", parameter } as const;
  const st = ctx.studies.find((s) => s.parameter === parameter);
  if (!st) return { verdict: "undecided", evidence: { kind: "not-studied", parameter }, where };
  const threshold = claim.threshold ?? "any";
  const candidates =
    threshold === "any"
      ? st.margin
        ? [
            {
              value: st.margin.to.value,
              kind: st.margin.to.kind === "threshold" ? st.margin.to.threshold : "outcome change",
            },
          ]
        : []
      : st.thresholds
          .filter((t) => t.kind === threshold)
          .map((t) => ({ value: t.value, kind: t.kind as string }));
  const best = candidates.sort((a, b) => Math.abs(a.value - st.nominal) - Math.abs(b.value - st.nominal))[0];
  if (!best)
    return {
      verdict: "undecided",
      evidence: { kind: "no-deciding-threshold", parameter, threshold, nominal: st.nominal, range: st.range },
      where,
    };
  const zero = ZERO_VALUE_TOL * (st.range[1] - st.range[0]);
  const absolute = Math.abs(best.value - st.nominal);
  const side = absolute <= zero ? "at" : st.nominal < best.value ? "below" : "above";
  const relative = side === "at" || Math.abs(best.value) <= zero ? null : absolute / Math.abs(best.value);
  const margin: ClaimDistance = { absolute, relative, form: relative === null ? "absolute" : "relative" };
  return {
    // on the threshold to the location's accuracy, the value is on neither side
    verdict: side === "at" ? "undecided" : side === claim.side ? "supported" : "contradicted",
    evidence: { kind: "side", parameter, nominal: st.nominal, threshold: best, side, margin },
    where,
  };
}

/** The states an attractor name of the spec ('coexistence', '<states> only', 'all absent') keeps present. */
function presenceOf(name: string, states: string[]): string[] {
  if (name === "coexistence") return states;
  if (name === "all absent") return [];
  for (let mask = 1; mask < (1 << states.length) - 1; mask++) {
    const present = states.filter((_, k) => mask & (1 << k));
    if (`${present.join(" and ")} only` === name) return present;
  }
  throw new Error(`attractor name not validated: ${name}`);
}

function checkConditionDecides(
  ctx: ClaimContext,
  claim: ClaimOf<"condition-decides">,
  index: number,
): Verdict {
  const where = { section: "conditions" } as const;
  const condition = ctx.model.claimConditions.find((c) => c.assumption === index)!;
  const claimed = presenceOf(claim.attractor, ctx.model.stateNames).join(",");
  const ranged = ctx.model.spec.parameters.map((p, j) => ({ p, j })).filter(({ p }) => p.range);
  const count = claim.samples ?? DEFAULT_CLAIM_CONDITION_SAMPLES;
  let agreeing = 0,
    skipped = 0;
  for (let k = 1; k <= count; k++) {
    const values = Float64Array.from(ctx.model.parameterValues);
    ranged.forEach(({ p, j }, d) => {
      values[j] =
        p.range![0] + (p.range![1] - p.range![0]) * halton(k, HALTON_PRIMES[d % HALTON_PRIMES.length]);
    });
    const c = condition.evaluate(values);
    if (Math.abs(c.lhs - c.rhs) <= CONDITION_MARGIN_TOL * Math.max(Math.abs(c.lhs), Math.abs(c.rhs))) {
      skipped++;
      continue;
    }
    const { attractors } = classifyOutcome(withParameters(ctx.model, values), false);
    const present = attractors.some((a) => a.kind === "equilibrium" && a.present.join(",") === claimed);
    if (present === c.holds) {
      agreeing++;
      continue;
    }
    const at = Object.fromEntries(ranged.map(({ p, j }) => [p.name, values[j]]));
    return {
      verdict: "contradicted",
      evidence: {
        kind: "counterexample",
        attractor: claim.attractor,
        values: at,
        holds: c.holds,
        present,
        attractors,
        agreeing,
        skipped,
      },
      where,
    };
  }
  if (agreeing === 0)
    return { verdict: "undecided", evidence: { kind: "too-close-to-call", agreeing, skipped }, where };
  return {
    verdict: "supported",
    evidence: { kind: "condition-agrees", attractor: claim.attractor, agreeing, skipped },
    where,
  };
}

function checkThresholdValue(ctx: ClaimContext, claim: ClaimOf<"threshold-value">): Verdict {
  const parameter = claim.parameter;
  const where = { section: "conditions", parameter } as const;
  const st = ctx.studies.find((s) => s.parameter === parameter);
  if (!st) return { verdict: "undecided", evidence: { kind: "not-studied", parameter }, where };
  if (claim.value < st.range[0] || claim.value > st.range[1])
    return {
      verdict: "undecided",
      evidence: { kind: "value-outside-range", parameter, claimed: claim.value, range: st.range },
      where,
    };
  const threshold = claim.threshold ?? "any";
  const candidates = st.thresholds.filter((t) => threshold === "any" || t.kind === threshold);
  const best = [...candidates].sort(
    (a, b) => Math.abs(a.value - claim.value) - Math.abs(b.value - claim.value),
  )[0];
  if (!best)
    return {
      verdict: "contradicted",
      evidence: { kind: "no-threshold", parameter, threshold, claimed: claim.value },
      where,
    };
  const width = st.range[1] - st.range[0];
  const zero = ZERO_VALUE_TOL * width;
  const difference = Math.abs(best.value - claim.value);
  // a claimed zero has no relative difference: the tolerance is read against the range's width
  const scale =
    Math.abs(claim.value) <= zero
      ? null
      : Math.abs(best.value) > zero
        ? Math.abs(best.value)
        : Math.abs(claim.value);
  const allowed = claim.tolerance * (scale ?? CLAIM_ZERO_SCALE_OF_RANGE * width);
  const within = scale === null ? difference <= allowed : difference / scale <= claim.tolerance;
  return {
    verdict: within ? "supported" : "contradicted",
    evidence: {
      kind: "threshold-value",
      parameter,
      claimed: claim.value,
      located: { value: best.value, kind: best.kind },
      difference,
      relativeDifference: scale === null ? null : difference / scale,
      tolerance: claim.tolerance,
      form: scale === null ? "absolute" : "relative",
      allowed,
    },
    where,
  };
}

/** One checker per claim kind. */
const CHECKERS: { [K in ClaimKind]: (ctx: ClaimContext, claim: ClaimOf<K>, index: number) => Verdict } = {
  "equilibrium-count": checkCount,
  "equilibrium-type": checkType,
  "scenario-fate": checkFate,
  "parameter-side": checkSide,
  "condition-decides": checkConditionDecides,
  "threshold-value": checkThresholdValue,
};

function checkClaim<K extends ClaimKind>(ctx: ClaimContext, claim: ClaimOf<K>, index: number): Verdict {
  return (CHECKERS[claim.kind] as (ctx: ClaimContext, claim: ClaimOf<K>, index: number) => Verdict)(
    ctx,
    claim,
    index,
  );
}

export function checkClaims(ctx: ClaimContext): ClaimResult[] {
  return ctx.model.spec.claims.map((claim, index) => ({
    id: claim.id,
    kind: claim.kind,
    text: claim.text ?? "",
    ...checkClaim(ctx, claim, index),
  }));
}

import type { SingularityReason, SingularityResult, SingularFactorEvidence } from "../../analysis/types.js";
import { formatNumber } from "../format.js";
import { pointWords } from "./fates.js";

/** The dossier's wording for singular points and lines: why there is no linearisation, and the evidence. */
export const SINGULARITY_REASON_WORDS: Record<SingularityReason, string> = {
  indeterminate: "0/0: a denominator and the numerator over it vanish together",
  unbounded: "the field is unbounded",
  "not-differentiable": "the field is finite but not differentiable",
  "undefined-beyond": "the field is not defined beyond it",
};

const ROLE_WORDS: Record<SingularFactorEvidence["role"], string> = {
  denominator: "denominator",
  "log-argument": "argument of log",
  "root-argument": "argument of sqrt",
  "power-base": "base of a power",
  kink: "kink of abs, min or max",
};

const listWords = (items: string[]) =>
  items.length < 2 ? items.join("") : `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;

/** "denominator of the equations for x and y" (the expression itself is typeset beside it). */
export function singularFactorWords(f: SingularFactorEvidence): string {
  const exponent =
    f.role === "power-base" && f.exponent !== null ? ` (exponent ${formatNumber(f.exponent)})` : "";
  return `${ROLE_WORDS[f.role]}${exponent} in the equation${f.equations.length > 1 ? "s" : ""} for ${listWords(f.equations)}`;
}

/** Where: the point, or the box the line runs in ("x = 1, y ∈ [−1, 1]"). */
export function singularWhereWords(s: SingularityResult): string {
  if (s.shape === "point" || !s.extent) return pointWords(s.point);
  const ranges = Object.entries(s.extent).map(([n, [lo, hi]]) =>
    lo === hi ? `${n} = ${formatNumber(lo, 5)}` : `${n} ∈ [${formatNumber(lo, 5)}, ${formatNumber(hi, 5)}]`,
  );
  return `a line in ${ranges.join(", ")}`;
}

const FIELD_LIMIT_WORDS: Record<NonNullable<SingularityResult["fieldLimit"]>, string> = {
  zero: "the field tends to zero (as at a rest point)",
  nonzero: "the field does not tend to zero",
  unbounded: "the field grows without bound",
};

const JACOBIAN_LIMIT_WORDS: Record<NonNullable<SingularityResult["jacobianLimit"]>, string> = {
  same: "the Jacobian has one limit",
  "direction-dependent": "the Jacobian's limit depends on the direction",
  unbounded: "the Jacobian grows without bound",
};

/** The evidence, in one or two sentences, from the structural record alone (an archived null counts as not finite). */
export function singularEvidenceWords(s: SingularityResult): string {
  if (s.shape === "line")
    return "A trajectory that reaches this line meets the singularity; its fate past that point is not established.";
  const search = s.fromEquilibriumSearch
    ? "The equilibrium search converged here; the point is not classified. "
    : "";
  const field = Object.values(s.field).some((v) => !Number.isFinite(v))
    ? "The field as written has no value here."
    : "The field as written has a value here, but no derivative.";
  const rays = s.rays.length;
  const toward = s.rays.filter((r) => r.toward === true).length;
  const limits = [
    s.fieldLimit ? FIELD_LIMIT_WORDS[s.fieldLimit] : null,
    s.jacobianLimit ? JACOBIAN_LIMIT_WORDS[s.jacobianLimit] : null,
  ].filter((w): w is string => w !== null);
  const along = rays
    ? ` Along ${rays} ray${rays === 1 ? "" : "s"} into the window ${listWords(limits)}; the flow points toward the point along ${toward} of them.`
    : "";
  return `${search}${field}${along}`;
}

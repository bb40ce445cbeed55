import type { BorderlineResult, EquilibriumType } from "../../analysis/phase/stability.js";
import type { Fate, UndecidedReason } from "../../analysis/flow/follow.js";
import type { Results } from "../../analysis/types.js";
import type { WindowEdge } from "../../analysis/numeric/window.js";
import { formatNumber } from "../format.js";

/** The dossier's wording for types and fates: one place, so tables and summary agree. */
export const TYPE_WORDS: Record<EquilibriumType, string> = {
  saddle: "saddle",
  "stable-node": "stable node",
  "unstable-node": "unstable node",
  "stable-focus": "stable focus",
  "unstable-focus": "unstable focus",
  center: "center (linearisation)",
  "stable-degenerate-node": "stable degenerate node",
  "unstable-degenerate-node": "unstable degenerate node",
  "stable-star": "stable star",
  "unstable-star": "unstable star",
  "non-hyperbolic": "non-hyperbolic",
};

const BORDERLINE_QUANTITY_WORDS: Record<BorderlineResult["quantity"], string> = {
  discriminant: "discriminant/trace²",
  jordan: "‖J − λI‖/|λ| in window units",
};

/** "borderline between stable focus and stable node (discriminant/trace² = −10⁻¹⁰, within 10⁻⁸ of zero)". */
export function borderlineWords(b: BorderlineResult): string {
  const [call, other] = b.between.map((t) => TYPE_WORDS[t]);
  return (
    `borderline between ${call} and ${other} ` +
    `(${BORDERLINE_QUANTITY_WORDS[b.quantity]} = ${formatNumber(b.value, 2)}, within ${formatNumber(b.tolerance)} of zero)`
  );
}

/** A type as tables and sentences print it: "stable focus", or "stable focus, borderline with stable node". */
export function equilibriumTypeWords(e: {
  type: EquilibriumType;
  borderline: BorderlineResult | null;
  undecided?: "jacobian-not-finite";
}): string {
  if (e.undecided) return "undecided (the Jacobian is not finite here)";
  const type = TYPE_WORDS[e.type];
  return e.borderline ? `${type}, borderline with ${TYPE_WORDS[e.borderline.between[1]]}` : type;
}

export function stabilityWord(stable: boolean | null): string {
  return stable === true
    ? "attracting"
    : stable === false
      ? "repelling or saddle"
      : "not decided by the linearisation";
}

export function pointWords(point: Record<string, number>, digits = 5): string {
  return Object.entries(point)
    .map(([k, v]) => `${k} = ${formatNumber(v, digits)}`)
    .join(", ");
}

/** A window edge as the dossier names it: "N = 0". */
export function edgeWords(edge: WindowEdge): string {
  return `${edge.state} = ${edge.value}`;
}

/** An attractor by its id and kind: "E4 (stable node)", "C1 (stable cycle)" (or "periodic orbit"). */
export function attractorIdWords(results: Results, id: string, orbit: "cycle" | "periodic orbit"): string {
  const e = results.equilibria.find((q) => q.id === id);
  if (e) return `${id} (${equilibriumTypeWords(e)})`;
  const c = results.cycles.find((q) => q.id === id);
  return c ? `${id} (${c.stability} ${orbit})` : id;
}

export function fateWords(fate: Fate, results: Results, timeUnit: string): string {
  const t = (v: number) => `t = ${formatNumber(v, 4)} ${timeUnit}`;
  switch (fate.kind) {
    case "equilibrium": {
      const e = results.equilibria.find((q) => q.id === fate.target);
      const what = e ? `${fate.target} (${equilibriumTypeWords(e)} at ${pointWords(e.point)})` : fate.target;
      if (fate.approach === "stable-manifold")
        return `converges to the saddle ${what} along its stable manifold; any perturbation off that curve leaves it`;
      if (fate.approach === "algebraic")
        return `approaches ${what} slowly (algebraically, not exponentially); judged converged at ${t(fate.t)}`;
      return `converges to ${what}; inside its verified neighbourhood from ${t(fate.t)}`;
    }
    case "cycle": {
      const c = results.cycles.find((q) => q.id === fate.target);
      return c
        ? `settles on the periodic orbit ${fate.target} (${c.stability}, period ${formatNumber(c.period, 5)} ${timeUnit})`
        : `settles on the periodic orbit ${fate.target}`;
    }
    case "left-window":
      return `leaves the feasible region through ${edgeWords(fate.edge)} (the ${fate.bound === "min" ? "lower" : "upper"} bound of ${fate.edge.state}) at ${t(fate.t)}, at ${pointWords(fate.point)}`;
    case "blow-up":
      return `grows without bound (blow-up) by ${t(fate.t)}`;
    case "undecided":
      return `undecided at ${t(fate.t)}: ${undecidedReasonWords(fate.reason)}`;
  }
}

const UNDECIDED_REASON_WORDS: Record<UndecidedReason | "blow-up", string> = {
  "non-finite-rhs": "the right-hand side became non-finite",
  "step-limit": "the integrator's step limit was reached",
  horizon: "no equilibrium or periodic orbit was reached by the horizon",
  "recurrent-candidate": "recurrent: periodic-orbit candidate",
  "no-periodic-orbit": "recurrent, but no periodic orbit could be solved for",
  "singular-point":
    "it runs into a singular point, where the field is not defined; the equations do not say what happens there",
  "blow-up": "blow-up",
};

/** Why a fate stayed undecided, in the dossier's words. */
export function undecidedReasonWords(reason: UndecidedReason | "blow-up"): string {
  return UNDECIDED_REASON_WORDS[reason];
}

/** Standard cautions, printed in every dossier before the spec's own. */
export const STANDARD_CAUTIONS = [
  "A model simplifies. This dossier describes the behaviour of the model as specified, not of the real system; its conclusions hold only as far as the model's structure, parameter values and assumptions hold.",
  "Decisions about wildlife, fisheries or public health rest with the responsible authority and qualified professionals. This dossier is an input to such decisions, not a decision or a recommendation.",
  "Local laws, regulations and management rules apply and take precedence over anything stated here.",
  "Parameter values carry uncertainty. A conclusion near a threshold can change with small changes in the values; read the margins before relying on an outcome.",
  "Numerical results are computed to stated tolerances. Equilibria are found by a dense deterministic search, not a proof of completeness; a borderline case is reported as undecided rather than guessed.",
];

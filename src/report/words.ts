import type { EquilibriumType } from "../analysis/phase/stability.js";
import type { Fate } from "../analysis/flow/follow.js";
import type { Results } from "../analysis/types.js";
import { formatNumber } from "./format.js";

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

export function stabilityWord(stable: boolean | null): string {
  return stable === true ? "attracting" : stable === false ? "repelling or saddle" : "not decided by the linearisation";
}

export function pointWords(point: Record<string, number>, digits = 5): string {
  return Object.entries(point).map(([k, v]) => `${k} = ${formatNumber(v, digits)}`).join(", ");
}

export function fateWords(fate: Fate, results: Results, timeUnit: string): string {
  const t = (v: number) => `t = ${formatNumber(v, 4)} ${timeUnit}`;
  switch (fate.kind) {
    case "equilibrium": {
      const e = results.equilibria.find((q) => q.id === fate.target);
      const what = e ? `${fate.target} (${TYPE_WORDS[e.type]} at ${pointWords(e.point)})` : fate.target;
      if (fate.approach === "stable-manifold") return `converges to the saddle ${what} along its stable manifold; any perturbation off that curve leaves it`;
      if (fate.approach === "algebraic") return `approaches ${what} slowly (algebraically, not exponentially); judged converged at ${t(fate.t)}`;
      return `converges to ${what}; inside its verified neighbourhood from ${t(fate.t)}`;
    }
    case "cycle": {
      const c = results.cycles.find((q) => q.id === fate.target);
      return c ? `settles on the periodic orbit ${fate.target} (${c.stability}, period ${formatNumber(c.period, 5)} ${timeUnit})` : `settles on the periodic orbit ${fate.target}`;
    }
    case "left-window":
      return `leaves the analysed window through ${fate.edge} at ${t(fate.t)}, at ${pointWords(fate.point)}`;
    case "blow-up":
      return `grows without bound (blow-up) by ${t(fate.t)}`;
    case "undecided":
      return `undecided at ${t(fate.t)}: ${fate.reason}`;
  }
}

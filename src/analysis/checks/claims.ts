import type { Model } from "../../model/types.js";
import type { ClaimSpec } from "../../spec/schema.js";
import { withParameters } from "../../model/higher.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { ScenarioResult } from "../flow/trajectories.js";
import type { ParameterStudyResult } from "../parameters/study.js";
import { classifyOutcome } from "../parameters/outcomes.js";

/**
 * Claims checked one by one against the results. Each verdict carries its evidence (the
 * numbers) and where in the dossier a reader sees it.
 */
export interface ClaimResult {
  id: string;
  kind: ClaimSpec["kind"];
  text: string;
  verdict: "supported" | "contradicted" | "undecided";
  evidence: string;
  where: string;
  numbers: Record<string, number | string | null>;
}

/** Default nearness of a claimed point, as a fraction of the window in each state. */
export const CLAIM_NEAR_TOL = 0.02;
/** condition-decides: sample points whose condition sides agree to this, relatively, are too close to call and skipped. */
export const CONDITION_MARGIN_TOL = 1e-3;
const DEFAULT_CONDITION_SAMPLES = 64;
const HALTON_PRIMES = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53];

function halton(index: number, base: number): number {
  let f = 1, r = 0, i = index;
  while (i > 0) { f /= base; r += f * (i % base); i = Math.floor(i / base); }
  return r;
}

interface ClaimContext {
  model: Model;
  equilibria: EquilibriumResult[];
  scenarios: ScenarioResult[];
  studies: ParameterStudyResult[];
}

const fmt = (v: number) => String(Number(v.toPrecision(6)));
/** Types in words for evidence text: "stable node", not "stable-node". */
const words = (type: string) => type.replace(/-/g, " ");
const at = (p: Record<string, number>) => Object.entries(p).map(([k, v]) => `${k} = ${fmt(v)}`).join(", ");

function nearest(ctx: ClaimContext, point: Record<string, number>): { e: EquilibriumResult; distance: number } | null {
  let best: { e: EquilibriumResult; distance: number } | null = null;
  for (const e of ctx.equilibria) {
    const d = Math.max(...ctx.model.stateNames.map((n) => {
      const [lo, hi] = ctx.model.spec.window[n];
      return Math.abs(e.point[n] - point[n]) / (hi - lo);
    }));
    if (!best || d < best.distance) best = { e, distance: d };
  }
  return best;
}

function checkClaim(ctx: ClaimContext, claim: ClaimSpec, index: number): Omit<ClaimResult, "id" | "kind" | "text"> {
  switch (claim.kind) {
    case "equilibrium-count": {
      const stable = ctx.equilibria.filter((e) => e.stable === true).length;
      const unsure = ctx.equilibria.filter((e) => e.stable === null).length;
      const found = claim.stableOnly ? stable : ctx.equilibria.length;
      const what = claim.stableOnly ? "stable equilibria" : "equilibria";
      if (claim.stableOnly && unsure > 0 && claim.count >= stable && claim.count <= stable + unsure)
        return { verdict: "undecided", evidence: `${stable} ${what} found, and ${unsure} more whose stability the linearisation does not decide`, where: "Equilibria table", numbers: { claimed: claim.count, found, undecided: unsure } };
      return {
        verdict: found === claim.count ? "supported" : "contradicted",
        evidence: `${found} ${what} found in the window (claimed ${claim.count}): ${ctx.equilibria.filter((e) => !claim.stableOnly || e.stable === true).map((e) => e.id).join(", ") || "none"}`,
        where: "Equilibria table",
        numbers: { claimed: claim.count, found },
      };
    }
    case "equilibrium-type": {
      const tol = claim.tolerance ?? CLAIM_NEAR_TOL;
      const hit = nearest(ctx, claim.near);
      if (!hit || hit.distance > tol)
        return { verdict: "contradicted", evidence: `no equilibrium within ${fmt(100 * tol)}% of the window of ${at(claim.near)}${hit ? `; the nearest is ${hit.e.id} at ${at(hit.e.point)}` : ""}`, where: "Equilibria table", numbers: { distance: hit?.distance ?? null } };
      const e = hit.e;
      const matches = claim.type === "stable" ? e.stable === true : claim.type === "unstable" ? e.stable === false : e.type === claim.type;
      if (matches) return { verdict: "supported", evidence: `${e.id} at ${at(e.point)} is a ${words(e.type)} (trace ${fmt(e.trace)}, determinant ${fmt(e.determinant)})`, where: `Equilibria table, ${e.id}`, numbers: { equilibrium: e.id, trace: e.trace, determinant: e.determinant } };
      if (!e.hyperbolic) return { verdict: "undecided", evidence: `${e.id} at ${at(e.point)} is ${words(e.type)}: its linearisation does not decide whether it is a ${words(claim.type)}`, where: `Equilibria table, ${e.id}`, numbers: { equilibrium: e.id, trace: e.trace, determinant: e.determinant } };
      return { verdict: "contradicted", evidence: `${e.id} at ${at(e.point)} is a ${words(e.type)}, not a ${words(claim.type)} (trace ${fmt(e.trace)}, determinant ${fmt(e.determinant)})`, where: `Equilibria table, ${e.id}`, numbers: { equilibrium: e.id, trace: e.trace, determinant: e.determinant } };
    }
    case "scenario-fate": {
      const sc = ctx.scenarios.find((s) => s.name === claim.scenario)!;
      const fate = sc.fate;
      const where = `Summary: outcome from each scenario (${sc.name})`;
      if (fate.kind === "undecided") return { verdict: "undecided", evidence: `the trajectory of ${sc.name} is undecided: ${fate.reason}`, where, numbers: { t: fate.t } };
      if (claim.reaches === "cycle") {
        return fate.kind === "cycle"
          ? { verdict: "supported", evidence: `${sc.name} settles on the periodic orbit ${fate.target}`, where, numbers: { cycle: fate.target, t: fate.t } }
          : { verdict: "contradicted", evidence: `${sc.name} does not settle on a periodic orbit: its fate is ${fate.kind}${"target" in fate ? ` ${fate.target}` : ""}`, where, numbers: { t: fate.t } };
      }
      if (fate.kind !== "equilibrium") return { verdict: "contradicted", evidence: `${sc.name} does not converge to an equilibrium: its fate is ${fate.kind}${"target" in fate ? ` ${fate.target}` : ""}`, where, numbers: { t: fate.t } };
      const e = ctx.equilibria.find((q) => q.id === fate.target)!;
      if (!claim.near) return { verdict: "supported", evidence: `${sc.name} converges to ${e.id} at ${at(e.point)}`, where, numbers: { equilibrium: e.id, t: fate.t } };
      const tol = claim.tolerance ?? CLAIM_NEAR_TOL;
      const d = Math.max(...ctx.model.stateNames.map((n) => Math.abs(e.point[n] - claim.near![n]) / (ctx.model.spec.window[n][1] - ctx.model.spec.window[n][0])));
      return d <= tol
        ? { verdict: "supported", evidence: `${sc.name} converges to ${e.id} at ${at(e.point)}, within ${fmt(100 * d)}% of the window of the claimed point`, where, numbers: { equilibrium: e.id, distance: d } }
        : { verdict: "contradicted", evidence: `${sc.name} converges to ${e.id} at ${at(e.point)}, ${fmt(100 * d)}% of the window from the claimed ${at(claim.near)}`, where, numbers: { equilibrium: e.id, distance: d } };
    }
    case "parameter-side": {
      const st = ctx.studies.find((s) => s.parameter === claim.parameter);
      const where = `Deciding conditions: ${claim.parameter}`;
      if (!st) return { verdict: "undecided", evidence: `${claim.parameter} was not studied`, where, numbers: {} };
      const kind = claim.threshold ?? "any";
      const candidates = kind === "any" ? (st.margin ? [{ value: st.margin.threshold, kind: st.margin.kind }] : []) : st.thresholds.filter((t) => t.kind === kind).map((t) => ({ value: t.value, kind: t.kind }));
      const best = candidates.sort((a, b) => Math.abs(a.value - st.nominal) - Math.abs(b.value - st.nominal))[0];
      if (!best) return { verdict: "undecided", evidence: `no ${kind === "any" ? "threshold that changes the outcome" : kind + " threshold"} of ${claim.parameter} lies in its range ${fmt(st.range[0])} to ${fmt(st.range[1])}`, where, numbers: { nominal: st.nominal } };
      const side = st.nominal < best.value ? "below" : "above";
      const margin = Math.abs(best.value - st.nominal) / Math.abs(best.value);
      return {
        verdict: side === claim.side ? "supported" : "contradicted",
        evidence: `${claim.parameter} = ${fmt(st.nominal)} lies ${side} the ${best.kind} threshold at ${fmt(best.value)} (margin ${fmt(100 * margin)}%)`,
        where, numbers: { nominal: st.nominal, threshold: best.value, margin },
      };
    }
    case "condition-decides": {
      const condition = ctx.model.claimConditions.find((c) => c.assumption === index)!;
      const ranged = ctx.model.spec.parameters.map((p, j) => ({ p, j })).filter(({ p }) => p.range);
      const count = claim.samples ?? DEFAULT_CONDITION_SAMPLES;
      let agree = 0, skipped = 0;
      let counter: string | null = null;
      for (let k = 1; k <= count && !counter; k++) {
        const values = Float64Array.from(ctx.model.parameterValues);
        ranged.forEach(({ p, j }, d) => { values[j] = p.range![0] + (p.range![1] - p.range![0]) * halton(k, HALTON_PRIMES[d % HALTON_PRIMES.length]); });
        const c = condition.evaluate(values);
        if (Math.abs(c.lhs - c.rhs) <= CONDITION_MARGIN_TOL * Math.max(Math.abs(c.lhs), Math.abs(c.rhs))) { skipped++; continue; }
        const outcome = classifyOutcome(withParameters(ctx.model, values), false);
        const present = outcome.attractors.some((a) => a === claim.attractor || a.startsWith(`${claim.attractor} `));
        if (present === c.holds) agree++;
        else counter = `at ${ranged.map(({ p, j }) => `${p.name} = ${fmt(values[j])}`).join(", ")} the condition ${c.holds ? "holds" : "fails"} but ${present ? "a" : "no"} stable ${claim.attractor} equilibrium exists (attractors: ${outcome.attractors.join("; ") || "none"})`;
      }
      const where = "Deciding conditions";
      if (counter) return { verdict: "contradicted", evidence: counter, where, numbers: { agreeing: agree, skipped } };
      if (agree === 0) return { verdict: "undecided", evidence: `every sample was too close to the condition's boundary to call`, where, numbers: { agreeing: 0, skipped } };
      return { verdict: "supported", evidence: `at all ${agree} sampled parameter points across the ranges (Halton sequence; ${skipped} too close to the boundary to call) the condition holds exactly when a stable ${claim.attractor} equilibrium exists`, where, numbers: { agreeing: agree, skipped } };
    }
    case "threshold-value": {
      const st = ctx.studies.find((s) => s.parameter === claim.parameter);
      const where = `Deciding conditions: ${claim.parameter}`;
      if (!st) return { verdict: "undecided", evidence: `${claim.parameter} was not studied`, where, numbers: {} };
      if (claim.value < st.range[0] || claim.value > st.range[1]) return { verdict: "undecided", evidence: `the claimed value ${fmt(claim.value)} lies outside the range searched, ${fmt(st.range[0])} to ${fmt(st.range[1])}`, where, numbers: {} };
      const kind = claim.threshold ?? "any";
      const candidates = st.thresholds.filter((t) => kind === "any" || t.kind === kind);
      const best = [...candidates].sort((a, b) => Math.abs(a.value - claim.value) - Math.abs(b.value - claim.value))[0];
      if (!best) return { verdict: "contradicted", evidence: `no ${kind === "any" ? "" : kind + " "}threshold of ${claim.parameter} lies in its range`, where, numbers: { claimed: claim.value } };
      const rel = Math.abs(best.value - claim.value) / Math.abs(best.value);
      return {
        verdict: rel <= claim.tolerance ? "supported" : "contradicted",
        evidence: `the nearest ${best.kind} threshold of ${claim.parameter} is at ${fmt(best.value)}; the claimed ${fmt(claim.value)} differs by ${fmt(100 * rel)}% (allowed ${fmt(100 * claim.tolerance)}%)`,
        where, numbers: { claimed: claim.value, located: best.value, relativeDifference: rel },
      };
    }
  }
}

export function checkClaims(ctx: ClaimContext): ClaimResult[] {
  return ctx.model.spec.claims.map((claim, index) => ({
    id: claim.id,
    kind: claim.kind,
    text: claim.text ?? "",
    ...checkClaim(ctx, claim, index),
  }));
}

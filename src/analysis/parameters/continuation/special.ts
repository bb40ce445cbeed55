import type { Diagnostic } from "../../../diagnostics/issue.js";
import { compileHigherDerivatives, type HigherDerivatives } from "../../../model/higher.js";
import { classifyEquilibrium, type Complex, type EquilibriumType } from "../../phase/stability.js";
import {
  ACROSS_BOUND_TOL,
  BOUND_CONTACT_TOL,
  CROSSING_NEIGHBOURHOOD,
  DUPLICATE_TOL,
  LOCATE_TOL,
  ROOT_RESIDUAL_TOL,
  TEST_FUNCTION_TOL,
} from "../../constants.js";
import { liesOnBranch, type StepOptions, type ContinuedBranch } from "./branch.js";
import type { LocatedEvent } from "./detect.js";
import { firstLyapunovCoefficient } from "./lyapunov.js";
import { isInvariantBound } from "../invasion.js";
import { jacobianRows, type ContinuationSystem, type CurvePoint } from "./system.js";
import { scaledMaxDistance } from "../../numeric/distance.js";

export type SpecialPointKind = "saddle-node" | "transcritical" | "hopf" | "boundary-crossing";

/** Fixed order of kinds at equal parameter values. */
const KIND_ORDER: SpecialPointKind[] = ["saddle-node", "transcritical", "hopf", "boundary-crossing"];

export interface SpecialPointResult {
  parameter: string;
  /** Parameter value at the point. */
  value: number;
  kind: SpecialPointKind;
  /** hopf only: supercritical when l1 < 0 (a stable cycle is born), subcritical when l1 > 0. */
  criticality: "supercritical" | "subcritical" | null;
  point: Record<string, number>;
  /** Index into ContinuationResult.branches of the branch it was located on. */
  branch: number;
  /** hopf only: l1 in the model's units (see lyapunov.ts for the normalisation). */
  firstLyapunovCoefficient: number | null;
  eigenvalues: Complex[];
  /** max_i |f_i| / (size of f_i over the window) at the point. */
  residual: number;
  /** |test function| at the point relative to its scale (det J, trace J, or distance to the bound over the window width). */
  testResidual: number;
  /** Equilibrium types just before and just after the point, along the branch. */
  stabilityChange: { before: EquilibriumType; after: EquilibriumType };
  /** transcritical: the branch it exchanges stability with, and that branch's types either side. */
  exchange: { branch: number; before: EquilibriumType; after: EquilibriumType } | null;
  /** boundary-crossing, and transcritical on a bound: the state at its bound. */
  bound: { state: string; value: number } | null;
}

function boundAt(
  sys: ContinuationSystem,
  z: CurvePoint,
  tol: number,
  pred: (k: number) => boolean = () => true,
): { state: number; value: number } | null {
  const states = sys.model.spec.states;
  for (let k = 0; k < states.length; k++) {
    for (const value of [states[k].min, states[k].max]) {
      if (Number.isFinite(value) && Math.abs(z[k] - value) <= tol * sys.box.width[k] && pred(k))
        return { state: k, value };
    }
  }
  return null;
}

/** The bound a branch point lies on with its critical direction across it (see ACROSS_BOUND_TOL). */
function criticalBoundAt(sys: ContinuationSystem, z: CurvePoint): { state: number; value: number } | null {
  const j = jacobianRows(sys, z);
  const size = Math.hypot(j[0][0], j[0][1], j[1][0], j[1][1]);
  return boundAt(sys, z, BOUND_CONTACT_TOL, (k) => Math.abs(j[k][k]) <= ACROSS_BOUND_TOL * size);
}

const invariance = new WeakMap<object, Map<string, boolean>>();

/** Whether f_k vanishes identically on the bound (invasion.ts's test), once per model and bound. */
function invariantBound(sys: ContinuationSystem, bound: { state: number; value: number }): boolean {
  let known = invariance.get(sys.model);
  if (!known) invariance.set(sys.model, (known = new Map()));
  const key = `${bound.state} ${bound.value}`;
  let invariant = known.get(key);
  if (invariant === undefined) {
    invariant = isInvariantBound(sys.model, bound.state, bound.value);
    known.set(key, invariant);
  }
  return invariant;
}

/**
 * The invariant bound z lies on with its invasion rate J_kk (the eigenvalue across it) at zero:
 * a branch of equilibria off the bound meets the branch lying on it there, so the point is a
 * transcritical, whether the branch crossing the bound was seen to cross or (numerically) to turn.
 */
function invadedBoundAt(sys: ContinuationSystem, z: CurvePoint): { state: number; value: number } | null {
  const bound = criticalBoundAt(sys, z);
  return bound && invariantBound(sys, bound) ? bound : null;
}

/** Another branch passes through z and reaches parameter values on both sides of z's near it. */
function crossedByAnother(
  sys: ContinuationSystem,
  branches: ContinuedBranch[],
  own: number,
  z: CurvePoint,
  steps: StepOptions,
): number | null {
  for (let k = 0; k < branches.length; k++) {
    if (k === own || !liesOnBranch(sys, branches[k], z, null, steps)) continue;
    let below = false;
    let above = false;
    for (const p of branches[k].points) {
      if (scaledMaxDistance(p.z, z, sys.span) > CROSSING_NEIGHBOURHOOD) continue;
      const dp = (p.z[2] - z[2]) / sys.span[2];
      if (dp < -LOCATE_TOL) below = true;
      if (dp > LOCATE_TOL) above = true;
    }
    if (below && above) return k;
  }
  return null;
}

interface Candidate {
  event: LocatedEvent;
  kind: SpecialPointKind;
  bound: { state: number; value: number } | null;
  /** Some coordinate equals a state bound exactly: located on the branch lying on the bound, the well-conditioned one. */
  exactlyOnBound: boolean;
}

function classify(
  sys: ContinuationSystem,
  branches: ContinuedBranch[],
  event: LocatedEvent,
  steps: StepOptions,
  diagnostics: Diagnostic[],
): Candidate | null {
  const exactlyOnBound = boundAt(sys, event.z, 0) !== null;
  switch (event.kind) {
    case "saddle-node": {
      const invaded = invadedBoundAt(sys, event.z);
      return invaded
        ? { event, kind: "transcritical", bound: invaded, exactlyOnBound }
        : { event, kind: "saddle-node", bound: null, exactlyOnBound };
    }
    case "hopf":
      return { event, kind: "hopf", bound: null, exactlyOnBound };
    case "boundary-crossing": {
      const invaded = invadedBoundAt(sys, event.z);
      return invaded && invaded.state === event.bound?.state
        ? { event, kind: "transcritical", bound: invaded, exactlyOnBound }
        : { event, kind: "boundary-crossing", bound: event.bound, exactlyOnBound };
    }
    case "transcritical": {
      const bound = criticalBoundAt(sys, event.z);
      if (bound || crossedByAnother(sys, branches, event.branch, event.z, steps) !== null)
        return { event, kind: "transcritical", bound, exactlyOnBound };
      const name = sys.model.parameterNames[sys.parameterIndex];
      diagnostics.push({
        severity: "warning",
        stage: "continuation",
        code: "unclassified-branch-point",
        data: { parameter: name, value: event.z[2] },
      });
      return null;
    }
  }
}

function feasible(sys: ContinuationSystem, z: CurvePoint): boolean {
  const [lo, hi] = sys.range;
  const slack = LOCATE_TOL * sys.span[2];
  if (!(z[2] >= lo - slack && z[2] <= hi + slack)) return false;
  return sys.model.spec.states.every((s, k) => {
    const tol = BOUND_CONTACT_TOL * sys.box.width[k];
    return z[k] >= s.min - tol && z[k] <= s.max + tol;
  });
}

const mergeable = (a: SpecialPointKind, b: SpecialPointKind) =>
  a === b || (a !== "saddle-node" && a !== "hopf" && b !== "saddle-node" && b !== "hopf");

/** Preferred representative of duplicates: a transcritical over a crossing; then the well-conditioned one; then the lower branch. */
function better(a: Candidate, b: Candidate): boolean {
  if (a.kind !== b.kind) return a.kind === "transcritical";
  if (a.exactlyOnBound !== b.exactlyOnBound) return a.exactlyOnBound;
  return a.event.branch < b.event.branch;
}

function group(sys: ContinuationSystem, candidates: Candidate[]): Candidate[][] {
  const groups: Candidate[][] = [];
  for (const c of candidates) {
    const home = groups.find((g) =>
      g.some(
        (d) =>
          mergeable(c.kind, d.kind) && scaledMaxDistance(c.event.z, d.event.z, sys.span) <= DUPLICATE_TOL,
      ),
    );
    if (home) home.push(c);
    else groups.push([c]);
  }
  return groups;
}

/**
 * Near a branch crossing the corrector stalls, so a bound crossing seen from the crossing branch
 * may fail to verify; when a verified transcritical on the same bound lies close, it is that one.
 */
function dropTwinCrossings(
  sys: ContinuationSystem,
  results: SpecialPointResult[],
  diagnostics: Diagnostic[],
): SpecialPointResult[] {
  const parameter = sys.model.parameterNames[sys.parameterIndex];
  const verified = (r: SpecialPointResult) =>
    r.residual <= ROOT_RESIDUAL_TOL && r.testResidual <= TEST_FUNCTION_TOL;
  const width = sys.range[1] - sys.range[0];
  return results.filter((r) => {
    if (r.kind !== "boundary-crossing" || verified(r)) return true;
    const twin = results.find(
      (q) =>
        q.kind === "transcritical" &&
        verified(q) &&
        q.bound?.state === r.bound?.state &&
        Math.abs(q.value - r.value) <= CROSSING_NEIGHBOURHOOD * width,
    );
    if (twin)
      diagnostics.push({
        severity: "info",
        stage: "continuation",
        code: "bound-crossing-is-transcritical",
        data: { parameter, value: r.value, transcritical: twin.value },
      });
    return !twin;
  });
}

/**
 * Special points from the events of every branch: branch points classified (on a bound, or where
 * another branch crosses: transcritical), points outside the range or the feasible region
 * dropped, duplicates merged (the transcritical seen from the crossing branch, or as a
 * boundary crossing, is reported once), Hopf points given l1, sorted by value then kind.
 */
export function buildSpecialPoints(
  sys: ContinuationSystem,
  branches: ContinuedBranch[],
  events: LocatedEvent[],
  steps: StepOptions,
  diagnostics: Diagnostic[],
): SpecialPointResult[] {
  const model = sys.model;
  const parameter = model.parameterNames[sys.parameterIndex];
  const candidates = events
    .filter((e) => feasible(sys, e.z))
    .map((e) => classify(sys, branches, e, steps, diagnostics))
    .filter((c): c is Candidate => c !== null);
  let higher: HigherDerivatives | null = null;
  const results = group(sys, candidates).map((members) => {
    const best = members.reduce((x, y) => (better(y, x) ? y : x));
    const { event } = best;
    const partner =
      best.kind === "transcritical"
        ? members.find((m) => m.event.branch !== event.branch && m.kind === "transcritical")
        : undefined;
    const stability = classifyEquilibrium(jacobianRows(sys, event.z), sys.box.width);
    let lyapunov: ReturnType<typeof firstLyapunovCoefficient> | null = null;
    if (best.kind === "hopf") {
      higher ??= compileHigherDerivatives(model);
      const params = Float64Array.from(model.parameterValues);
      params[sys.parameterIndex] = event.z[2];
      const second = new Float64Array(8);
      const third = new Float64Array(16);
      higher.second.evaluate(event.z, params, second);
      higher.third.evaluate(event.z, params, third);
      lyapunov = firstLyapunovCoefficient(stability.jacobian.flat(), second, third);
    }
    if (!(event.residual <= ROOT_RESIDUAL_TOL) || !(event.testResidual <= TEST_FUNCTION_TOL)) {
      diagnostics.push({
        severity: "warning",
        stage: "continuation",
        code: "special-point-unverified",
        data: {
          kind: best.kind,
          parameter,
          value: event.z[2],
          residual: event.residual,
          testResidual: event.testResidual,
        },
      });
    }
    const bound = best.bound;
    const result: SpecialPointResult = {
      parameter,
      value: event.z[2] + 0,
      kind: best.kind,
      criticality: lyapunov?.criticality ?? null,
      point: Object.fromEntries(model.stateNames.map((n, k) => [n, event.z[k] + 0])),
      branch: event.branch,
      firstLyapunovCoefficient: lyapunov?.value ?? null,
      eigenvalues: stability.eigenvalues,
      residual: event.residual,
      testResidual: event.testResidual,
      stabilityChange: { before: event.before, after: event.after },
      exchange: partner
        ? { branch: partner.event.branch, before: partner.event.before, after: partner.event.after }
        : null,
      bound: bound ? { state: model.stateNames[bound.state], value: bound.value } : null,
    };
    return result;
  });
  const kept = dropTwinCrossings(sys, results, diagnostics);
  return kept.sort(
    (a, b) =>
      a.value - b.value || KIND_ORDER.indexOf(a.kind) - KIND_ORDER.indexOf(b.kind) || a.branch - b.branch,
  );
}

import type { Diagnostic } from "../../../diagnostics/issue.js";
import { classifyEquilibrium, type EquilibriumType } from "../../phase/stability.js";
import { BOUND_CONTACT_TOL, BOUND_TRANSVERSAL_TOL, CLASSIFY_REL_TOL, SIDE_OFFSET } from "../../constants.js";
import { spectralRadius } from "../../numeric/linear.js";
import type { ContinuedBranch, BranchVertex } from "./branch.js";
import { locateBetween, pointAlong } from "./locate.js";
import {
  currentResidual,
  determinantAt,
  evaluate,
  jacobianRows,
  traceAt,
  type ContinuationSystem,
  type CurvePoint,
} from "./system.js";

/**
 * Test functions along a branch and the events where they change sign between consecutive points:
 *   det J: a saddle-node when the tangent's p-component turns there too, else a transcritical
 *   candidate (special.ts keeps it only on a bound or where another branch crosses);
 *   trace J with det J > 0 on both sides: a Hopf point;
 *   x_k − bound, for each finite state bound: the branch crosses a bound of the feasible region.
 */
export type EventKind = "saddle-node" | "transcritical" | "hopf" | "boundary-crossing";

export interface LocatedEvent {
  kind: EventKind;
  branch: number;
  z: CurvePoint;
  /** Tangent at z, oriented along the branch. */
  t: Float64Array;
  /** Scaled residual max |f_i| / fScale_i at z. */
  residual: number;
  /** |test function| at z relative to its own scale (see testScale). */
  testResidual: number;
  /** Equilibrium types just before and just after z along the branch. */
  before: EquilibriumType;
  after: EquilibriumType;
  /** For "boundary-crossing": the state index and the bound value it crosses. */
  bound: { state: number; value: number } | null;
}

interface Bracket {
  kind: EventKind;
  /** Consecutive points with nonzero test values of opposite sign (other points between them are exact zeros). */
  a: number;
  b: number;
  /** A point between a and b where the test function is zero (or within rounding noise of it). */
  exact: number | null;
  bound: { state: number; value: number } | null;
}

type SignChange = Pick<Bracket, "a" | "b" | "exact">;

/** Where values change sign along the branch, skipping exact zeros (and non-finite values). */
function signChanges(values: number[]): SignChange[] {
  const out: SignChange[] = [];
  let last = -1;
  values.forEach((v, k) => {
    if (v === 0 || !Number.isFinite(v)) return;
    if (last >= 0 && Math.sign(v) !== Math.sign(values[last])) {
      const zero = values.findIndex((w, i) => i > last && i < k && w === 0);
      out.push({ a: last, b: k, exact: zero >= 0 ? zero : null });
    }
    last = k;
  });
  return out;
}

/**
 * A test value within CLASSIFY_REL_TOL of its scale is rounding noise (stability.ts calls it zero):
 * a branch of centres (trace ≡ 0, as in a conservative model) must not show a Hopf point at every
 * sign flip of the noise. Such values count as exact zeros, which signChanges steps over.
 */
const quiet = (value: number, scale: number) => (Math.abs(value) <= CLASSIFY_REL_TOL * scale ? 0 : value);

function findBrackets(sys: ContinuationSystem, branch: ContinuedBranch): Bracket[] {
  const pts = branch.points;
  const brackets: Bracket[] = [];
  for (const change of signChanges(pts.map((p) => quiet(p.determinant, p.determinantScale)))) {
    const turning = pts[change.a].t[2] * pts[change.b].t[2] < 0;
    brackets.push({ kind: turning ? "saddle-node" : "transcritical", ...change, bound: null });
  }
  for (const change of signChanges(pts.map((p) => quiet(p.trace, p.traceScale)))) {
    if (pts[change.a].determinant > 0 && pts[change.b].determinant > 0)
      brackets.push({ kind: "hopf", ...change, bound: null });
  }
  sys.model.spec.states.forEach((state, k) => {
    // a vertex within contact of the bound is on it: a branch lying on an invariant axis carries
    // corrector noise of ±1e-40 about it, whose sign flips are no crossing
    const contact = BOUND_CONTACT_TOL * sys.box.width[k];
    for (const value of [state.min, state.max]) {
      if (!Number.isFinite(value)) continue;
      const offsets = pts.map((p) => (Math.abs(p.z[k] - value) <= contact ? 0 : p.z[k] - value));
      for (const change of signChanges(offsets))
        brackets.push({ kind: "boundary-crossing", ...change, bound: { state: k, value } });
    }
  });
  return brackets;
}

/** The test function of a bracket, and a scale for it that a change of units leaves fair. */
function testFunction(
  sys: ContinuationSystem,
  bracket: Bracket,
): { g: (z: CurvePoint) => number; scale: (z: CurvePoint) => number } {
  if (bracket.kind === "hopf") {
    return {
      g: (z) => traceAt(sys, z),
      scale: (z) => {
        const s = classifyEquilibrium(jacobianRows(sys, z));
        const [[a], [, d]] = s.jacobian;
        return Math.max(Math.abs(a), Math.abs(d), spectralRadius(s.eigenvalues)) || 1;
      },
    };
  }
  if (bracket.kind === "boundary-crossing") {
    const { state, value } = bracket.bound!;
    return { g: (z) => (z[state] - value) / sys.span[state], scale: () => 1 };
  }
  return {
    g: (z) => determinantAt(sys, z),
    scale: (z) => {
      const s = classifyEquilibrium(jacobianRows(sys, z));
      const [[a, b], [c, d]] = s.jacobian;
      return Math.max(Math.abs(a * d), Math.abs(b * c), spectralRadius(s.eigenvalues) ** 2) || 1;
    },
  };
}

function typeAt(sys: ContinuationSystem, z: ArrayLike<number>): EquilibriumType {
  return classifyEquilibrium(jacobianRows(sys, z), sys.box.width).type;
}

/** Types on either side of z along t; falls back to the bracket's end points. */
function sides(
  sys: ContinuationSystem,
  z: CurvePoint,
  t: Float64Array,
  a: BranchVertex,
  b: BranchVertex,
): [EquilibriumType, EquilibriumType] {
  const chart = { z, t };
  const before = pointAlong(sys, chart, -SIDE_OFFSET);
  const after = pointAlong(sys, chart, SIDE_OFFSET);
  return [typeAt(sys, before ?? a.z), typeAt(sys, after ?? b.z)];
}

/** Every event of one branch, located (see locate.ts) and described. */
export function locateEvents(
  sys: ContinuationSystem,
  branch: ContinuedBranch,
  branchIndex: number,
  diagnostics: Diagnostic[],
): LocatedEvent[] {
  const pts = branch.points;
  const events: LocatedEvent[] = [];
  for (const bracket of findBrackets(sys, branch)) {
    const { g, scale } = testFunction(sys, bracket);
    const a = pts[bracket.a];
    const b = pts[bracket.b];
    const exact = bracket.exact === null ? null : pts[bracket.exact];
    // a point whose test value was only quieted to zero is no event: locate across it
    const located =
      exact && g(exact.z) === 0 ? { z: exact.z, t: exact.t, value: 0 } : locateBetween(sys, a, b, g);
    if (!located) {
      const name = sys.model.parameterNames[sys.parameterIndex];
      diagnostics.push({
        severity: "warning",
        stage: "continuation",
        code: "test-function-sign-change-not-located",
        data: { event: bracket.kind, branch: branchIndex, parameter: name, from: a.z[2], to: b.z[2] },
      });
      continue;
    }
    if (bracket.kind === "hopf" && !(determinantAt(sys, located.z) > 0)) continue;
    // a crossing is real only where the branch passes through the bound, not along it
    if (
      bracket.kind === "boundary-crossing" &&
      !(Math.abs(located.t[bracket.bound!.state]) >= BOUND_TRANSVERSAL_TOL)
    )
      continue;
    evaluate(sys, located.z);
    const residual = currentResidual(sys);
    const testResidual = Math.abs(g(located.z)) / scale(located.z);
    const [before, after] = sides(sys, located.z, located.t, a, b);
    events.push({
      kind: bracket.kind,
      branch: branchIndex,
      z: located.z,
      t: located.t,
      residual,
      testResidual,
      before,
      after,
      bound: bracket.bound,
    });
  }
  return events;
}

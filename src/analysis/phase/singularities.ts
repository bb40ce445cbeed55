import type { Model } from "../../model/types.js";
import { windowOf } from "../numeric/window.js";
import { DEDUP_REL_TOL } from "../constants.js";
import { singularContext, singularPointAt, type SingularPoint } from "./singularities/points.js";
import { findSingularLines } from "./singularities/lines.js";
import type { SingularityResult } from "./singularities/types.js";

export type {
  SingularityResult,
  SingularityReason,
  SingularFactorEvidence,
  SingularRay,
} from "./singularities/types.js";
export type { SingularPoint } from "./singularities/points.js";

/**
 * Where the field or its Jacobian is not defined or not continuous, found from the equation
 * trees (model.singularFactors: denominators, log/sqrt/power arguments, kinks) rather than by
 * chance: each factor's zero set is sampled on a grid over the window. An isolated zero (a
 * corner such as x + y = 0 at the origin of the positive quadrant, an extremum of the factor)
 * is examined as a singular point; a zero curve is a singular line. `fromSearch` holds the
 * points where the equilibrium search converged onto a singular point (findEquilibriumCandidates
 * drops them from the equilibria): they are merged in, so a 0/0 rest point the grid misses is
 * still listed. A point gets evidence, never a type: the field as compiled there, its limits and
 * the Jacobian's along rays into the window, and the flow's direction on each ray.
 *
 * Not found: a factor that touches zero between grid nodes without changing sign (e.g. a
 * denominator (x − a)² + (y − b)² with (a, b) off the grid) unless the equilibrium search lands there.
 */
export function findSingularities(model: Model, fromSearch: SingularPoint[] = []): SingularityResult[] {
  const box = windowOf(model);
  if (!model.singularFactors.length && !fromSearch.length) return [];
  const ctx = singularContext(model, box);
  const { lines, points } = findSingularLines(ctx);
  const found: SingularPoint[] = [];
  const same = (p: SingularPoint, q: SingularPoint) =>
    model.stateNames.every((n, i) => Math.abs(p.point[n] - q.point[n]) <= DEDUP_REL_TOL * box.width[i]);
  for (const p of fromSearch) if (!found.some((q) => same(p, q))) found.push(p);
  for (const x of points) {
    const evidence = singularPointAt(ctx, x, false);
    if (evidence && !found.some((q) => same(evidence, q))) found.push(evidence);
  }
  const byPoint = (p: SingularPoint, q: SingularPoint) => {
    for (let i = 0; i < 2; i++) {
      const diff = p.point[model.stateNames[i]] - q.point[model.stateNames[i]];
      if (Math.abs(diff) > DEDUP_REL_TOL * box.width[i]) return diff;
    }
    return 0;
  };
  return [...found.sort(byPoint), ...lines.sort(byPoint)].map((s, k) => ({ id: `X${k + 1}`, ...s }));
}

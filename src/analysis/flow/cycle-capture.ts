import type { Model } from "../../model/types.js";
import { boundsOf, type Box } from "../numeric/window.js";
import type { CycleCapture, CycleResult, SolvedOrbit } from "./cycles.js";
import { returnAccuracyScale, returnMap, staysInside, type Return, type Section } from "./section.js";
import {
  CYCLE_CAPTURE_FIRST_OFFSET,
  CYCLE_MIN_EXTENT,
  FAMILY_EDGE_BISECTIONS,
  SHOOT_ACCEPT_TOL,
  CAPTURE_PROBE_WINDOWS,
  WINDOW_EXIT_SLACK,
} from "../constants.js";

/**
 * Probe radii on one side of the fixed point r*, nearest first: offsets growing geometrically
 * from CYCLE_CAPTURE_FIRST_OFFSET · r*, inwards down to CYCLE_MIN_EXTENT, outwards up to and
 * including the end of the ray (rEdge).
 */
function probeRadii(rStar: number, side: 1 | -1, rEdge: number): number[] {
  const out: number[] = [];
  for (let d = CYCLE_CAPTURE_FIRST_OFFSET * rStar; ; d *= 2) {
    const r = side === 1 ? rStar + d : rStar - d;
    if (side === 1 ? r >= rEdge : d >= rStar / 2) break;
    out.push(r);
  }
  if (side === -1) for (let r = rStar / 4; r > CYCLE_MIN_EXTENT; r /= 2) out.push(r);
  else if (rStar < rEdge) out.push(rEdge);
  return out;
}

/**
 * The farthest probe on one side of r* (walking out from r*) whose return passes `pass`, refined by
 * `bisections` halvings against the first that fails; r* itself when the nearest fails.
 */
function farthestPassing(
  rStar: number,
  radii: number[],
  period: number,
  pass: (r: number, period: number) => Return | null,
  bisections: number,
): number {
  let good = rStar,
    guess = period;
  let bad: number | null = null;
  for (const r of radii) {
    const ret = pass(r, guess);
    if (!ret) {
      bad = r;
      break;
    }
    good = r;
    guess = ret.period;
  }
  for (let k = 0; k < bisections && bad !== null; k++) {
    const m = 0.5 * (good + bad);
    const ret = pass(m, guess);
    if (ret) {
      good = m;
      guess = ret.period;
    } else bad = m;
  }
  return good;
}

/**
 * Where a solved cycle's section crossings are known to end (see CycleCapture): probed once when
 * the cycle is found, so later trajectories and basin cells need not be followed to it. Only
 * stable cycles found forward and neutral ones get one; null when the cycle itself leaves the
 * window or no probe passes.
 */
export function findCycleCapture(
  model: Model,
  box: Box,
  cycle: SolvedOrbit,
  center: [number, number],
  rStar: number,
  direction: 1 | -1,
): CycleCapture | null {
  const kind = cycle.stability === "neutral" ? "family" : "attracting";
  if (cycle.stability !== "neutral" && !(cycle.stability === "stable" && direction === 1)) return null;
  // trajectories are followed inside the feasible region (the states' bounds), so orbits must stay in it
  const region = boundsOf(model);
  const inside = (ret: Return) => staysInside(ret, region, box, WINDOW_EXIT_SLACK);
  const section: Section = { model, box, center, sense: cycle.section.sense, direction: 1 };
  const own = returnMap(section, rStar, cycle.period, "sample");
  if (!own || !inside(own)) return null;
  const pass = (r: number, period: number): Return | null => {
    const ret = returnMap(section, r, period, "sample");
    if (!ret || !inside(ret)) return null;
    const g = ret.r - r;
    if (kind === "family") return Math.abs(g) <= SHOOT_ACCEPT_TOL ? ret : null;
    // moves towards r* without passing it (by more than the returns' accuracy, which a strongly
    // contracting cycle's returns scatter within): no other fixed point between (sampled)
    const slack = SHOOT_ACCEPT_TOL * returnAccuracyScale(ret);
    return Math.sign(g) === Math.sign(rStar - r) && Math.abs(g) < Math.abs(rStar - r) + slack ? ret : null;
  };
  // the ray runs to the feasible region's edge, or as far as a return may stray past the window
  const rEdge =
    (Math.min(region.hi[0], box.hi[0] + CAPTURE_PROBE_WINDOWS * box.width[0]) - center[0]) / box.width[0];
  const bisections = kind === "family" ? FAMILY_EDGE_BISECTIONS : 0;
  const lo = farthestPassing(rStar, probeRadii(rStar, -1, rEdge), cycle.period, pass, bisections);
  const hi = farthestPassing(rStar, probeRadii(rStar, 1, rEdge), cycle.period, pass, bisections);
  return lo < hi ? { kind, radii: [lo, hi] } : null;
}

/** Whether a crossing at scaled radius r of the ray through `around`, in forward sense `sense`, lies in a cycle's capture. */
export function inCapture(
  cycle: Pick<CycleResult, "around" | "section" | "capture">,
  around: string,
  sense: 1 | -1,
  r: number,
): boolean {
  const c = cycle.capture;
  return (
    c !== null &&
    cycle.around === around &&
    cycle.section.sense === sense &&
    r >= c.radii[0] &&
    r <= c.radii[1]
  );
}

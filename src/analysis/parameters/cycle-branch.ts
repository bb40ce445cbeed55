import type { Model } from "../../model/types.js";
import { withParameters } from "../../model/parameters.js";
import { windowOf, type Box } from "../numeric/window.js";
import { solvePeriodicOrbit, type CycleResult } from "../flow/cycles.js";
import type { Recurrence } from "../flow/follow.js";
import type { BranchResult, BranchVertexResult } from "./continuation/index.js";
import type { SpecialPointResult } from "./continuation/special.js";
import {
  CYCLE_BRANCH_FIRST_OFFSET,
  CYCLE_BRANCH_MAX_POINTS,
  CYCLE_BRANCH_RADII,
  CYCLE_BRANCH_STEP,
} from "../constants.js";

/**
 * The branch of periodic orbits born at a Hopf point, followed in the parameter: at parameter
 * values stepping away from the Hopf value on the side where the cycle exists (where the
 * equilibrium has lost stability for a supercritical point, where it still holds it for a
 * subcritical one), the orbit is solved by shooting on the ray section through the equilibrium
 * (flow/cycles.ts), each from the previous orbit's radius. The diagram draws each state's
 * minimum and maximum over the orbit against the parameter (its amplitude).
 */
export interface CycleBranchPointResult {
  value: number;
  period: number;
  stability: CycleResult["stability"];
  /** Least and greatest value of each state over the orbit. */
  min: Record<string, number>;
  max: Record<string, number>;
}

export interface CycleBranchResult {
  /** Parameter value of the Hopf point the branch starts at, and its equilibrium (the orbit's zero-amplitude limit). */
  hopf: number;
  point: Record<string, number>;
  /** In order away from the Hopf point. */
  points: CycleBranchPointResult[];
  /** How it stopped: the end of the range, the branch of equilibria turned or ended, shooting found no orbit, or the point limit. */
  end: "range" | "equilibrium-branch" | "lost" | "point-limit";
}

/** The branch's equilibrium at parameter value v, walking from vertex `from` in direction `step` (linear between vertices). */
function equilibriumAt(branch: BranchResult, from: number, step: 1 | -1, v: number, names: string[]) {
  const pts = branch.points;
  for (let k = from; k + step >= 0 && k + step < pts.length; k += step) {
    const [a, b] = [pts[k], pts[k + step]];
    if ((v - a.value) * (v - b.value) > 0) continue;
    const w = b.value === a.value ? 0 : (v - a.value) / (b.value - a.value);
    return { k, center: names.map((n) => a.point[n] + w * (b.point[n] - a.point[n])) as [number, number] };
  }
  return null;
}

/** The vertex index next to the Hopf point on the side where the cycle exists, and the way along the branch from it. */
function cycleSide(branch: BranchResult, hopf: SpecialPointResult): { from: number; step: 1 | -1 } | null {
  const pts = branch.points;
  const wantTrace = hopf.criticality === "subcritical" ? -1 : 1;
  for (let k = 0; k + 1 < pts.length; k++) {
    const [a, b] = [pts[k], pts[k + 1]];
    if ((hopf.value - a.value) * (hopf.value - b.value) > 0 || Math.sign(a.trace) === Math.sign(b.trace))
      continue;
    return Math.sign(b.trace) === wantTrace ? { from: k + 1, step: 1 } : { from: k, step: -1 };
  }
  return null;
}

function orbitAt(
  model: Model,
  box: Box,
  center: [number, number],
  jacobian: BranchVertexResult | null,
  radii: number[],
  direction: 1 | -1,
) {
  // the orbit turns the way the linearisation does: on the ray x > x_c, dy/dt ≈ J21 (x − x_c)
  const j21 = jacobianColumnSign(model, center);
  const sense = (direction * j21) as 1 | -1;
  const period = jacobian ? (2 * Math.PI) / Math.sqrt(Math.max(jacobian.determinant, Number.MIN_VALUE)) : 1;
  for (const r of radii) {
    const point: [number, number] = [center[0] + r * box.width[0], center[1]];
    const recurrence: Recurrence = { around: "hopf", sense, point, period, t: 0 };
    const solved = solvePeriodicOrbit(model, box, recurrence, center, direction);
    if (solved.ok) return solved;
  }
  return null;
}

function jacobianColumnSign(model: Model, center: [number, number]): 1 | -1 {
  const j = new Float64Array(4);
  model.jacobianAt(center, j);
  return j[2] >= 0 ? 1 : -1;
}

/** The cycle branch from one Hopf point on `branch`; null when the side of the cycle cannot be told. */
export function continueCycleFromHopf(
  model: Model,
  parameter: string,
  range: [number, number],
  hopf: SpecialPointResult,
  branch: BranchResult,
): CycleBranchResult | null {
  const side = cycleSide(branch, hopf);
  if (!side) return null;
  const names = model.stateNames;
  const j = model.parameterNames.indexOf(parameter);
  const box = windowOf(model);
  const width = range[1] - range[0];
  const dir = Math.sign(branch.points[side.from].value - hopf.value) || 1;
  const direction = hopf.criticality === "subcritical" ? -1 : 1;
  const points: CycleBranchPointResult[] = [];
  let radii = CYCLE_BRANCH_RADII;
  let from = side.from;
  let end: CycleBranchResult["end"] = "point-limit";
  for (let n = 0; n < CYCLE_BRANCH_MAX_POINTS; n++) {
    const v = hopf.value + dir * width * (n === 0 ? CYCLE_BRANCH_FIRST_OFFSET : n * CYCLE_BRANCH_STEP);
    if (v < range[0] || v > range[1]) {
      end = "range";
      break;
    }
    const at = equilibriumAt(branch, Math.max(0, from - side.step), side.step, v, names);
    if (!at) {
      end = "equilibrium-branch";
      break;
    }
    from = at.k;
    const params = Float64Array.from(model.parameterValues);
    params[j] = v;
    const view = withParameters(model, params);
    const solved = orbitAt(view, box, at.center, branch.points[at.k], radii, direction);
    if (!solved) {
      end = "lost";
      break;
    }
    const { cycle, rStar } = solved;
    points.push({
      value: v,
      period: cycle.period,
      stability: cycle.stability,
      min: Object.fromEntries(names.map((s) => [s, cycle.extent[s][0]])),
      max: Object.fromEntries(names.map((s) => [s, cycle.extent[s][1]])),
    });
    // near the Hopf point the amplitude grows as the square root of the distance to it
    const next = hopf.value + dir * width * (n + 1) * CYCLE_BRANCH_STEP;
    radii = [
      rStar * Math.sqrt(Math.abs(next - hopf.value) / Math.abs(v - hopf.value)),
      rStar,
      ...CYCLE_BRANCH_RADII,
    ];
  }
  return { hopf: hopf.value, point: { ...hopf.point }, points, end };
}

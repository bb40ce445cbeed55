import type { Diagnostic } from "../../../diagnostics/issue.js";
import { withParameters } from "../../../model/parameters.js";
import type { Model } from "../../../model/types.js";
import { findEquilibria, type EquilibriumOptions } from "../../phase/equilibria.js";
import { classifyEquilibrium, type EquilibriumType } from "../../phase/stability.js";
import {
  liesOnBranch,
  switchBranch,
  continueBranch,
  type BranchEnd,
  type StepOptions,
  type ContinuedBranch,
} from "./branch.js";
import { locateEvents, type LocatedEvent } from "./detect.js";
import { buildSpecialPoints, type SpecialPointResult } from "./special.js";
import { continueCycleFromHopf, type CycleBranchResult } from "../cycle-branch.js";
import {
  CONTINUATION_MAX_BRANCHES,
  CONTINUATION_SEED_VALUES,
  DEFAULT_EQUILIBRIUM_OPTIONS,
  DEFAULT_STEP_OPTIONS,
} from "../../constants.js";
import { buildSystem, jacobianRows, tangentAt, type ContinuationSystem, type CurvePoint } from "./system.js";

export type { SpecialPointResult, SpecialPointKind } from "./special.js";
export type { BranchEnd, StepOptions } from "./branch.js";
export { firstLyapunovCoefficient, type LyapunovResult } from "./lyapunov.js";
export type { CycleBranchResult, CycleBranchPointResult } from "../cycle-branch.js";

/**
 * Branches of equilibria followed across a parameter range by pseudo-arclength continuation:
 *
 *   seeds (findEquilibria at the nominal value and at evenly spaced values across the range)
 *     → continue each seed's branch both ways (branch.ts), skipping seeds already on a branch
 *     → test functions between consecutive points, located on the branch (detect.ts, locate.ts)
 *     → at a branch point no known branch crosses, switch onto the crossing branch and continue it
 *     → classify, merge duplicates, add l1 at Hopf points (special.ts, lyapunov.ts)
 */

export interface ContinuationOptions {
  /** Evenly spaced parameter values (ends included) at which equilibria seed branches, besides the nominal value. */
  seedValues: number;
  steps: StepOptions;
  equilibria: EquilibriumOptions;
  /** At most this many branches are continued (a guard against a curve of equilibria). */
  maxBranches: number;
}

export const DEFAULT_CONTINUATION_OPTIONS: ContinuationOptions = {
  seedValues: CONTINUATION_SEED_VALUES,
  steps: DEFAULT_STEP_OPTIONS,
  equilibria: DEFAULT_EQUILIBRIUM_OPTIONS,
  maxBranches: CONTINUATION_MAX_BRANCHES,
};

export interface BranchVertexResult {
  /** Parameter value. */
  value: number;
  point: Record<string, number>;
  stable: boolean | null;
  type: EquilibriumType;
  trace: number;
  determinant: number;
}

export interface BranchResult {
  index: number;
  /** The equilibrium (or branch-switching point) the branch was continued from. */
  seed: { value: number; point: Record<string, number> };
  /** How each end of points was reached. */
  ends: [BranchEnd, BranchEnd];
  /** In order along the branch; at the seed the parameter increases along it. */
  points: BranchVertexResult[];
}

export interface ContinuationResult {
  parameter: string;
  range: [number, number];
  branches: BranchResult[];
  /** Sorted by value, then kind (saddle-node, transcritical, hopf, boundary-crossing), then branch. */
  points: SpecialPointResult[];
  /** The branch of cycles from each Hopf point with a criticality, in the order of points. */
  cycles: CycleBranchResult[];
}

function collectSeeds(
  model: Model,
  sys: ContinuationSystem,
  options: ContinuationOptions,
  diagnostics: Diagnostic[],
): CurvePoint[] {
  const [lo, hi] = sys.range;
  const j = sys.parameterIndex;
  const values: number[] = [];
  const nominal = model.parameterValues[j];
  if (nominal >= lo && nominal <= hi) values.push(nominal);
  const count = Math.max(2, options.seedValues);
  for (let k = 0; k < count; k++) {
    const v = k === count - 1 ? hi : lo + ((hi - lo) * k) / (count - 1);
    if (!values.includes(v)) values.push(v);
  }
  const seeds: CurvePoint[] = [];
  for (const v of values) {
    const params = Float64Array.from(model.parameterValues);
    params[j] = v;
    const local: Diagnostic[] = [];
    for (const e of findEquilibria(withParameters(model, params), options.equilibria, local)) {
      seeds.push(Float64Array.from([e.point[model.stateNames[0]], e.point[model.stateNames[1]], v]));
    }
    for (const d of local)
      diagnostics.push({ ...d, stage: "continuation", at: { parameter: model.parameterNames[j], value: v } });
  }
  return seeds;
}

function onSomeBranch(
  sys: ContinuationSystem,
  branches: ContinuedBranch[],
  z: CurvePoint,
  steps: StepOptions,
): boolean {
  const t = tangentAt(sys, z, null);
  return branches.some((b) => liesOnBranch(sys, b, z, t, steps));
}

function describeBranch(sys: ContinuationSystem, branch: ContinuedBranch, index: number): BranchResult {
  const names = sys.model.stateNames;
  const point = (z: CurvePoint) => Object.fromEntries(names.map((n, k) => [n, z[k] + 0]));
  const seed = branch.points[branch.seed].z;
  return {
    index,
    seed: { value: seed[2], point: point(seed) },
    ends: branch.ends,
    points: branch.points.map((p) => {
      const s = classifyEquilibrium(jacobianRows(sys, p.z), sys.box.width);
      return {
        value: p.z[2] + 0,
        point: point(p.z),
        stable: s.stable,
        type: s.type,
        trace: s.trace,
        determinant: s.determinant,
      };
    }),
  };
}

/**
 * Every branch of equilibria across `range` of `parameter`, with its stability, and the folds,
 * transcritical points, Hopf points and bound crossings on it, each located to 1e-10 relative.
 * Pure and deterministic: the result depends on the model, the parameter, the range and options.
 */
export function continueEquilibria(
  model: Model,
  parameter: string,
  range: [number, number],
  options: Partial<ContinuationOptions> = {},
  diagnostics: Diagnostic[] = [],
): ContinuationResult {
  const j = model.parameterNames.indexOf(parameter);
  if (j < 0) throw new Error(`continueEquilibria: no parameter named ${parameter}`);
  if (!(Number.isFinite(range[0]) && Number.isFinite(range[1]) && range[0] < range[1])) {
    throw new Error(`continueEquilibria: range [${range[0]}, ${range[1]}] is not an interval`);
  }
  if (model.dimension !== 2) throw new Error("continueEquilibria: planar models only");
  const opts: ContinuationOptions = { ...DEFAULT_CONTINUATION_OPTIONS, ...options };
  const sys = buildSystem(model, j, [range[0], range[1]]);
  const branches: ContinuedBranch[] = [];
  const addBranch = (seed: CurvePoint): void => {
    if (branches.length >= opts.maxBranches || onSomeBranch(sys, branches, seed, opts.steps)) return;
    const continued = continueBranch(sys, seed, opts.steps);
    if (continued) branches.push(continued);
  };
  for (const seed of collectSeeds(model, sys, opts, diagnostics)) addBranch(seed);
  if (branches.length >= opts.maxBranches) {
    diagnostics.push({
      severity: "warning",
      stage: "continuation",
      code: "too-many-branches",
      data: { parameter, maxBranches: opts.maxBranches },
    });
  }

  const events: LocatedEvent[] = [];
  for (let i = 0; i < branches.length; i++) {
    const found = locateEvents(sys, branches[i], i, diagnostics);
    for (const e of found) {
      if (e.kind !== "transcritical") continue;
      if (branches.some((b, k) => k !== i && liesOnBranch(sys, b, e.z, null, opts.steps))) continue;
      for (const seed of switchBranch(sys, e.z, e.t)) addBranch(seed);
    }
    events.push(...found);
  }
  const described = branches.map((b, i) => describeBranch(sys, b, i));
  const points = buildSpecialPoints(sys, branches, events, opts.steps, diagnostics);
  const cycles = points
    .filter((q) => q.kind === "hopf" && q.criticality)
    .map((q) => continueCycleFromHopf(model, parameter, range, q, described[q.branch]))
    .filter((c): c is CycleBranchResult => c !== null);
  return { parameter, range: [range[0], range[1]], branches: described, points, cycles };
}

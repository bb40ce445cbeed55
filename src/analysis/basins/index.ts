import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import type { CycleResult } from "../flow/cycles.js";
import { boundsOf, type Box } from "../numeric/window.js";
import { findCaptureRegions } from "../flow/capture.js";
import { generateBasinKernel, type BasinTargets, type KernelSettings } from "./kernel.js";
import {
  BASIN_ABSOLUTE_TOL_OF_WIDTH,
  BASIN_INITIAL_STEP_OF_TIMESCALE,
  BASIN_MAX_STEPS,
  BASIN_MAX_STEPS_OUTSIDE,
  BASIN_RELATIVE_TOL,
  CYCLE_CAPTURE_RADIUS,
} from "../constants.js";
import {
  basinRefinement,
  encodeRuns,
  labelFractions,
  type BasinGrid,
  type BasinGridOptions,
  type BoundaryCurve,
} from "./refine.js";
import { labelName, LABEL_BLOW_UP, LABEL_LEFT_WINDOW, LABEL_UNDECIDED } from "./labels.js";

/** The basin map's options are those of its grid refinement. */
export type BasinOptions = BasinGridOptions;

export interface BasinResult {
  attractors: string[];
  /** Area fraction of the window per attractor id, and for left-window (left the feasible region), blow-up, undecided. */
  fractions: Record<string, number>;
  /**
   * Largest error of any fraction: the share of finest cells whose label is uncertain, those that
   * border another label (each could belong to either side) and the undecided ones (each could
   * belong to any). It does not count a feature no coarse cell centre samples (refine.ts).
   */
  errorBound: number;
  resolution: number;
  coarse: number;
  trajectories: number;
  /** Trajectories a uniform grid at the same resolution would need. */
  uniformTrajectories: number;
  /** Row-major from the lowest row of the second state; values index `legend`. */
  grid: { nx: number; ny: number; legend: string[]; runs: number[] };
  /** Scaled radius of each attractor's verified capture region. */
  captureRadius: Record<string, number>;
}

export interface BasinPlan {
  kernelSource: string;
  targets: BasinTargets;
  options: BasinOptions;
  box: Box;
  /** Known basin boundaries (the saddles' stable manifolds): cells they cross are always refined. */
  boundaries: BoundaryCurve[];
}

/** One neutral cycle per family (the first, by id order) whose capture band was verified. */
function familyTargets(cycles: CycleResult[]): CycleResult[] {
  const seen = new Set<string>();
  return cycles.filter((c) => {
    if (c.stability !== "neutral" || c.capture?.kind !== "family") return false;
    const key = JSON.stringify([c.around, c.section.sense, c.capture.radii]);
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

/** Which attractors (and neutral families) a basin map can label, and the kernel that labels them. */
export function planBasins(
  model: Model,
  equilibria: EquilibriumResult[],
  cycles: CycleResult[],
  box: Box,
  horizon: number,
  timeScale: number,
  options: BasinOptions,
  diagnostics: Diagnostic[],
  singularPoints: { id: string; point: Record<string, number> }[] = [],
  boundaries: BoundaryCurve[] = [],
): BasinPlan {
  const regions = findCaptureRegions(model, equilibria, box, 1);
  const attractors: string[] = [];
  const targets: BasinTargets = { attractors, sinks: [], slowSinks: [], cycles: [], singular: [] };
  for (const e of equilibria) {
    if (e.stable !== true) continue;
    const region = regions.find((r) => r.equilibrium === e.id);
    if (!region) {
      diagnostics.push({
        severity: "warning",
        stage: "basins",
        code: "no-capture-region",
        data: { equilibrium: e.id },
      });
      continue;
    }
    targets.sinks.push({ label: attractors.length, region });
    attractors.push(e.id);
  }
  // a neutral family of closed orbits is recognised once (its capture band, probed when the first of
  // its cycles was solved): a cell whose trajectory crosses the band lies on the family
  const families = familyTargets(cycles);
  for (const e of equilibria) {
    // a centre inside a family attracts nothing: the family's band labels its cells
    if (e.hyperbolic || families.some((c) => c.around === e.id)) continue;
    targets.slowSinks.push({
      label: attractors.length,
      center: [e.point[model.stateNames[0]], e.point[model.stateNames[1]]],
    });
    attractors.push(e.id);
  }
  for (const c of [...cycles.filter((q) => q.stability === "stable"), ...families]) {
    const around = equilibria.find((e) => e.id === c.around)!;
    const center: [number, number] = [around.point[model.stateNames[0]], around.point[model.stateNames[1]]];
    const radius = (c.section.point[model.stateNames[0]] - center[0]) / box.width[0];
    // the capture probed when the cycle was solved; else a neighbourhood its multiplier (< 1) makes attracting
    const radii: [number, number] =
      c.capture?.kind === "attracting" || c.capture?.kind === "family"
        ? c.capture.radii
        : [radius - Math.min(CYCLE_CAPTURE_RADIUS, radius / 2), radius + CYCLE_CAPTURE_RADIUS];
    targets.cycles.push({ label: attractors.length, center, sense: c.section.sense, radii });
    attractors.push(c.id);
  }
  // not attractors: a trajectory that runs into one cannot be followed on, and is labelled so
  for (const s of singularPoints) {
    targets.singular.push({
      label: attractors.length,
      center: [s.point[model.stateNames[0]], s.point[model.stateNames[1]]],
    });
    attractors.push(s.id);
  }
  const settings: KernelSettings = {
    horizon,
    initialStep: Math.min(horizon, timeScale) * BASIN_INITIAL_STEP_OF_TIMESCALE,
    relativeTolerance: BASIN_RELATIVE_TOL,
    absoluteOfWidth: BASIN_ABSOLUTE_TOL_OF_WIDTH,
    maxSteps: BASIN_MAX_STEPS,
    maxStepsOutside: BASIN_MAX_STEPS_OUTSIDE,
  };
  const bounds = boundsOf(model);
  return {
    kernelSource: generateBasinKernel(model, box, bounds, targets, settings),
    targets,
    options,
    box,
    boundaries,
  };
}

export function startRefinement(plan: BasinPlan) {
  return basinRefinement(plan.box, plan.options, plan.boundaries);
}

const SPECIAL_ORDER = [LABEL_LEFT_WINDOW, LABEL_BLOW_UP, LABEL_UNDECIDED];

/** The labelled grid as results: fractions, error bound, and a run-length-encoded grid. */
export function assembleBasinResult(plan: BasinPlan, grid: BasinGrid): BasinResult {
  const attractors = plan.targets.attractors;
  const legendLabels = [...attractors.map((_, k) => k), ...SPECIAL_ORDER];
  const legend = legendLabels.map((l) => labelName(l, attractors));
  const indexOf = new Map(legendLabels.map((l, k) => [l, k]));
  const fractions = labelFractions(grid.labels, attractors);
  const captureRadius = Object.fromEntries(
    plan.targets.sinks.map((s) => [attractors[s.label], s.region.radius]),
  );
  return {
    attractors,
    fractions,
    errorBound: grid.uncertainCells / grid.labels.length,
    resolution: grid.resolution,
    coarse: plan.options.coarse,
    trajectories: grid.trajectories,
    uniformTrajectories: grid.resolution * grid.resolution,
    grid: {
      nx: grid.resolution,
      ny: grid.resolution,
      legend,
      runs: encodeRuns(grid.labels, (l) => indexOf.get(l)!),
    },
    captureRadius,
  };
}

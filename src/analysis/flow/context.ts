import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import { findCaptureRegions, type CaptureRegion } from "./capture.js";
import { tolerancesFor, type IntegrationTolerances } from "../numeric/integrate.js";
import { boundsOf, type Box } from "../numeric/window.js";

/** What the fate rules need to know about the equilibria, for one time direction. */
export interface FlowContext {
  model: Model;
  /** The window: the scale of every scaled distance and overshoot, and where portrait seeds lie. */
  box: Box;
  /** The feasible region (the states' min/max): trajectories are followed inside it; leaving it is the fate left-window. */
  bounds: Box;
  equilibria: EquilibriumResult[];
  direction: 1 | -1;
  captures: CaptureRegion[];
  saddles: { id: string; center: [number, number]; stable: [number, number]; unstable: [number, number] }[];
  nonHyperbolic: { id: string; center: [number, number] }[];
  rays: { id: string; center: [number, number] }[];
  /**
   * Rule 7's known cycles: a crossing of the ray through `around` in forward sense `sense` at a
   * scaled radius within `radii` ends at cycle `id` (the attracting captures of the stable cycles
   * solved so far; empty until the cycle registry supplies them, see flow/registry.ts).
   */
  cycleCaptures: { id: string; around: string; sense: 1 | -1; radii: [number, number] }[];
  /** Singular points (the field undefined, as 0/0): a trajectory that runs into one cannot be followed on. */
  singularPoints: { id: string; center: [number, number] }[];
  tolerances: IntegrationTolerances;
}

export function buildFlowContext(
  model: Model,
  equilibria: EquilibriumResult[],
  box: Box,
  direction: 1 | -1,
  singularPoints: { id: string; point: Record<string, number> }[] = [],
): FlowContext {
  const pointOf = (e: EquilibriumResult): [number, number] => [
    e.point[model.stateNames[0]],
    e.point[model.stateNames[1]],
  ];
  const scaled = (v: number[]): [number, number] => {
    const s: [number, number] = [v[0] / box.width[0], v[1] / box.width[1]];
    const n = Math.hypot(s[0], s[1]);
    return [s[0] / n, s[1] / n];
  };
  const saddles = equilibria
    .filter((e) => e.type === "saddle" && e.eigenvectors.length === 2)
    .map((e) => {
      // eigenvalues are sorted ascending: [stable, unstable]; in backward time they swap roles
      const [vs, vu] =
        direction === 1 ? [e.eigenvectors[0], e.eigenvectors[1]] : [e.eigenvectors[1], e.eigenvectors[0]];
      return { id: e.id, center: pointOf(e), stable: scaled(vs), unstable: scaled(vu) };
    });
  return {
    model,
    box,
    bounds: boundsOf(model),
    equilibria,
    direction,
    captures: findCaptureRegions(model, equilibria, box, direction),
    saddles,
    nonHyperbolic: equilibria.filter((e) => !e.hyperbolic).map((e) => ({ id: e.id, center: pointOf(e) })),
    rays: equilibria.filter((e) => e.type !== "saddle").map((e) => ({ id: e.id, center: pointOf(e) })),
    cycleCaptures: [],
    singularPoints: singularPoints.map((s) => ({
      id: s.id,
      center: [s.point[model.stateNames[0]], s.point[model.stateNames[1]]],
    })),
    tolerances: tolerancesFor(box.width),
  };
}

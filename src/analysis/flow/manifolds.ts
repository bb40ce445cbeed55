import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import {
  followTrajectory,
  type Fate,
  type FlowContext,
  type FollowResult,
  type TrajectoryPath,
} from "./follow.js";
import { settleFate, type CycleRegistry } from "./trajectories.js";
import type { UndecidedReason } from "./follow.js";
import type { Box, WindowEdge } from "../numeric/window.js";
import { MANIFOLD_MIN_STEPS, MANIFOLD_OFFSET } from "../constants.js";

/** Where a separatrix ends: its fate, or "outside-window" when its start already lies outside. */
export type SeparatrixFate =
  | { kind: "equilibrium"; target: string }
  | { kind: "cycle"; target: string }
  | { kind: "left-window"; point: Record<string, number>; edge: WindowEdge }
  | { kind: "outside-window" }
  | { kind: "undecided"; reason: UndecidedReason | "blow-up" };

export interface SeparatrixResult {
  saddle: string;
  /** "stable": the stable manifold (integrated backward); "unstable": forward. */
  manifold: "stable" | "unstable";
  /** +1 or −1: which side of the saddle along the eigenvector. */
  side: 1 | -1;
  start: Record<string, number>;
  fate: SeparatrixFate;
  path: TrajectoryPath;
}

/** A separatrix's fate from its trajectory's: a curve that leaves the window and then blows up still ends, for the portrait, at the edge. */
function separatrixFate(fate: Fate, follow: FollowResult, names: string[]): SeparatrixFate {
  if (fate.kind === "equilibrium" || fate.kind === "cycle") return { kind: fate.kind, target: fate.target };
  if (fate.kind === "left-window") return { kind: "left-window", point: fate.point, edge: fate.edge };
  if (follow.exit)
    return {
      kind: "left-window",
      point: { [names[0]]: follow.exit.point[0], [names[1]]: follow.exit.point[1] },
      edge: follow.exit.edge,
    };
  return { kind: "undecided", reason: fate.kind === "blow-up" ? "blow-up" : fate.reason };
}

/** Both sides of the stable and unstable manifolds of every saddle, to the window edge or an attractor of the flow direction. */
export function findSeparatrices(
  model: Model,
  equilibria: EquilibriumResult[],
  box: Box,
  forward: FlowContext,
  backward: FlowContext,
  registry: CycleRegistry,
  horizon: number,
  maxPathPoints: number,
): SeparatrixResult[] {
  const out: SeparatrixResult[] = [];
  const names = model.stateNames;
  for (const e of equilibria) {
    if (e.type !== "saddle" || e.eigenvectors.length !== 2) continue;
    const c: [number, number] = [e.point[names[0]], e.point[names[1]]];
    for (const manifold of ["stable", "unstable"] as const) {
      const v = manifold === "stable" ? e.eigenvectors[0] : e.eigenvectors[1];
      const ctx = manifold === "stable" ? backward : forward;
      // offset of MANIFOLD_OFFSET window-widths along v, measured in scaled coordinates
      const sv = [v[0] / box.width[0], v[1] / box.width[1]];
      const norm = Math.hypot(sv[0], sv[1]);
      for (const side of [1, -1] as const) {
        const start: [number, number] = [
          c[0] + (side * MANIFOLD_OFFSET * v[0]) / norm,
          c[1] + (side * MANIFOLD_OFFSET * v[1]) / norm,
        ];
        const rec = { [names[0]]: start[0], [names[1]]: start[1] };
        const outside = start.some((x, k) => x < box.lo[k] || x > box.hi[k]);
        if (outside) {
          out.push({
            saddle: e.id,
            manifold,
            side,
            start: rec,
            fate: { kind: "outside-window" },
            path: { t: [], x: [], y: [] },
          });
          continue;
        }
        const follow = followTrajectory(ctx, start, {
          horizon,
          maxPathPoints,
          detectRecurrence: true,
          maxStep: horizon / MANIFOLD_MIN_STEPS,
        });
        const fate = separatrixFate(settleFate(ctx, follow, registry), follow, names);
        // the path starts at the saddle itself so the drawn curve reaches it
        const path = { t: [0, ...follow.path.t], x: [c[0], ...follow.path.x], y: [c[1], ...follow.path.y] };
        out.push({ saddle: e.id, manifold, side, start: rec, fate, path });
      }
    }
  }
  return out;
}

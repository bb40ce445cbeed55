import type { Model } from "../../model/types.js";
import { componentScales, type Box } from "../numeric/window.js";
import {
  EQUILIBRIUM_SET_LINK_CELLS,
  EQUILIBRIUM_SET_MIN_EXTENT_CELLS,
  EQUILIBRIUM_SET_MAX_POINTS,
  DEGENERATE_JACOBIAN_TOL,
} from "../constants.js";

/**
 * Equilibria that are not isolated: where the field vanishes along a curve (u' = u·g, v' = v·g
 * rests on all of g = 0) or over a region, the multistart Newton lands at a different point of
 * it from each start, and listing those points as equilibria would fill the list with arbitrary
 * members, each "non-hyperbolic", and hide the isolated ones. Roots are grouped instead: two are
 * linked when both have a degenerate window-scaled Jacobian (rank below 2, to
 * DEGENERATE_JACOBIAN_TOL) and lie within EQUILIBRIUM_SET_LINK_CELLS multistart cells of each
 * other; a linked group spanning at least EQUILIBRIUM_SET_MIN_EXTENT_CELLS cells is one set
 * (a "region" where the scaled Jacobian vanishes at every member, else a "curve"); a smaller
 * group is one degenerate equilibrium found several times (its best-polished root stays).
 * Sampled, not proved: a set is what the roots show, at the multistart's resolution.
 */
export interface EquilibriumSetResult {
  id: string;
  kind: "curve" | "region";
  /** Roots the multistart found on it (each a point where the field vanishes). */
  roots: number;
  extent: Record<string, [number, number]>;
  /** Up to EQUILIBRIUM_SET_MAX_POINTS of its roots, sorted by the first state, then the second. */
  points: Record<string, number>[];
}

interface Root {
  x: [number, number];
  residual: number;
}

type Rank = 0 | 1 | 2;

/** Rank of the Jacobian at x scaled by the window and the field's scales (so units do not matter). */
function scaledRank(model: Model, x: [number, number], box: Box, fScale: number[]): Rank {
  const j = new Float64Array(4);
  model.jacobianAt(Float64Array.from(x), j);
  const s = [0, 1, 2, 3].map((k) => (j[k] * box.width[k % 2]) / fScale[Math.floor(k / 2)]);
  if (!s.every(Number.isFinite)) return 2;
  const norm = Math.hypot(s[0], s[1], s[2], s[3]);
  if (norm <= DEGENERATE_JACOBIAN_TOL) return 0;
  const det = Math.abs(s[0] * s[3] - s[1] * s[2]);
  return det <= DEGENERATE_JACOBIAN_TOL * norm * norm ? 1 : 2;
}

/** Groups of indices joined by `linked`, each in ascending order, ordered by their first index. */
function components(count: number, linked: (a: number, b: number) => boolean): number[][] {
  const parent = Array.from({ length: count }, (_, k) => k);
  const find = (k: number): number => {
    while (parent[k] !== k) k = parent[k] = parent[parent[k]];
    return k;
  };
  for (let a = 0; a < count; a++)
    for (let b = a + 1; b < count; b++) if (linked(a, b)) parent[find(b)] = find(a);
  const groups = new Map<number, number[]>();
  for (let k = 0; k < count; k++) {
    const root = find(k);
    if (!groups.has(root)) groups.set(root, []);
    groups.get(root)!.push(k);
  }
  return [...groups.values()];
}

/** The roots as isolated equilibria and sets (see EquilibriumSetResult); `roots` sorted as the equilibria are. */
export function groupEquilibriumSets<T extends Root>(
  model: Model,
  roots: T[],
  box: Box,
  gridSize: number,
): { isolated: T[]; sets: EquilibriumSetResult[] } {
  const fScale = componentScales(model, box);
  const ranks = roots.map((r) => scaledRank(model, r.x, box, fScale));
  const cell = (k: number) => box.width[k] / gridSize;
  const linked = (a: number, b: number) =>
    ranks[a] < 2 &&
    ranks[b] < 2 &&
    [0, 1].every((k) => Math.abs(roots[a].x[k] - roots[b].x[k]) <= EQUILIBRIUM_SET_LINK_CELLS * cell(k));
  const isolated: T[] = [];
  const sets: EquilibriumSetResult[] = [];
  const names = model.stateNames;
  for (const group of components(roots.length, linked)) {
    const members = group.map((k) => roots[k]);
    const lo = [0, 1].map((k) => Math.min(...members.map((m) => m.x[k])));
    const hi = [0, 1].map((k) => Math.max(...members.map((m) => m.x[k])));
    const spans = [0, 1].some((k) => hi[k] - lo[k] >= EQUILIBRIUM_SET_MIN_EXTENT_CELLS * cell(k));
    if (group.length === 1 || !spans) {
      isolated.push(members.reduce((best, m) => (m.residual < best.residual ? m : best)));
      continue;
    }
    const step = Math.max(1, Math.ceil(members.length / EQUILIBRIUM_SET_MAX_POINTS));
    sets.push({
      id: `Q${sets.length + 1}`,
      kind: group.every((k) => ranks[k] === 0) ? "region" : "curve",
      roots: members.length,
      extent: { [names[0]]: [lo[0], hi[0]], [names[1]]: [lo[1], hi[1]] },
      points: members
        .filter((_, i) => i % step === 0)
        .map((m) => ({ [names[0]]: m.x[0] + 0, [names[1]]: m.x[1] + 0 })),
    });
  }
  return { isolated, sets };
}

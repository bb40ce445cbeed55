import { groupEquilibriumSets, type EquilibriumSetResult } from "./equilibrium-sets.js";
import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import { classifyEquilibrium, type StabilityResult } from "./stability.js";
import { boundsOf, componentScales, windowOf, type Box } from "../numeric/window.js";
import { bisect } from "../numeric/roots.js";
import { solve2 } from "../numeric/linear.js";
import {
  groupsAt,
  locateSingularPoint,
  singularContext,
  singularPointAt,
  type SingularContext,
  type SingularPoint,
} from "./singularities/points.js";
import {
  DEDUP_REL_TOL,
  DEFAULT_EQUILIBRIUM_OPTIONS,
  EDGE_BISECTION_MAX_ITERATIONS,
  MAX_EQUILIBRIA,
  NEWTON_MAX_ITERATIONS,
  NEWTON_MIN_DAMPING,
  NEWTON_POLISH_STALLS,
  NEWTON_ROAM,
  NEWTON_STEP_TOL,
  NEWTON_SUFFICIENT_DECREASE,
  POLISH_RESIDUAL_FRACTION,
  ROOT_RESIDUAL_TOL,
  SNAP_REL_TOL,
  WINDOW_SLACK,
  FEASIBLE_GRID_FRACTION,
} from "../constants.js";

export interface EquilibriumResult extends StabilityResult {
  id: string;
  point: Record<string, number>;
  /** True when some state sits at a bound of the feasible region (e.g. a population at 0). */
  onBoundary: boolean;
  /** States that sit at a bound. */
  boundaryStates: string[];
  /** max_i |f_i(x*)| / (scale of f_i over the window), after polishing. */
  residual: number;
}

export interface EquilibriumOptions {
  /** Interior multistart grid is gridSize × gridSize. */
  gridSize: number;
  /** Samples per window edge for the one-dimensional boundary searches. */
  edgeSamples: number;
}

interface Workspace {
  f: Float64Array;
  j: Float64Array;
  y: Float64Array;
}

function scaledResidual(model: Model, x: ArrayLike<number>, fScale: number[], ws: Workspace): number {
  ws.y[0] = x[0];
  ws.y[1] = x[1];
  model.rhs(ws.y, ws.f);
  const r0 = Math.abs(ws.f[0]) / fScale[0];
  const r1 = Math.abs(ws.f[1]) / fScale[1];
  return Number.isFinite(r0) && Number.isFinite(r1) ? Math.max(r0, r1) : Infinity;
}

/** Damped Newton with backtracking on the scaled residual; returns the root or null. */
function dampedNewton(
  model: Model,
  start: [number, number],
  box: Box,
  fScale: number[],
  ws: Workspace,
): [number, number] | null {
  let x: [number, number] = [start[0], start[1]];
  let r = scaledResidual(model, x, fScale, ws);
  if (!Number.isFinite(r)) return null;
  let stalled = 0;
  for (let it = 0; it < NEWTON_MAX_ITERATIONS; it++) {
    ws.y[0] = x[0];
    ws.y[1] = x[1];
    model.rhs(ws.y, ws.f);
    model.jacobianAt(ws.y, ws.j);
    const [f0, f1] = [ws.f[0], ws.f[1]];
    const solved = solve2(ws.j[0], ws.j[1], ws.j[2], ws.j[3], f0, f1);
    if (!solved) return r < ROOT_RESIDUAL_TOL ? x : null;
    const dx0 = -solved[0];
    const dx1 = -solved[1];
    let lambda = 1;
    let accepted = false;
    while (lambda >= NEWTON_MIN_DAMPING) {
      const trial: [number, number] = [x[0] + lambda * dx0, x[1] + lambda * dx1];
      const rt = scaledResidual(model, trial, fScale, ws);
      if (
        rt < r * (1 - NEWTON_SUFFICIENT_DECREASE * lambda) ||
        (r < ROOT_RESIDUAL_TOL * POLISH_RESIDUAL_FRACTION && rt <= r)
      ) {
        x = trial;
        const improved = rt < r;
        r = rt;
        accepted = improved;
        break;
      }
      lambda /= 2;
    }
    for (let k = 0; k < 2; k++) {
      const lo = box.lo[k] - NEWTON_ROAM * box.width[k];
      const hi = box.hi[k] + NEWTON_ROAM * box.width[k];
      if (!(x[k] >= lo && x[k] <= hi)) return null;
    }
    const step = Math.max(Math.abs(dx0) / box.width[0], Math.abs(dx1) / box.width[1]);
    if (r < ROOT_RESIDUAL_TOL && (step < NEWTON_STEP_TOL || !accepted)) {
      // converged; keep polishing while it still helps, to reach full precision
      if (++stalled >= NEWTON_POLISH_STALLS) return x;
    } else if (!accepted) return r < ROOT_RESIDUAL_TOL ? x : null;
  }
  return r < ROOT_RESIDUAL_TOL ? x : null;
}

/** Roots of a sampled function of one variable: sign changes bisected, near-touching minima kept as starts. */
function rootsAlong(g: (t: number) => number, lo: number, hi: number, samples: number): number[] {
  const ts: number[] = [];
  const gs: number[] = [];
  for (let k = 0; k <= samples; k++) {
    const t = lo + ((hi - lo) * k) / samples;
    ts.push(t);
    gs.push(g(t));
  }
  const roots: number[] = [];
  for (let k = 0; k <= samples; k++) {
    if (gs[k] === 0) roots.push(ts[k]);
    if (k < samples && Number.isFinite(gs[k]) && Number.isFinite(gs[k + 1]) && gs[k] * gs[k + 1] < 0) {
      let ga = gs[k];
      const { lo, hi } = bisect(
        ts[k],
        ts[k + 1],
        (m) => {
          const gm = g(m);
          if (gm === 0) return "root";
          if (gm * ga < 0) return "lower";
          ga = gm;
          return "upper";
        },
        EDGE_BISECTION_MAX_ITERATIONS,
      );
      roots.push(0.5 * (lo + hi));
    }
    // a local minimum of |g| that nearly touches zero: a double root bisection cannot see
    if (
      k > 0 &&
      k < samples &&
      Math.abs(gs[k]) < Math.abs(gs[k - 1]) &&
      Math.abs(gs[k]) < Math.abs(gs[k + 1])
    )
      roots.push(ts[k]);
  }
  return roots;
}

function boundaryStarts(
  model: Model,
  box: Box,
  fScale: number[],
  options: EquilibriumOptions,
): [number, number][] {
  const starts: [number, number][] = [];
  const y = new Float64Array(2);
  const f = new Float64Array(2);
  const lines: { fixed: number; value: number }[] = [];
  for (let i = 0; i < 2; i++) {
    lines.push({ fixed: i, value: box.lo[i] }, { fixed: i, value: box.hi[i] });
    if (box.lo[i] < 0 && box.hi[i] > 0) lines.push({ fixed: i, value: 0 });
  }
  for (const { fixed, value } of lines) {
    const free = 1 - fixed;
    const at = (t: number) => {
      y[fixed] = value;
      y[free] = t;
      model.rhs(y, f);
    };
    for (const component of [0, 1]) {
      const g = (t: number) => {
        at(t);
        return f[component] / fScale[component];
      };
      for (const t of rootsAlong(g, box.lo[free], box.hi[free], options.edgeSamples)) {
        const p: [number, number] = [0, 0];
        p[fixed] = value;
        p[free] = t;
        starts.push(p);
      }
    }
  }
  return starts;
}

/** Snap coordinates that sit at a bound to the bound exactly, when the residual allows. */
function snapToBounds(
  model: Model,
  x: [number, number],
  box: Box,
  fScale: number[],
  ws: Workspace,
): [number, number] {
  const out: [number, number] = [x[0], x[1]];
  for (let k = 0; k < 2; k++) {
    for (const bound of [box.lo[k], box.hi[k], 0]) {
      if (Math.abs(out[k] - bound) <= SNAP_REL_TOL * box.width[k] && out[k] !== bound) {
        const trial: [number, number] = [out[0], out[1]];
        trial[k] = bound;
        if (
          scaledResidual(model, trial, fScale, ws) <=
          Math.max(scaledResidual(model, out, fScale, ws), ROOT_RESIDUAL_TOL * POLISH_RESIDUAL_FRACTION)
        )
          out[k] = bound;
      }
    }
    out[k] = Math.min(box.hi[k], Math.max(box.lo[k], out[k]));
  }
  return out;
}

/** The interior multistart grid (g × g cells, corners included) and its cell centres. */
function gridStarts(box: Box, g: number): [number, number][] {
  const starts: [number, number][] = [];
  for (let a = 0; a <= g; a++)
    for (let b = 0; b <= g; b++) {
      starts.push([box.lo[0] + (box.width[0] * a) / g, box.lo[1] + (box.width[1] * b) / g]);
    }
  // offset grid: cell centres, so symmetric models do not put every start on a nullcline
  for (let a = 0; a < g; a++)
    for (let b = 0; b < g; b++) {
      starts.push([box.lo[0] + (box.width[0] * (a + 0.5)) / g, box.lo[1] + (box.width[1] * (b + 0.5)) / g]);
    }
  return starts;
}

/**
 * Roots where the field or its Jacobian is singular (a factor of model.singularFactors vanishes
 * there, or the Jacobian is not finite) are no equilibria to classify: they leave the list, with
 * the evidence findSingularities reports (singularities.ts).
 */
function splitSingular<T extends { x: [number, number] }>(
  model: Model,
  box: Box,
  found: T[],
): { regular: T[]; singular: SingularPoint[] } {
  const j = new Float64Array(4);
  let ctx: SingularContext | null = null;
  const regular: T[] = [];
  const singular: SingularPoint[] = [];
  for (const e of found) {
    model.jacobianAt(e.x, j);
    const suspect = !Array.from(j).every(Number.isFinite) || model.singularFactors.length > 0;
    ctx = suspect ? (ctx ?? singularContext(model, box)) : ctx;
    const evidence =
      ctx && (groupsAt(ctx, e.x).length || !Array.from(j).every(Number.isFinite))
        ? singularPointAt(ctx, locateSingularPoint(ctx, e.x), true)
        : null;
    if (evidence) singular.push(evidence);
    else regular.push(e);
  }
  return { regular, singular };
}

/** Equilibria (as findEquilibria returns them) and the roots that were singular points, with their evidence. */
export interface EquilibriumCandidates {
  equilibria: EquilibriumResult[];
  singular: SingularPoint[];
  /** Curves and regions of equilibria (equilibrium-sets.ts), left out of `equilibria`. */
  sets: EquilibriumSetResult[];
}

/** Every equilibrium in the window, and no singular point: see findEquilibriumCandidates. */
export function findEquilibria(
  model: Model,
  options: EquilibriumOptions = DEFAULT_EQUILIBRIUM_OPTIONS,
  diagnostics: Diagnostic[] = [],
): EquilibriumResult[] {
  return findEquilibriumCandidates(model, options, diagnostics).equilibria;
}

/**
 * The boxes the equilibrium search covers: the window, and the feasible region (the states'
 * min/max) where it reaches beyond the window. Trajectories are followed in the feasible region,
 * so an attractor outside the drawing window must be known too.
 */
const insideBox = (b: Box, p: readonly number[]) =>
  p[0] >= b.lo[0] && p[0] <= b.hi[0] && p[1] >= b.lo[1] && p[1] <= b.hi[1];

function searchBoxes(model: Model): Box[] {
  const window = windowOf(model),
    bounds = boundsOf(model);
  const beyond = [0, 1].some((k) => bounds.lo[k] < window.lo[k] || bounds.hi[k] > window.hi[k]);
  return beyond ? [window, bounds] : [window];
}

type Root = { x: [number, number]; residual: number };

/** Damped Newton from every start of each search box, roots deduplicated in window-scaled coordinates. */
function collectRoots(model: Model, box: Box, options: EquilibriumOptions, ws: Workspace): Root[] {
  const found: Root[] = [];
  for (const [pass, search] of searchBoxes(model).entries()) {
    const fScale = componentScales(model, search);
    const beyond = pass > 0;
    const grid = beyond ? Math.ceil(options.gridSize * FEASIBLE_GRID_FRACTION) : options.gridSize;
    const all = [...gridStarts(search, grid), ...boundaryStarts(model, search, fScale, options)];
    // the window has had its own, finer search: the second pass starts only beyond it
    const starts = beyond ? all.filter((p) => !insideBox(box, p)) : all;
    for (const start of starts) {
      const root = dampedNewton(model, start, search, fScale, ws);
      if (!root) continue;
      const inside = [0, 1].every(
        (k) =>
          root[k] >= search.lo[k] - WINDOW_SLACK * search.width[k] &&
          root[k] <= search.hi[k] + WINDOW_SLACK * search.width[k],
      );
      if (!inside) continue;
      const x = snapToBounds(model, root, search, fScale, ws);
      const residual = scaledResidual(model, x, fScale, ws);
      if (!(residual < ROOT_RESIDUAL_TOL)) continue;
      const same = found.find(
        (e) =>
          Math.abs(e.x[0] - x[0]) <= DEDUP_REL_TOL * box.width[0] &&
          Math.abs(e.x[1] - x[1]) <= DEDUP_REL_TOL * box.width[1],
      );
      if (same) {
        if (residual < same.residual) {
          same.x = x;
          same.residual = residual;
        }
        continue;
      }
      found.push({ x, residual });
    }
  }
  return found;
}

/**
 * Every equilibrium in the window and in the feasible region beyond it: damped Newton from a
 * deterministic multistart set (interior grid, corners, points on each edge and axis, and the
 * roots of each component along each edge), deduplicated in window-scaled coordinates, polished,
 * snapped to bounds.
 * Sorted by the first state ascending, then the second (each compared to DEDUP_REL_TOL of the
 * window), and numbered E1, E2, ... in that order.
 */
export function findEquilibriumCandidates(
  model: Model,
  options: EquilibriumOptions = DEFAULT_EQUILIBRIUM_OPTIONS,
  diagnostics: Diagnostic[] = [],
): EquilibriumCandidates {
  const box = windowOf(model);
  const ws: Workspace = { f: new Float64Array(2), j: new Float64Array(4), y: new Float64Array(2) };
  const found = collectRoots(model, box, options, ws);

  const { regular, singular } = splitSingular(model, box, found);
  found.length = 0;
  found.push(...regular);
  found.sort((p, q) => {
    for (let k = 0; k < 2; k++) {
      const diff = p.x[k] - q.x[k];
      if (Math.abs(diff) > DEDUP_REL_TOL * box.width[k]) return diff;
    }
    return 0;
  });
  // roots on a curve or region of equilibria are one object, not as many equilibria
  const { isolated, sets } = groupEquilibriumSets(model, found, box, options.gridSize);
  found.length = 0;
  found.push(...isolated);
  for (const set of sets)
    diagnostics.push({
      severity: "warning",
      stage: "equilibria",
      code: "equilibrium-set",
      data: { set: set.id, kind: set.kind },
    });
  if (found.length > MAX_EQUILIBRIA) {
    diagnostics.push({
      severity: "warning",
      stage: "equilibria",
      code: "too-many-equilibria",
      data: { max: MAX_EQUILIBRIA },
    });
    found.length = MAX_EQUILIBRIA;
  }

  const states = model.spec.states;
  const equilibria = found.map((e, k): EquilibriumResult => {
    ws.y[0] = e.x[0];
    ws.y[1] = e.x[1];
    model.jacobianAt(ws.y, ws.j);
    const jacobian = [
      [ws.j[0], ws.j[1]],
      [ws.j[2], ws.j[3]],
    ];
    const boundaryStates = states.filter((s, i) => e.x[i] === s.min || e.x[i] === s.max).map((s) => s.name);
    return {
      id: `E${k + 1}`,
      point: Object.fromEntries(model.stateNames.map((n, i) => [n, e.x[i] + 0])),
      onBoundary: boundaryStates.length > 0,
      boundaryStates,
      residual: e.residual,
      // star against degenerate node is read in window units, so it does not depend on the spec's units
      ...classifyEquilibrium(jacobian, box.width),
    };
  });
  return { equilibria, singular, sets };
}

import { bisect } from "../../numeric/roots.js";
import {
  SINGULAR_BISECTION_MAX_ITERATIONS,
  SINGULAR_GRID_INTERVALS,
  SINGULAR_JACOBIAN_SPREAD_TOL,
  SINGULAR_LINE_SAMPLES,
  SINGULAR_SIDE_OFFSET,
  SINGULAR_ZERO_TOL,
} from "../../constants.js";
import {
  factorAt,
  factorEvidence,
  jacobianRows,
  type FactorGroup,
  type SingularContext,
  type SingularPoint,
} from "./points.js";
import type { SingularityReason } from "./types.js";

/** One factor's zero set on the sampling grid: nodes where it is zero, and sign changes along grid edges. */
interface ZeroGrid {
  xs: number[];
  ys: number[];
  /** Sign of g at node (a, b), index a·ny + b: −1, 0 (zero), +1, or NaN where g is not finite. */
  sign: number[];
}

/** Grid coordinates along one state: uniform, with 0 added where the window spans it (axes are often special). */
function coordinates(lo: number, width: number): number[] {
  const n = SINGULAR_GRID_INTERVALS;
  const xs = Array.from({ length: n + 1 }, (_, k) => lo + (width * k) / n);
  if (lo < 0 && lo + width > 0 && !xs.includes(0)) xs.push(0);
  return xs.sort((a, b) => a - b);
}

function sampleZeroGrid(ctx: SingularContext, group: FactorGroup): ZeroGrid {
  const xs = coordinates(ctx.box.lo[0], ctx.box.width[0]);
  const ys = coordinates(ctx.box.lo[1], ctx.box.width[1]);
  const values: number[] = [];
  for (const x of xs) for (const y of ys) values.push(factorAt(ctx, group.factors[0], [x, y])[0]);
  let scale = 0;
  for (const v of values) if (Number.isFinite(v)) scale = Math.max(scale, Math.abs(v));
  const sign = values.map((v) =>
    !Number.isFinite(v) ? NaN : Math.abs(v) <= SINGULAR_ZERO_TOL * scale ? 0 : Math.sign(v),
  );
  return { xs, ys, sign };
}

/** A zero node is isolated when every finite neighbour has one strict sign: g has an extremum 0 there. */
function isolated(grid: ZeroGrid, a: number, b: number): boolean {
  const ny = grid.ys.length;
  const signs: number[] = [];
  for (let da = -1; da <= 1; da++)
    for (let db = -1; db <= 1; db++) {
      const [i, k] = [a + da, b + db];
      if ((da || db) && i >= 0 && k >= 0 && i < grid.xs.length && k < ny) signs.push(grid.sign[i * ny + k]);
    }
  const finite = signs.filter((s) => !Number.isNaN(s));
  return finite.length > 0 && (finite.every((s) => s > 0) || finite.every((s) => s < 0));
}

interface Crossing {
  /** Start node and the neighbour along state `axis`. */
  a: number;
  b: number;
  axis: 0 | 1;
}

interface LineComponent {
  crossings: Crossing[];
  /** Grid nodes on the line where the factor is zero. */
  zeros: [number, number][];
  signChange: boolean;
}

/** Cells (lower-left node a, b) a zero curve passes through, 8-connected into components, in grid order. */
function lineComponents(grid: ZeroGrid): LineComponent[] {
  const [nx, ny] = [grid.xs.length, grid.ys.length];
  const s = (a: number, b: number) => grid.sign[a * ny + b];
  const crosses = (a: number, b: number, axis: 0 | 1) => {
    const [u, v] = [s(a, b), axis === 0 ? s(a + 1, b) : s(a, b + 1)];
    return u * v < 0;
  };
  const onLine = (a: number, b: number) => s(a, b) === 0 && !isolated(grid, a, b);
  const lineCell = (a: number, b: number) =>
    crosses(a, b, 0) ||
    crosses(a, b, 1) ||
    crosses(a, b + 1, 0) ||
    crosses(a + 1, b, 1) ||
    [
      [a, b],
      [a + 1, b],
      [a, b + 1],
      [a + 1, b + 1],
    ].some(([i, k]) => onLine(i, k));
  const seen = new Set<number>();
  const components: LineComponent[] = [];
  for (let a = 0; a < nx - 1; a++)
    for (let b = 0; b < ny - 1; b++) {
      if (seen.has(a * ny + b) || !lineCell(a, b)) continue;
      const cells: [number, number][] = [];
      const queue: [number, number][] = [[a, b]];
      seen.add(a * ny + b);
      while (queue.length) {
        const [i, k] = queue.shift()!;
        cells.push([i, k]);
        for (let di = -1; di <= 1; di++)
          for (let dk = -1; dk <= 1; dk++) {
            const [p, q] = [i + di, k + dk];
            if (p < 0 || q < 0 || p >= nx - 1 || q >= ny - 1 || seen.has(p * ny + q) || !lineCell(p, q))
              continue;
            seen.add(p * ny + q);
            queue.push([p, q]);
          }
      }
      cells.sort((u, v) => u[0] - v[0] || u[1] - v[1]);
      const crossings = new Map<string, Crossing>();
      const zeros = new Map<string, [number, number]>();
      for (const [i, k] of cells) {
        for (const c of [
          { a: i, b: k, axis: 0 as const },
          { a: i, b: k, axis: 1 as const },
          { a: i, b: k + 1, axis: 0 as const },
          { a: i + 1, b: k, axis: 1 as const },
        ])
          if (crosses(c.a, c.b, c.axis)) crossings.set(`${c.a},${c.b},${c.axis}`, c);
        for (const [p, q] of [
          [i, k],
          [i + 1, k],
          [i, k + 1],
          [i + 1, k + 1],
        ])
          if (onLine(p, q)) zeros.set(`${p},${q}`, [p, q]);
      }
      // the factor takes both signs beside the line (through a node where it is zero, no edge shows it)
      const corners = cells.flatMap(([i, k]) => [s(i, k), s(i + 1, k), s(i, k + 1), s(i + 1, k + 1)]);
      const signChange = corners.includes(1) && corners.includes(-1);
      components.push({ crossings: [...crossings.values()], zeros: [...zeros.values()], signChange });
    }
  return components;
}

/** The point on a grid edge where g changes sign, by bisection. */
function crossingPoint(
  ctx: SingularContext,
  group: FactorGroup,
  grid: ZeroGrid,
  c: Crossing,
): [number, number] {
  const start: [number, number] = [grid.xs[c.a], grid.ys[c.b]];
  const end = c.axis === 0 ? grid.xs[c.a + 1] : grid.ys[c.b + 1];
  const at = (t: number): [number, number] => (c.axis === 0 ? [t, start[1]] : [start[0], t]);
  const g = (t: number) => factorAt(ctx, group.factors[0], at(t))[0];
  const ga = g(start[c.axis]);
  const { lo, hi } = bisect(
    start[c.axis],
    end,
    (m) => {
      const gm = g(m);
      return gm === 0 ? "root" : gm * ga < 0 ? "lower" : "upper";
    },
    SINGULAR_BISECTION_MAX_ITERATIONS,
  );
  return at(0.5 * (lo + hi));
}

/** Does the Jacobian jump across the zero set of g at p (read SINGULAR_SIDE_OFFSET to either side, along ∇g)? */
function jacobianJumps(ctx: SingularContext, group: FactorGroup, p: [number, number]): boolean {
  const { model, box } = ctx;
  const [, g0, g1] = factorAt(ctx, group.factors[0], p);
  const n = [g0 * box.width[0], g1 * box.width[1]];
  const norm = Math.hypot(n[0], n[1]);
  if (!(norm > 0)) return false;
  const side = (s: number) => {
    const j = new Float64Array(4);
    model.jacobianAt(
      [0, 1].map((i) => p[i] + (s * SINGULAR_SIDE_OFFSET * n[i] * box.width[i]) / norm),
      j,
    );
    return [j[0], (j[1] * box.width[1]) / box.width[0], (j[2] * box.width[0]) / box.width[1], j[3]];
  };
  const [a, b] = [side(1), side(-1)];
  const size = Math.max(...[...a, ...b].map(Math.abs));
  return Math.max(...a.map((v, e) => Math.abs(v - b[e]))) > SINGULAR_JACOBIAN_SPREAD_TOL * size;
}

/** Why a line is singular, from its factors' roles and the samples on it; null where it is not. */
function lineReason(
  ctx: SingularContext,
  group: FactorGroup,
  samples: [number, number][],
  signChange: boolean,
): SingularityReason | null {
  const roles = new Set(group.factors.map((f) => f.role));
  if (roles.has("denominator")) {
    // 0/0 all along the line when every numerator over it vanishes at every sample
    const zeroOver = group.factors
      .filter((f) => f.role === "denominator")
      .every((f) =>
        samples.every((p) => Math.abs(factorAt(ctx, f, p)[3]) <= SINGULAR_ZERO_TOL * numeratorScale(ctx, f)),
      );
    return zeroOver ? "indeterminate" : "unbounded";
  }
  if (roles.has("log-argument")) return "unbounded";
  if (roles.has("root-argument") || roles.has("power-base")) {
    if (signChange) return "undefined-beyond";
    const k = group.factors.find((f) => f.role === "power-base")?.exponent ?? null;
    if (roles.has("root-argument") || k === null || k < 1)
      return k !== null && k < 0 ? "unbounded" : "not-differentiable";
    return null;
  }
  return null;
}

function numeratorScale(ctx: SingularContext, factor: FactorGroup["factors"][number]): number {
  let scale = 0;
  const n = 8;
  for (let a = 0; a <= n; a++)
    for (let b = 0; b <= n; b++) {
      const v = factorAt(ctx, factor, [
        ctx.box.lo[0] + (ctx.box.width[0] * a) / n,
        ctx.box.lo[1] + (ctx.box.width[1] * b) / n,
      ])[3];
      if (Number.isFinite(v)) scale = Math.max(scale, Math.abs(v));
    }
  return scale > 0 ? scale : 1;
}

/** Evenly spaced picks, first and last kept. */
function thin<T>(items: T[], max: number): T[] {
  if (items.length <= max) return items;
  return Array.from({ length: max }, (_, k) => items[Math.round((k * (items.length - 1)) / (max - 1))]);
}

function lineRecord(
  ctx: SingularContext,
  group: FactorGroup,
  samples: [number, number][],
  reason: SingularityReason,
): SingularPoint {
  const { model } = ctx;
  const listed = thin(samples, SINGULAR_LINE_SAMPLES);
  const f = new Float64Array(2);
  const j = new Float64Array(4);
  model.rhs(listed[0], f);
  model.jacobianAt(listed[0], j);
  const record = (p: number[]) => Object.fromEntries(model.stateNames.map((n, i) => [n, p[i] + 0]));
  const range = (i: number) => [
    Math.min(...samples.map((p) => p[i])) + 0,
    Math.max(...samples.map((p) => p[i])) + 0,
  ];
  return {
    point: record(listed[0]),
    reason,
    shape: "line",
    factors: [factorEvidence(model, group)],
    field: Object.fromEntries(model.stateNames.map((n, i) => [n, f[i] + 0])),
    jacobian: jacobianRows(j),
    fromEquilibriumSearch: false,
    rays: [],
    fieldLimit: null,
    jacobianLimit: null,
    extent: Object.fromEntries(model.stateNames.map((n, i) => [n, range(i)])) as Record<
      string,
      [number, number]
    >,
    samples: listed.map(record),
  };
}

/**
 * Singular lines of every factor group (where a denominator vanishes along a curve, a kink runs,
 * a root or log argument changes sign) and the grid nodes where a factor has an isolated zero
 * (candidate singular points, examined by the caller).
 */
export function findSingularLines(ctx: SingularContext): {
  lines: SingularPoint[];
  points: [number, number][];
} {
  const lines: SingularPoint[] = [];
  const points: [number, number][] = [];
  for (const group of ctx.groups) {
    const grid = sampleZeroGrid(ctx, group);
    const ny = grid.ys.length;
    grid.sign.forEach((s, k) => {
      const [a, b] = [Math.floor(k / ny), k % ny];
      if (s === 0 && isolated(grid, a, b)) points.push([grid.xs[a], grid.ys[b]]);
    });
    for (const component of lineComponents(grid)) {
      const onGrid: [number, number][] = [
        ...component.crossings.map((c) => ({ key: [c.a, c.b], p: crossingPoint(ctx, group, grid, c) })),
        ...component.zeros.map(([a, b]) => ({
          key: [a, b],
          p: [grid.xs[a], grid.ys[b]] as [number, number],
        })),
      ]
        .sort((u, v) => u.key[0] - v.key[0] || u.key[1] - v.key[1] || u.p[0] - v.p[0] || u.p[1] - v.p[1])
        .map((u) => u.p);
      const kink = group.factors.every((f) => f.role === "kink");
      const samples = kink ? onGrid.filter((p) => jacobianJumps(ctx, group, p)) : onGrid;
      if (!samples.length) continue;
      const reason = kink ? "not-differentiable" : lineReason(ctx, group, samples, component.signChange);
      if (!reason) continue;
      lines.push(lineRecord(ctx, group, samples, reason));
    }
  }
  return { lines, points };
}

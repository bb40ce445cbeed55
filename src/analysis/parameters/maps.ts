import { solve, Matrix } from "ml-matrix";
import type { Model } from "../../model/types.js";
import { withParameters } from "../../model/higher.js";
import { classifyOutcome } from "./outcomes.js";
import type { ParameterStudyResult } from "./study.js";

/**
 * Two-parameter outcome maps: a grid over both ranges labelled by outcome (the set of
 * attractors), with the threshold curves traced from the thresholds located in the
 * one-parameter studies, by natural-parameter continuation of the defining system
 * (equilibrium plus test function) in the second parameter.
 */
export interface OutcomeMapResult {
  parameters: [string, string];
  ranges: [[number, number], [number, number]];
  nominal: [number, number];
  nx: number;
  ny: number;
  /** Outcome phrases; cells index into it. */
  legend: string[];
  /** Row-major from the lowest value of the second parameter. */
  cells: number[];
  curves: { kind: string; origin: string; points: [number, number][] }[];
}

/** Grid points per parameter axis: enough to show the shape of each outcome region at a few seconds' cost. */
export const MAP_RESOLUTION = 24;
/** Steps of the curve tracer across the second parameter's range, each way from the start. */
const CURVE_STEPS = 60;
const NEWTON_ITERATIONS = 25;
/** Newton on the defining system converges when the scaled step is below this. */
const CURVE_STEP_TOL = 1e-12;
/** Relative finite-difference step for derivatives of the test function. */
const FD_STEP = 1e-7;

function outcomeGrid(model: Model, pair: [string, string], ranges: [[number, number], [number, number]], n: number) {
  const [i, j] = pair.map((name) => model.parameterNames.indexOf(name));
  const legend: string[] = [];
  const cells: number[] = [];
  for (let b = 0; b < n; b++) {
    for (let a = 0; a < n; a++) {
      const p = Float64Array.from(model.parameterValues);
      p[i] = ranges[0][0] + ((ranges[0][1] - ranges[0][0]) * (a + 0.5)) / n;
      p[j] = ranges[1][0] + ((ranges[1][1] - ranges[1][0]) * (b + 0.5)) / n;
      const words = classifyOutcome(withParameters(model, p), false).words;
      let k = legend.indexOf(words);
      if (k < 0) { k = legend.length; legend.push(words); }
      cells.push(k);
    }
  }
  return { legend, cells };
}

type Residual = (u: Float64Array, q: number) => Float64Array | null;

function newton(residual: Residual, u0: Float64Array, q: number, scale: Float64Array): Float64Array | null {
  const u = Float64Array.from(u0);
  for (let it = 0; it < NEWTON_ITERATIONS; it++) {
    const r = residual(u, q);
    if (!r || r.some((v) => !Number.isFinite(v))) return null;
    const n = u.length;
    const jac = new Matrix(n, n);
    for (let c = 0; c < n; c++) {
      const h = FD_STEP * scale[c];
      const up = Float64Array.from(u); up[c] += h;
      const rp = residual(up, q);
      if (!rp) return null;
      for (let row = 0; row < n; row++) jac.set(row, c, (rp[row] - r[row]) / h);
    }
    let step: Matrix;
    try { step = solve(jac, Matrix.columnVector(Array.from(r, (v) => -v))); } catch { return null; }
    let size = 0;
    for (let c = 0; c < n; c++) { u[c] += step.get(c, 0); size = Math.max(size, Math.abs(step.get(c, 0)) / scale[c]); }
    if (!(size < Infinity)) return null;
    if (size < CURVE_STEP_TOL) return u;
  }
  return null;
}

/** Traces one threshold curve through (p1*, p2 nominal) across p2's range. */
function traceCurve(model: Model, pair: [number, number], ranges: [[number, number], [number, number]], start: { value: number; point: Record<string, number>; kind: string; bound: { state: string; value: number } | null }): [number, number][] {
  const [i, j] = pair;
  const names = model.stateNames;
  const f = new Float64Array(2);
  const jac = new Float64Array(4);
  const p = Float64Array.from(model.parameterValues);
  const widths = names.map((n) => model.spec.window[n][1] - model.spec.window[n][0]);
  const rhs = (x: ArrayLike<number>) => { model.rhsParametric(x, p, f); return f; };
  const jacobian = (x: ArrayLike<number>) => { model.jacobianParametric(x, p, jac); return jac; };
  let residual: Residual;
  let u0: Float64Array;
  let scale: Float64Array;
  const p1Scale = ranges[0][1] - ranges[0][0];
  if (start.bound) {
    // on a bound (a population absent): the resident's equilibrium and the absent one's growth rate
    const k = names.indexOf(start.bound.state), other = 1 - k;
    residual = (u, q) => {
      p[i] = u[1]; p[j] = q;
      const x = [0, 0]; x[k] = start.bound!.value; x[other] = u[0];
      const fx = rhs(x)[other];
      const onAxis = Math.abs(rhs(x)[k]) <= 1e-12 * Math.abs(fx) + 1e-300;
      const test = onAxis ? jacobian(x)[k * 2 + k] : rhs(x)[k];
      return Float64Array.from([fx / widths[other], test]);
    };
    u0 = Float64Array.from([start.point[names[other]], start.value]);
    scale = Float64Array.from([widths[other], p1Scale]);
  } else {
    residual = (u, q) => {
      p[i] = u[2]; p[j] = q;
      const r = rhs([u[0], u[1]]);
      const r0 = r[0] / widths[0], r1 = r[1] / widths[1];
      const J = jacobian([u[0], u[1]]);
      const test = start.kind === "hopf" ? J[0] + J[3] : J[0] * J[3] - J[1] * J[2];
      return Float64Array.from([r0, r1, test]);
    };
    u0 = Float64Array.from([start.point[names[0]], start.point[names[1]], start.value]);
    scale = Float64Array.from([widths[0], widths[1], p1Scale]);
  }
  const p1Of = (u: Float64Array) => u[u.length - 1];
  const q0 = model.parameterValues[j];
  const [qlo, qhi] = ranges[1];
  const pieces: [number, number][][] = [];
  for (const direction of [-1, 1]) {
    const piece: [number, number][] = [];
    let prev: Float64Array | null = null;
    let cur: Float64Array | null = Float64Array.from(u0);
    let q = q0;
    for (let s = 0; s <= CURVE_STEPS && cur; s++) {
      // linear predictor: the steps in the second parameter are even
      const guess: Float64Array = prev ? cur.map((v, c) => 2 * v - prev![c]) : cur;
      const solved = newton(residual, s === 0 ? cur : guess, q, scale);
      if (!solved) break;
      const p1 = p1Of(solved);
      if (p1 < ranges[0][0] - 0.05 * p1Scale || p1 > ranges[0][1] + 0.05 * p1Scale) break;
      piece.push([p1, q]);
      prev = cur; cur = solved;
      q = q0 + (direction * (s + 1) * (direction < 0 ? q0 - qlo : qhi - q0)) / CURVE_STEPS;
    }
    pieces.push(direction < 0 ? piece.reverse() : piece);
  }
  const [down, up] = pieces;
  return [...down, ...up.slice(down.length ? 1 : 0)];
}

export function buildOutcomeMap(model: Model, pair: [string, string], studies: ParameterStudyResult[]): OutcomeMapResult {
  const idx = pair.map((n) => model.parameterNames.indexOf(n)) as [number, number];
  const spec = model.spec.parameters;
  const ranges = [spec[idx[0]].range!, spec[idx[1]].range!] as [[number, number], [number, number]];
  const { legend, cells } = outcomeGrid(model, pair, ranges, MAP_RESOLUTION);
  const curves: OutcomeMapResult["curves"] = [];
  for (const [which, study] of [[0, studies.find((s) => s.parameter === pair[0])], [1, studies.find((s) => s.parameter === pair[1])]] as const) {
    if (!study) continue;
    for (const t of study.thresholds.filter((q) => q.decisive && q.kind !== "boundary-crossing" || q.decisive && q.bound)) {
      // trace in the other parameter; a threshold of the second parameter is traced with the roles swapped
      const order: [number, number] = which === 0 ? [idx[0], idx[1]] : [idx[1], idx[0]];
      const orderRanges: [[number, number], [number, number]] = which === 0 ? ranges : [ranges[1], ranges[0]];
      const points = traceCurve(model, order, orderRanges, t);
      curves.push({ kind: t.kind, origin: `${study.parameter} = ${t.value}`, points: which === 0 ? points : points.map(([a, b]) => [b, a]) });
    }
  }
  return {
    parameters: pair,
    ranges,
    nominal: [model.parameterValues[idx[0]], model.parameterValues[idx[1]]],
    nx: MAP_RESOLUTION,
    ny: MAP_RESOLUTION,
    legend,
    cells,
    curves,
  };
}

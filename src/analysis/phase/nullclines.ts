import type { Model } from "../../model/types.js";
import type { Diagnostic } from "../../diagnostics/issue.js";
import type { EquilibriumResult } from "./equilibria.js";
import {
  DEFAULT_NULLCLINE_OPTIONS,
  EQUILIBRIUM_ON_CURVE_CELLS,
  NULLCLINE_RESIDUAL_TOL,
} from "../constants.js";
import { windowOf, type Box } from "../numeric/window.js";
import { canonical, compareCurves, type Curve, type Point } from "./nullclines/geometry.js";
import {
  deflate,
  evaluator,
  lineCurves,
  projectOnto,
  vanishingLines,
  type Deflated,
  type Evaluator,
} from "./nullclines/evaluate.js";
import { contourCurves } from "./nullclines/contour.js";
import { locateSignChange, splitAtEquilibria, splitByDirection, type Sign } from "./nullclines/split.js";

/**
 * Nullclines: for each state i, the curves f_i = 0 inside the window, as ordered polylines cut
 * into pieces at equilibria, each piece labelled with the direction of the other component.
 *
 * Method: (1) sample f_i on a grid of nodes; (2) find lines x_k = c (window edges, the axis
 * x_k = 0) on which f_i vanishes identically: they become exact straight curves, and f_i is
 * divided by them ("deflated") so the rest of the zero set changes sign and marching squares sees
 * it right up to those lines; (3) marching squares (d3-contour, unsmoothed) stitches grid-edge
 * crossings into rings; (4) each crossing is bracketed along its grid edge to adjacent doubles,
 * so every vertex lies on the exact curve; (5) rings are cut where they run along the window
 * border or around holes (non-finite samples); (6) curves are split at equilibria, then
 * wherever the other component changes sign.
 */
export interface NullclineOptions {
  /** Grid nodes across the window in the first state, both edges included. Default 161. */
  nx: number;
  /** Grid nodes across the window in the second state, both edges included. Default 161. */
  ny: number;
}

export type NullclineEnd =
  | { kind: "equilibrium"; id: string }
  /** The piece runs out of the window through the side where `state` is at its window bound. */
  | { kind: "window-edge"; state: string; bound: "min" | "max" }
  /** The model is non-finite beyond this end. */
  | { kind: "hole" }
  /** Neither: the other component changes sign here without a listed equilibrium, or bracketing failed (a pole). */
  | { kind: "interior" }
  /** The piece is a closed curve; its last point repeats its first. */
  | { kind: "loop" };

/** The line where state `state` equals `value`. */
export interface AxisLine {
  state: string;
  value: number;
}

export interface NullclinePiece {
  /** Index of the curve (connected curve before splitting) this piece belongs to. */
  curve: number;
  /** Vertices [first state, second state], ordered along the curve. */
  points: [number, number][];
  otherState: string;
  /** Sign of the other state's derivative along the piece (constant: pieces are split where it changes). */
  otherDirection: "increasing" | "decreasing" | "zero";
  /** True when the piece lies on a straight line where f_i vanishes identically (an axis or a window edge). */
  onAxis: boolean;
  axis: AxisLine | null;
  ends: [NullclineEnd, NullclineEnd];
}

export interface NullclineResult {
  /** The state whose derivative vanishes on these pieces. */
  state: string;
  /** max |f_i| over the grid: the scale residuals are measured against. */
  scale: number;
  /** max |f_i| / scale over every vertex. */
  maxResidual: number;
  /** Lines where f_i vanishes identically. */
  lines: AxisLine[];
  /**
   * Curves ordered by their first point, then second (first state, then second); an open curve
   * starts at its lexicographically smaller end, a closed one runs counter-clockwise from its
   * smallest vertex (or its first equilibrium). Pieces follow their curve in that order.
   */
  pieces: NullclinePiece[];
}

/** The grid samples of both components, shared by the two nullclines. */
interface Sampling {
  box: Box;
  names: string[];
  nx: number;
  ny: number;
  axes: number[][];
  samples: number[][];
  /** max |f_i| over the grid, per component. */
  scales: number[];
  equilibria: { id: string; p: Point }[];
  /** Farthest an equilibrium may lie from a curve and still sit on it (window-scaled). */
  reach: number;
  ev: Evaluator;
}

function sampleGrid(model: Model, equilibria: EquilibriumResult[], options: NullclineOptions): Sampling {
  const box = windowOf(model);
  const names = model.stateNames;
  const { nx, ny } = options;
  if (!(Number.isInteger(nx) && Number.isInteger(ny) && nx >= 3 && ny >= 3))
    throw new Error(`invalid nullcline grid ${nx} × ${ny}`);
  const ev = evaluator(model);
  const axes = [nx, ny].map((n, k) =>
    Array.from({ length: n }, (_, a) => (a === n - 1 ? box.hi[k] : box.lo[k] + (box.width[k] * a) / (n - 1))),
  );
  const samples: number[][] = [new Array(nx * ny), new Array(nx * ny)];
  for (let b = 0; b < ny; b++)
    for (let a = 0; a < nx; a++) {
      const [f0, f1] = ev.both([axes[0][a], axes[1][b]]);
      samples[0][b * nx + a] = f0;
      samples[1][b * nx + a] = f1;
    }
  const scales = samples.map((s) =>
    s.reduce((m, v) => (Number.isFinite(v) ? Math.max(m, Math.abs(v)) : m), 0),
  );
  const points = equilibria.map((e) => ({ id: e.id, p: [e.point[names[0]], e.point[names[1]]] as Point }));
  const reach = EQUILIBRIUM_ON_CURVE_CELLS * Math.hypot(1 / (nx - 1), 1 / (ny - 1));
  return { box, names, nx, ny, axes, samples, scales, equilibria: points, reach, ev };
}

/**
 * Every curve of every nullcline in the window (see the module comment for the method and
 * NullclineResult.pieces for the ordering). `equilibria` supplies the break points.
 */
export function findNullclines(
  model: Model,
  equilibria: EquilibriumResult[],
  options: NullclineOptions = DEFAULT_NULLCLINE_OPTIONS,
  diagnostics: Diagnostic[] = [],
): NullclineResult[] {
  const sampling = sampleGrid(model, equilibria, options);
  return [0, 1].map((i) => nullclineOf(sampling, i, diagnostics));
}

/** The i-nullcline: vanishing lines, the deflated zero set by marching squares, then its pieces. */
function nullclineOf(s: Sampling, i: number, diagnostics: Diagnostic[]): NullclineResult {
  const { box, names, nx, ny, axes, ev } = s;
  const scale = s.scales[i];
  if (!(scale > 0)) {
    diagnostics.push({
      severity: "warning",
      stage: "nullclines",
      code: "nullcline-absent",
      data: { state: names[i] },
    });
    return { state: names[i], scale, maxResidual: 0, lines: [], pieces: [] };
  }
  const lines = vanishingLines(ev, box, i, scale, axes);
  const h = deflate(ev, box, i, lines);
  const values = lines.length
    ? s.samples[i].map((v, n) =>
        Number.isFinite(v) ? h.value([axes[0][n % nx], axes[1][Math.floor(n / nx)]]) : NaN,
      )
    : s.samples[i];
  const contoured = contourCurves(h, ev, i, scale, { nx, ny, axes, values }, names);
  if (contoured.failed > 0) {
    diagnostics.push({
      severity: "info",
      stage: "nullclines",
      code: "nullcline-non-zeros-omitted",
      data: { state: names[i], count: contoured.failed },
    });
  }
  const curves = [...lines.flatMap((l) => lineCurves(ev, i, l, axes, names)), ...contoured.curves]
    .map(canonical)
    .sort(compareCurves);
  const pieces = piecesOf(s, i, curves, h, diagnostics);
  const maxResidual = pieces.reduce(
    (m, piece) => piece.points.reduce((mm, p) => Math.max(mm, Math.abs(ev.f(p, i)) / scale), m),
    0,
  );
  return {
    state: names[i],
    scale,
    maxResidual,
    lines: lines.map((l) => ({ state: names[l.index], value: l.value })),
    pieces,
  };
}

/** Curves cut at equilibria, then where the other component changes sign; each part labelled with its direction. */
function piecesOf(
  s: Sampling,
  i: number,
  curves: Curve[],
  h: Deflated,
  diagnostics: Diagnostic[],
): NullclinePiece[] {
  const { box, names, ev } = s;
  const j = 1 - i;
  const scale = s.scales[i];
  const attached = new Set<string>();
  const locateOnLine = (a: Point, b: Point, sa: Sign) => locateSignChange(a, b, sa, (p) => p, ev, j);
  const locateOnCurve = (a: Point, b: Point, sa: Sign) =>
    locateSignChange(
      a,
      b,
      sa,
      (p) => projectOnto(h, box, p),
      ev,
      j,
      (p) => Math.abs(ev.f(p, i)) <= NULLCLINE_RESIDUAL_TOL * scale,
    );
  const onSignChange = (p: Point, kind: "zero" | "jump") => {
    const data = { rate: names[j], nullcline: names[i], point: [...p] };
    diagnostics.push(
      kind === "zero"
        ? {
            severity: "warning",
            stage: "nullclines",
            code: "sign-change-off-equilibrium",
            data,
          }
        : {
            severity: "info",
            stage: "nullclines",
            code: "sign-jump-on-nullcline",
            data,
          },
    );
  };
  const pieces: NullclinePiece[] = [];
  curves.forEach((curve, index) => {
    const axis = curve.line ? { state: names[curve.line.index], value: curve.line.value } : null;
    for (const piece of splitAtEquilibria(curve, s.equilibria, box, s.reach, attached)) {
      for (const part of splitByDirection(
        piece,
        ev,
        j,
        s.scales[j],
        curve.line ? locateOnLine : locateOnCurve,
        onSignChange,
      )) {
        pieces.push({
          curve: index,
          points: part.points.map((p) => [p[0] + 0, p[1] + 0]),
          otherState: names[j],
          otherDirection: part.sign > 0 ? "increasing" : part.sign < 0 ? "decreasing" : "zero",
          onAxis: axis !== null,
          axis,
          ends: part.ends,
        });
      }
    }
  });
  for (const e of s.equilibria)
    if (!attached.has(e.id)) {
      diagnostics.push({
        severity: "info",
        stage: "nullclines",
        code: "equilibrium-off-nullcline",
        data: { equilibrium: e.id, nullcline: names[i] },
      });
    }
  return pieces;
}

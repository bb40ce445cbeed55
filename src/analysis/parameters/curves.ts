import type { Model } from "../../model/types.js";
import {
  compileParameterDerivative,
  compileParameterJacobian,
  compileSecondDerivatives,
} from "../../model/higher.js";
import { newtonSolve, type SquareSystem } from "../numeric/newton.js";
import {
  CURVE_NEWTON_ITERATIONS,
  CURVE_RANGE_SLACK,
  CURVE_STEP_TOL,
  CURVE_STEPS,
  ON_AXIS_ABS_FLOOR,
  ON_AXIS_REL_TOL,
} from "../constants.js";

/**
 * Threshold curves of two-parameter outcome maps: from a threshold located in a one-parameter
 * study, natural-parameter continuation of its defining system (equilibrium plus test function)
 * in the second parameter, each point solved by Newton with the analytic Jacobian (the model's
 * J, ∂f/∂p, ∂J/∂p and second derivatives). Planar: the defining systems are those of a 2-D model.
 */
export interface CurveStart {
  /** Value of the first parameter at the threshold. */
  value: number;
  point: Record<string, number>;
  kind: string;
  /** For a threshold on a bound: the state at it. */
  bound: { state: string; value: number } | null;
}

type Ranges = [[number, number], [number, number]];

/** The defining system at each value q of the second parameter, its start and the spans of its unknowns. */
interface DefiningSystem {
  at: (q: number) => SquareSystem;
  u0: Float64Array;
  /** Unit of each unknown, for the convergence test. */
  span: Float64Array;
}

interface Derivatives {
  p: Float64Array;
  f: Float64Array;
  j: Float64Array;
  fp: Float64Array;
  jp: Float64Array;
  h: Float64Array;
  /** Fills f, j, fp, jp and h at x with p as it stands. */
  evaluate: (x: ArrayLike<number>) => void;
}

function derivativesOf(model: Model, parameterIndex: number): Derivatives {
  const fp = compileParameterDerivative(model, parameterIndex).evaluate;
  const jp = compileParameterJacobian(model, parameterIndex).evaluate;
  const second = compileSecondDerivatives(model).evaluate;
  const d: Derivatives = {
    p: Float64Array.from(model.parameterValues),
    f: new Float64Array(2),
    j: new Float64Array(4),
    fp: new Float64Array(2),
    jp: new Float64Array(4),
    h: new Float64Array(8),
    evaluate: (x) => {
      model.rhsParametric(x, d.p, d.f);
      model.jacobianParametric(x, d.p, d.j);
      fp(x, d.p, d.fp);
      jp(x, d.p, d.jp);
      second(x, d.p, d.h);
    },
  };
  return d;
}

/** On a bound (a population absent): the resident's equilibrium and the absent one's growth rate, in (resident, p1). */
function boundSystem(
  model: Model,
  [i, j]: [number, number],
  start: CurveStart,
  widths: number[],
  p1Scale: number,
): DefiningSystem {
  const names = model.stateNames;
  const bound = start.bound!;
  const k = names.indexOf(bound.state),
    other = 1 - k;
  const d = derivativesOf(model, i);
  const at =
    (q: number): SquareSystem =>
    (u, r, jac) => {
      d.p[i] = u[1];
      d.p[j] = q;
      const x = [0, 0];
      x[k] = bound.value;
      x[other] = u[0];
      d.evaluate(x);
      const fx = d.f[other];
      const onAxis = Math.abs(d.f[k]) <= ON_AXIS_REL_TOL * Math.abs(fx) + ON_AXIS_ABS_FLOOR;
      r[0] = fx / widths[other];
      r[1] = onAxis ? d.j[k * 2 + k] : d.f[k];
      jac[0] = d.j[other * 2 + other] / widths[other];
      jac[1] = d.fp[other] / widths[other];
      jac[2] = onAxis ? d.h[(k * 2 + k) * 2 + other] : d.j[k * 2 + other];
      jac[3] = onAxis ? d.jp[k * 2 + k] : d.fp[k];
      return true;
    };
  return {
    at,
    u0: Float64Array.from([start.point[names[other]], start.value]),
    span: Float64Array.from([widths[other], p1Scale]),
  };
}

/** Inside the window: the equilibrium and det J = 0 (saddle-node, transcritical) or trace J = 0 (Hopf), in (x0, x1, p1). */
function interiorSystem(
  model: Model,
  [i, j]: [number, number],
  start: CurveStart,
  widths: number[],
  p1Scale: number,
): DefiningSystem {
  const names = model.stateNames;
  const d = derivativesOf(model, i);
  const hopf = start.kind === "hopf";
  const H = (a: number, b: number, c: number) => d.h[(a * 2 + b) * 2 + c];
  const at =
    (q: number): SquareSystem =>
    (u, r, jac) => {
      d.p[i] = u[2];
      d.p[j] = q;
      d.evaluate([u[0], u[1]]);
      const J = d.j,
        Jp = d.jp;
      r[0] = d.f[0] / widths[0];
      r[1] = d.f[1] / widths[1];
      r[2] = hopf ? J[0] + J[3] : J[0] * J[3] - J[1] * J[2];
      for (let c = 0; c < 2; c++) {
        jac[c] = J[c] / widths[0];
        jac[3 + c] = J[2 + c] / widths[1];
        jac[6 + c] = hopf
          ? H(0, 0, c) + H(1, 1, c)
          : H(0, 0, c) * J[3] + J[0] * H(1, 1, c) - H(0, 1, c) * J[2] - J[1] * H(1, 0, c);
      }
      jac[2] = d.fp[0] / widths[0];
      jac[5] = d.fp[1] / widths[1];
      jac[8] = hopf ? Jp[0] + Jp[3] : Jp[0] * J[3] + J[0] * Jp[3] - Jp[1] * J[2] - J[1] * Jp[2];
      return true;
    };
  return {
    at,
    u0: Float64Array.from([start.point[names[0]], start.point[names[1]], start.value]),
    span: Float64Array.from([widths[0], widths[1], p1Scale]),
  };
}

/** Traces one threshold curve through (p1*, p2 nominal) across p2's range; `pair` holds the indices of (p1, p2). */
export function traceThresholdCurve(
  model: Model,
  pair: [number, number],
  ranges: Ranges,
  start: CurveStart,
): [number, number][] {
  const widths = model.stateNames.map((n) => model.spec.window[n][1] - model.spec.window[n][0]);
  const p1Scale = ranges[0][1] - ranges[0][0];
  const system = start.bound
    ? boundSystem(model, pair, start, widths, p1Scale)
    : interiorSystem(model, pair, start, widths, p1Scale);
  const q0 = model.parameterValues[pair[1]];
  const [down, up] = ([-1, 1] as const).map((direction) => traceOneWay(system, ranges, q0, direction));
  return [...down, ...up.slice(down.length ? 1 : 0)];
}

/** Even steps in the second parameter from q0 to one end of its range, with a linear predictor; stops where Newton fails or p1 leaves its range. */
function traceOneWay(
  system: DefiningSystem,
  ranges: Ranges,
  q0: number,
  direction: -1 | 1,
): [number, number][] {
  const [qlo, qhi] = ranges[1];
  const p1Scale = ranges[0][1] - ranges[0][0];
  const settings = { maxIterations: CURVE_NEWTON_ITERATIONS, stepTol: CURVE_STEP_TOL };
  const piece: [number, number][] = [];
  let prev: Float64Array | null = null;
  let cur: Float64Array | null = Float64Array.from(system.u0);
  let q = q0;
  for (let s = 0; s <= CURVE_STEPS && cur; s++) {
    // linear predictor: the steps in the second parameter are even
    const guess: Float64Array = prev ? cur.map((v, c) => 2 * v - prev![c]) : cur;
    const solved = newtonSolve(system.at(q), s === 0 ? cur : guess, system.span, settings);
    if (!solved) break;
    const p1 = solved[solved.length - 1];
    if (p1 < ranges[0][0] - CURVE_RANGE_SLACK * p1Scale || p1 > ranges[0][1] + CURVE_RANGE_SLACK * p1Scale)
      break;
    piece.push([p1, q]);
    prev = cur;
    cur = solved;
    q = q0 + (direction * (s + 1) * (direction < 0 ? q0 - qlo : qhi - q0)) / CURVE_STEPS;
  }
  return direction < 0 ? piece.reverse() : piece;
}

import type { Box } from "../../numeric/window.js";
import type { NullclineEnd } from "../nullclines.js";
import { bisect } from "../../numeric/roots.js";
import { scaledDistance, segmentDistance } from "../../numeric/distance.js";
import {
  DIRECTION_ZERO_TOL,
  MERGE_DISTANCE,
  SAGITTA_SAFETY,
  SIGN_BISECTION_STEPS,
  SIGN_CHANGE_ZERO_TOL,
} from "../../constants.js";
import type { Evaluator } from "./evaluate.js";
import { dedupe, turningAngle, type Curve, type Piece, type Point } from "./geometry.js";

/** Cut a curve at every equilibrium on it (see EQUILIBRIUM_ON_CURVE_CELLS); the equilibrium becomes the shared end point. */
export function splitAtEquilibria(
  b: Curve,
  equilibria: { id: string; p: Point }[],
  box: Box,
  reach: number,
  attached: Set<string>,
): Piece[] {
  const pts = b.points;
  const segments = b.closed ? pts.length : pts.length - 1;
  const hits: { s: number; t: number; id: string; p: Point }[] = [];
  for (const e of equilibria) {
    let best = { s: -1, t: 0, d: Infinity };
    for (let s = 0; s < segments; s++) {
      const { d, t } = segmentDistance(e.p, pts[s], pts[(s + 1) % pts.length], box.width);
      if (d < best.d) best = { s, t, d };
    }
    if (best.s < 0) continue;
    const [a, c] = [best.s, (best.s + 1) % pts.length];
    const bend = Math.max(turningAngle(pts, a, b.closed, box), turningAngle(pts, c, b.closed, box));
    const sagitta = (SAGITTA_SAFETY * scaledDistance(pts[a], pts[c], box.width) * bend) / 8;
    if (best.d <= Math.min(reach, Math.max(MERGE_DISTANCE, sagitta))) {
      hits.push({ s: best.s, t: best.t, id: e.id, p: e.p });
      attached.add(e.id);
    }
  }
  hits.sort((h, k) => h.s - k.s || h.t - k.t);

  let nodes: { p: Point; eq: string | null }[] = [];
  for (let s = 0; s < pts.length; s++) {
    nodes.push({ p: pts[s], eq: null });
    for (const hit of hits) if (hit.s === s) nodes.push({ p: hit.p, eq: hit.id });
  }
  nodes = nodes.filter(
    (n) => n.eq !== null || hits.every((hit) => scaledDistance(n.p, hit.p, box.width) > MERGE_DISTANCE),
  );
  const ends = b.ends;
  if (hits.length === 0) {
    return [{ points: b.closed ? [...pts, pts[0]] : pts, ends }];
  }
  if (b.closed) {
    const first = nodes.findIndex((n) => n.eq !== null);
    nodes = [...nodes.slice(first), ...nodes.slice(0, first), nodes[first]];
  }
  const pieces: Piece[] = [];
  let current: { p: Point; eq: string | null }[] = [];
  const endOf = (n: { eq: string | null }, fallback: NullclineEnd): NullclineEnd =>
    n.eq !== null ? { kind: "equilibrium", id: n.eq } : fallback;
  const flush = () => {
    const points = dedupe(
      current.map((n) => n.p),
      false,
    );
    if (points.length >= 2)
      pieces.push({
        points,
        ends: [endOf(current[0], ends[0]), endOf(current[current.length - 1], ends[1])],
      });
  };
  for (const n of nodes) {
    current.push(n);
    if (n.eq !== null && current.length > 1) {
      flush();
      current = [n];
    }
  }
  if (current.length > 1) flush();
  return pieces;
}

export type Sign = -1 | 0 | 1;
export type SignChange = (p: Point, kind: "zero" | "jump") => void;

/**
 * Split a piece wherever the other component changes sign, and label each part with its direction.
 * Through a zero the parts share the crossing point; across a jump (a pole, a hole) they are left apart.
 */
export function splitByDirection(
  piece: Piece,
  ev: Evaluator,
  j: number,
  scaleJ: number,
  locate: (a: Point, b: Point, sa: Sign) => Point | null,
  onChange: SignChange,
): (Piece & { sign: Sign })[] {
  const excluded = (e: NullclineEnd) => e.kind === "equilibrium" || e.kind === "interior";
  const pts = piece.points;
  const values = pts.map((p) => ev.f(p, j));
  const signs: (Sign | null)[] = values.map((v, k) => {
    if (
      (k === 0 && excluded(piece.ends[0])) ||
      (k === pts.length - 1 && excluded(piece.ends[1])) ||
      !Number.isFinite(v)
    )
      return null;
    return Math.abs(v) <= DIRECTION_ZERO_TOL * scaleJ ? 0 : (Math.sign(v) as Sign);
  });
  let k1 = -1;
  for (let k = 0; k < signs.length; k++) {
    if (!signs[k]) continue;
    if (k1 < 0 || signs[k] === signs[k1]) {
      k1 = k;
      continue;
    }
    let shared: Point | null = null;
    if (k === k1 + 1) {
      const p = locate(pts[k1], pts[k], signs[k1] as Sign);
      if (p && Math.abs(ev.f(p, j)) <= SIGN_CHANGE_ZERO_TOL * scaleJ) shared = p;
      onChange(p ?? pts[k1], shared ? "zero" : "jump");
    } else {
      // vertices between are zero (the crossing) or non-finite (a jump)
      const zero = pts.findIndex((_, m) => m > k1 && m < k && signs[m] === 0);
      if (zero >= 0) shared = pts[zero];
      onChange(shared ?? pts[k1 + 1], shared ? "zero" : "jump");
    }
    const interior: NullclineEnd = { kind: "interior" };
    const head: Piece = {
      points: [...pts.slice(0, k1 + 1), ...(shared ? [shared] : [])],
      ends: [piece.ends[0], interior],
    };
    const tail: Piece = {
      points: [...(shared ? [shared] : []), ...pts.slice(k)],
      ends: [interior, piece.ends[1]],
    };
    const out: (Piece & { sign: Sign })[] =
      head.points.length >= 2 ? [{ ...head, sign: signs[k1] as Sign }] : [];
    return tail.points.length >= 2
      ? [...out, ...splitByDirection(tail, ev, j, scaleJ, locate, onChange)]
      : out;
  }
  return [{ ...piece, sign: k1 >= 0 ? (signs[k1] as Sign) : 0 }];
}

/** Bisection on the segment a → b (points projected onto the nullcline) for a sign change of f_j. */
export function locateSignChange(
  a: Point,
  b: Point,
  sa: Sign,
  project: (p: Point) => Point,
  ev: Evaluator,
  j: number,
  accept: (p: Point) => boolean = () => true,
): Point | null {
  let best: Point | null = null;
  let failed = false;
  bisect(
    0,
    1,
    (t) => {
      const p = project([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
      const v = accept(p) ? ev.f(p, j) : NaN;
      if (!Number.isFinite(v)) {
        failed = true;
        return "stop";
      }
      best = p;
      if (v === 0) return "stop";
      return Math.sign(v) === sa ? "upper" : "lower";
    },
    SIGN_BISECTION_STEPS,
  );
  return failed ? null : best;
}

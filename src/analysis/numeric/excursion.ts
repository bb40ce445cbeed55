import { bisectPredicate } from "./roots.js";
import { EVENT_BISECTION_STEPS, EXCURSION_SAMPLES, EXCURSION_SEARCH_STEPS } from "../constants.js";

/** Which end of an interval a value passed. */
export type ExitSide = "lo" | "hi";

/**
 * The first s ∈ [0, 1] where a smooth function of one integration step (its dense output, s the
 * step's own time) leaves [lo, hi], and by which end; null when it stays inside. The function is
 * sampled at EXCURSION_SAMPLES even intervals; between two samples still inside, an excursion
 * is looked for where the parabola through three neighbouring samples, widened by their second
 * difference, reaches past an end: golden-section search then finds the extremum between the
 * outer two, and bisection the crossing before it. An excursion is missed only if it is
 * narrower than a sample interval and sharper than that parabola, which takes curvature far
 * beyond what the integrator's step control admits.
 */
export function firstExit(
  value: (s: number) => number,
  lo: number,
  hi: number,
): { s: number; side: ExitSide } | null {
  const n = EXCURSION_SAMPLES;
  const v = Array.from({ length: n + 1 }, (_, i) => value(i / n));
  const side = (x: number): ExitSide | null => (x > hi ? "hi" : x < lo ? "lo" : null);
  const first = side(v[0]);
  if (first) return { s: 0, side: first };
  const crossing = (a: number, b: number, past: ExitSide) => ({
    s: bisectPredicate(a, b, (s) => side(value(s)) === past, EVENT_BISECTION_STEPS).hi,
    side: past,
  });
  for (let i = 1; i <= n; i++) {
    const past = side(v[i]);
    if (past) return crossing((i - 1) / n, i / n, past);
    if (i === n) break;
    // three samples inside: does the curve through them peak (or dip) past an end between the outer two?
    const second = v[i + 1] - 2 * v[i] + v[i - 1];
    const slope = 0.5 * (v[i + 1] - v[i - 1]);
    const vertex =
      second !== 0 && Math.abs(slope) <= Math.abs(second) ? v[i] - (slope * slope) / (2 * second) : v[i];
    const reach = Math.abs(second);
    for (const end of ["hi", "lo"] as const) {
      if (end === "hi" ? vertex + reach <= hi : vertex - reach >= lo) continue;
      const sign = end === "hi" ? 1 : -1;
      const peak = goldenMaximum((s) => sign * value(s), (i - 1) / n, (i + 1) / n);
      if (side(value(peak)) === end) return crossing((i - 1) / n, peak, end);
    }
  }
  return null;
}

/** Golden-section search for the maximum of f on [a, b] (f unimodal there), EXCURSION_SEARCH_STEPS reductions. */
function goldenMaximum(f: (s: number) => number, a: number, b: number): number {
  const r = (Math.sqrt(5) - 1) / 2;
  let x1 = b - r * (b - a),
    x2 = a + r * (b - a);
  let f1 = f(x1),
    f2 = f(x2);
  for (let k = 0; k < EXCURSION_SEARCH_STEPS; k++) {
    if (f1 < f2) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + r * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - r * (b - a);
      f1 = f(x1);
    }
  }
  return f1 > f2 ? x1 : x2;
}

/**
 * Distances in scaled coordinates: each component divided by its span (a window width, a
 * parameter range), so one tolerance means the same in every model and every unit.
 */

/** Euclidean distance between p and q, component k divided by span[k] (a window width, a range width). */
export function scaledDistance(p: ArrayLike<number>, q: ArrayLike<number>, span: ArrayLike<number>): number {
  if (span.length === 2) return Math.hypot((p[0] - q[0]) / span[0], (p[1] - q[1]) / span[1]);
  return Math.hypot(...Array.from(span, (s, k) => (p[k] - q[k]) / s));
}

/** Largest scaled component difference max_k |p_k − q_k| / span_k. */
export function scaledMaxDistance(
  p: ArrayLike<number>,
  q: ArrayLike<number>,
  span: ArrayLike<number>,
): number {
  let d = 0;
  for (let k = 0; k < span.length; k++) d = Math.max(d, Math.abs(p[k] - q[k]) / span[k]);
  return d;
}

export interface SegmentDistance {
  /** Distance from the point to the nearest point of the segment. */
  d: number;
  /** Parameter t ∈ [0, 1] of that nearest point, a + t (b − a). */
  t: number;
}

/**
 * Distance from p to the segment a → b in scaled coordinates. The nearest point is the
 * Euclidean projection; `norm` measures the remaining offset ("euclidean", or "max": its
 * largest scaled component).
 */
export function segmentDistance(
  p: ArrayLike<number>,
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  span: ArrayLike<number>,
  norm: "euclidean" | "max" = "euclidean",
): SegmentDistance {
  const n = span.length;
  const d = Array.from(span, (s, k) => (b[k] - a[k]) / s);
  const e = Array.from(span, (s, k) => (p[k] - a[k]) / s);
  let len2 = d[0] * d[0];
  let along = e[0] * d[0];
  for (let k = 1; k < n; k++) {
    len2 += d[k] * d[k];
    along += e[k] * d[k];
  }
  const t = len2 > 0 ? Math.min(1, Math.max(0, along / len2)) : 0;
  const offset = e.map((v, k) => v - t * d[k]);
  return { d: norm === "max" ? Math.max(...offset.map(Math.abs)) : Math.hypot(...offset), t };
}

/** Small dense linear algebra: the solves and spectral sizes the analysis passes need, without allocation where it is hot. */

/**
 * Solves [[a, b], [c, d]] x = (r0, r1) by Cramer's rule: allocation-free in inner loops. Null
 * when the determinant is zero or not finite.
 */
export function solve2(
  a: number,
  b: number,
  c: number,
  d: number,
  r0: number,
  r1: number,
): [number, number] | null {
  const det = a * d - b * c;
  if (!Number.isFinite(det) || det === 0) return null;
  return [(d * r0 - b * r1) / det, (-c * r0 + a * r1) / det];
}

/** Solves the n × n system m x = r (row-major m, n ≤ a few) by Gaussian elimination with partial pivoting; null when singular. */
export function solveSmall(m: ArrayLike<number>, r: ArrayLike<number>): number[] | null {
  const n = r.length;
  const a = Array.from({ length: n }, (_, i) => [...Array.from({ length: n }, (_, k) => m[i * n + k]), r[i]]);
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let i = c + 1; i < n; i++) if (Math.abs(a[i][c]) > Math.abs(a[piv][c])) piv = i;
    if (!(Math.abs(a[piv][c]) > 0) || !Number.isFinite(a[piv][c])) return null;
    [a[c], a[piv]] = [a[piv], a[c]];
    for (let i = c + 1; i < n; i++) {
      const factor = a[i][c] / a[c][c];
      for (let k = c; k <= n; k++) a[i][k] -= factor * a[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let i = n - 1; i >= 0; i--) {
    let s = a[i][n];
    for (let k = i + 1; k < n; k++) s -= a[i][k] * x[k];
    x[i] = s / a[i][i];
  }
  return x.every(Number.isFinite) ? x : null;
}

/** Largest modulus of a list of (complex) eigenvalues. */
export function spectralRadius(eigenvalues: readonly { re: number; im: number }[]): number {
  return Math.max(...eigenvalues.map((e) => Math.hypot(e.re, e.im)));
}

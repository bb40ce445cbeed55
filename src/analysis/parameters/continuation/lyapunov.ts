/**
 * First Lyapunov coefficient at a Hopf point of a planar system, by the invariant formula of
 * Kuznetsov, Elements of Applied Bifurcation Theory, 3rd ed., section 3.5 (eq. (3.20), from memory):
 *
 *   l1 = 1/(2ω) Re[ ⟨p, C(q,q,q̄)⟩ − 2⟨p, B(q, A⁻¹B(q,q̄))⟩ + ⟨p, B(q̄, (2iωI − A)⁻¹B(q,q))⟩ ]
 *
 * with A q = iω q, Aᵀ p = −iω p, ⟨q, q⟩ = ⟨p, q⟩ = 1 (⟨u, v⟩ = ū·v), and B, C the quadratic and
 * cubic terms of f at the equilibrium (its second and third derivatives as multilinear forms).
 * The value is in the model's own units (1/(time · state²)). With this normalisation the normal
 * form ẋ = μx − ωy + s x(x² + y²), ẏ = ωx + μy + s y(x² + y²) has l1 = 2s/ω; in general
 * l1 = 2a/ω with a the coefficient of Guckenheimer and Holmes, section 3.4, eq. (3.4.11) (from
 * memory) in coordinates √2 [Re q, −Im q].
 * l1 < 0: supercritical (a stable cycle is born); l1 > 0: subcritical.
 */

import { LYAPUNOV_REL_TOL } from "../../constants.js";
import { solve2 as solveReal2 } from "../../numeric/linear.js";

type Cx = [number, number];
type CVec = [Cx, Cx];

const add = (a: Cx, b: Cx): Cx => [a[0] + b[0], a[1] + b[1]];
const mul = (a: Cx, b: Cx): Cx => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const conj = (a: Cx): Cx => [a[0], -a[1]];
const div = (a: Cx, b: Cx): Cx => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
const scaleCx = (a: Cx, k: number): Cx => [a[0] * k, a[1] * k];
const real = (x: number): Cx => [x, 0];
const inner = (p: CVec, v: CVec): Cx => add(mul(conj(p[0]), v[0]), mul(conj(p[1]), v[1]));
const vnorm = (v: CVec) => Math.hypot(v[0][0], v[0][1], v[1][0], v[1][1]);

export interface LyapunovResult {
  /** First Lyapunov coefficient; null when the Jacobian has no imaginary pair. */
  value: number | null;
  /** ω, the imaginary part of the critical eigenvalues. */
  frequency: number | null;
  criticality: "supercritical" | "subcritical" | null;
}

function multilinear2(t: ArrayLike<number>, u: CVec, v: CVec): CVec {
  const out: CVec = [
    [0, 0],
    [0, 0],
  ];
  for (let i = 0; i < 2; i++)
    for (let j = 0; j < 2; j++)
      for (let k = 0; k < 2; k++) {
        out[i] = add(out[i], scaleCx(mul(u[j], v[k]), t[(i * 2 + j) * 2 + k]));
      }
  return out;
}

function multilinear3(t: ArrayLike<number>, u: CVec, v: CVec, w: CVec): CVec {
  const out: CVec = [
    [0, 0],
    [0, 0],
  ];
  for (let i = 0; i < 2; i++)
    for (let j = 0; j < 2; j++)
      for (let k = 0; k < 2; k++)
        for (let l = 0; l < 2; l++) {
          out[i] = add(out[i], scaleCx(mul(mul(u[j], v[k]), w[l]), t[((i * 2 + j) * 2 + k) * 2 + l]));
        }
  return out;
}

/** Solves M x = r for a complex 2 × 2 M (row-major) by Cramer's rule. */
function solveComplex2(m: [Cx, Cx, Cx, Cx], r: CVec): CVec {
  const det = add(mul(m[0], m[3]), scaleCx(mul(m[1], m[2]), -1));
  return [
    div(add(mul(m[3], r[0]), scaleCx(mul(m[1], r[1]), -1)), det),
    div(add(mul(m[0], r[1]), scaleCx(mul(m[2], r[0]), -1)), det),
  ];
}

/** The better conditioned of the two null vectors of a singular 2 × 2 [[m0, m1], [m2, m3]]. */
function nullVector(m0: Cx, m1: Cx, m2: Cx, m3: Cx): CVec {
  const fromRow0: CVec = [m1, scaleCx(m0, -1)];
  const fromRow1: CVec = [m3, scaleCx(m2, -1)];
  return vnorm(fromRow0) >= vnorm(fromRow1) ? fromRow0 : fromRow1;
}

/**
 * l1 from the Jacobian (row-major 2 × 2), second derivatives (second[(i·2 + j)·2 + k]) and third
 * derivatives (third[((i·2 + j)·2 + k)·2 + l]) at the Hopf point.
 */
export function firstLyapunovCoefficient(
  jacobian: ArrayLike<number>,
  second: ArrayLike<number>,
  third: ArrayLike<number>,
): LyapunovResult {
  const [a, b, c, d] = [jacobian[0], jacobian[1], jacobian[2], jacobian[3]];
  const tr = a + d;
  const det = a * d - b * c;
  const omega2 = det - (tr * tr) / 4;
  if (!(omega2 > 0)) return { value: null, frequency: null, criticality: null };
  const omega = Math.sqrt(omega2);
  const lambda: Cx = [tr / 2, omega];
  // A q = λ q and Aᵀ p = λ̄ p
  let q = nullVector(add(real(a), scaleCx(lambda, -1)), real(b), real(c), add(real(d), scaleCx(lambda, -1)));
  const qn = vnorm(q);
  q = [scaleCx(q[0], 1 / qn), scaleCx(q[1], 1 / qn)];
  const lambdaBar = conj(lambda);
  let p = nullVector(
    add(real(a), scaleCx(lambdaBar, -1)),
    real(c),
    real(b),
    add(real(d), scaleCx(lambdaBar, -1)),
  );
  const pq = inner(p, q);
  const factor = conj(pq);
  p = [div(p[0], factor), div(p[1], factor)];

  const qBar: CVec = [conj(q[0]), conj(q[1])];
  const cubic = inner(p, multilinear3(third, q, q, qBar))[0];
  // h11 = −A⁻¹ B(q, q̄): B(q, q̄) is real
  const bqqBar = multilinear2(second, q, qBar);
  const r0 = bqqBar[0][0];
  const r1 = bqqBar[1][0];
  // det > ω² > 0 here, so the solve exists
  const [s0, s1] = solveReal2(a, b, c, d, r0, r1)!;
  const h11: CVec = [real(-s0), real(-s1)];
  const mixed = inner(p, multilinear2(second, q, h11))[0] * 2;
  const twoIOmega: Cx = [0, 2 * omega];
  const h20 = solveComplex2(
    [add(twoIOmega, real(-a)), real(-b), real(-c), add(twoIOmega, real(-d))],
    multilinear2(second, q, q),
  );
  const resonant = inner(p, multilinear2(second, qBar, h20))[0];
  const value = (cubic + mixed + resonant) / (2 * omega);
  const size = (Math.abs(cubic) + Math.abs(mixed) + Math.abs(resonant)) / (2 * omega);
  const criticality = !(Math.abs(value) > LYAPUNOV_REL_TOL * size)
    ? null
    : value < 0
      ? "supercritical"
      : "subcritical";
  return { value: value + 0, frequency: omega, criticality };
}

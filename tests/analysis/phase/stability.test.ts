import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  classifyEquilibrium,
  type Complex,
  type EquilibriumType,
} from "../../../src/analysis/phase/stability.js";
import { findEquilibria } from "../../../src/analysis/phase/equilibria.js";
import { mathjsEigenvalues, pairDistance } from "../../fixtures/eigen.js";
import { buildModel } from "../../fixtures/models.js";

type Matrix2 = [[number, number], [number, number]];

/** Hand-derived eigenvalues of small integer matrices are exact up to a few rounding steps. */
const EXACT_TOL = 1e-12;
/**
 * Two eigen-solvers agree on well-separated eigenvalues to a few ulps of ‖J‖ (both are backward
 * stable); 1e-10 leaves a wide margin.
 */
const CROSS_CHECK_REL_TOL = 1e-10;
/**
 * Near a repeated eigenvalue the eigenvalues move like the square root of a perturbation
 * (Golub and Van Loan, Matrix Computations, 4th ed., section 7.2, eigenvalue sensitivity; from
 * memory), so two solvers may differ by ~sqrt(eps)·‖J‖ ≈ 1.5e-8 ‖J‖ there.
 */
const NEAR_REPEATED_REL_TOL = 1e-7;
/** Eigenvalues closer than this fraction of ‖J‖ count as near-repeated for the bound above. */
const NEAR_REPEATED_SEPARATION = 1e-3;
/** Invariants (trace, determinant, A·v = λv) hold to rounding of a 2 × 2 solve; ‖J‖-relative. */
const INVARIANT_REL_TOL = 1e-10;
/** fast-check seeds, fixed so every run checks the same matrices (common practice). */
const SEED = 20240617;
const RUNS = 400;

const frobenius = (J: Matrix2) => Math.hypot(J[0][0], J[0][1], J[1][0], J[1][1]);

function expectEigenvalues(actual: Complex[], expected: Complex[], tol = EXACT_TOL) {
  expect(actual).toHaveLength(expected.length);
  actual.forEach((e, k) => {
    expect(Math.abs(e.re - expected[k].re)).toBeLessThanOrEqual(tol);
    expect(Math.abs(e.im - expected[k].im)).toBeLessThanOrEqual(tol);
  });
}

function expectEigenvectors(actual: number[][], expected: number[][]) {
  expect(actual).toHaveLength(expected.length);
  actual.forEach((v, k) => {
    expect(Math.abs(v[0] - expected[k][0])).toBeLessThanOrEqual(EXACT_TOL);
    expect(Math.abs(v[1] - expected[k][1])).toBeLessThanOrEqual(EXACT_TOL);
  });
}

const real = (...values: number[]): Complex[] => values.map((re) => ({ re, im: 0 }));
const pair = (re: number, im: number): Complex[] => [
  { re, im: -im },
  { re, im },
];

/**
 * One linear system of each type in the trace–determinant classification (Hirsch, Smale and
 * Devaney, Differential Equations, Dynamical Systems, and an Introduction to Chaos, 3rd ed.,
 * chapter 3: real distinct, complex and repeated eigenvalues; chapter 4, section 4.1: the
 * trace–determinant plane). Eigenvalues are roots of λ² − τλ + Δ, worked by hand.
 */
interface LinearCase {
  name: string;
  J: Matrix2;
  type: EquilibriumType;
  hyperbolic: boolean;
  stable: boolean | null;
  eigenvalues: Complex[];
  /** Unit eigenvectors, largest component positive (keel's sign convention); null: not checked. */
  eigenvectors: number[][] | null;
}

const s5 = Math.sqrt(5);
const s10 = Math.sqrt(10);
const LINEAR_CASES: LinearCase[] = [
  // λ² − λ − 6 = (λ − 3)(λ + 2); (J + 2I)v = 0 gives v ∝ (−1, 2), (J − 3I)v = 0 gives v ∝ (1, 3)
  {
    name: "saddle",
    J: [
      [0, 1],
      [6, 1],
    ],
    type: "saddle",
    hyperbolic: true,
    stable: false,
    eigenvalues: real(-2, 3),
    eigenvectors: [
      [-1 / s5, 2 / s5],
      [1 / s10, 3 / s10],
    ],
  },
  // triangular: λ = −3, −1; (J + I)v = 0 gives v ∝ (1, 2)
  {
    name: "stable node",
    J: [
      [-3, 1],
      [0, -1],
    ],
    type: "stable-node",
    hyperbolic: true,
    stable: true,
    eigenvalues: real(-3, -1),
    eigenvectors: [
      [1, 0],
      [1 / s5, 2 / s5],
    ],
  },
  // triangular: λ = 1, 3; (J − 3I)v = 0 gives v ∝ (1, 2)
  {
    name: "unstable node",
    J: [
      [1, 1],
      [0, 3],
    ],
    type: "unstable-node",
    hyperbolic: true,
    stable: false,
    eigenvalues: real(1, 3),
    eigenvectors: [
      [1, 0],
      [1 / s5, 2 / s5],
    ],
  },
  // the canonical form [[α, β], [−β, α]] has eigenvalues α ± iβ (HSD 3rd ed., section 3.2)
  {
    name: "stable focus",
    J: [
      [-1, 2],
      [-2, -1],
    ],
    type: "stable-focus",
    hyperbolic: true,
    stable: true,
    eigenvalues: pair(-1, 2),
    eigenvectors: [],
  },
  {
    name: "unstable focus",
    J: [
      [1, 2],
      [-2, 1],
    ],
    type: "unstable-focus",
    hyperbolic: true,
    stable: false,
    eigenvalues: pair(1, 2),
    eigenvectors: [],
  },
  // not in canonical form: λ² + 2λ + 5 = 0, λ = −1 ± 2i
  {
    name: "stable focus (companion form)",
    J: [
      [0, 1],
      [-5, -2],
    ],
    type: "stable-focus",
    hyperbolic: true,
    stable: true,
    eigenvalues: pair(-1, 2),
    eigenvectors: [],
  },
  // τ = 0, Δ = 4: λ = ±2i; the linearisation alone does not decide (HSD 3rd ed., section 3.2)
  {
    name: "center",
    J: [
      [0, 1],
      [-4, 0],
    ],
    type: "center",
    hyperbolic: false,
    stable: null,
    eigenvalues: pair(0, 2),
    eigenvectors: [],
  },
  // J = kI: every direction is an eigenvector (HSD 3rd ed., section 3.3)
  {
    name: "stable star",
    J: [
      [-2, 0],
      [0, -2],
    ],
    type: "stable-star",
    hyperbolic: true,
    stable: true,
    eigenvalues: real(-2, -2),
    eigenvectors: null,
  },
  {
    name: "unstable star",
    J: [
      [3, 0],
      [0, 3],
    ],
    type: "unstable-star",
    hyperbolic: true,
    stable: false,
    eigenvalues: real(3, 3),
    eigenvectors: null,
  },
  // a Jordan block: one eigenvector direction only (HSD 3rd ed., section 3.3)
  {
    name: "stable degenerate node",
    J: [
      [-1, 1],
      [0, -1],
    ],
    type: "stable-degenerate-node",
    hyperbolic: true,
    stable: true,
    eigenvalues: real(-1, -1),
    eigenvectors: [
      [1, 0],
      [1, 0],
    ],
  },
  {
    name: "unstable degenerate node",
    J: [
      [2, 0],
      [1, 2],
    ],
    type: "unstable-degenerate-node",
    hyperbolic: true,
    stable: false,
    eigenvalues: real(2, 2),
    eigenvectors: [
      [0, 1],
      [0, 1],
    ],
  },
  // a zero eigenvalue: x' = −x, y' = y² linearised at the origin
  {
    name: "zero eigenvalue",
    J: [
      [-1, 0],
      [0, 0],
    ],
    type: "non-hyperbolic",
    hyperbolic: false,
    stable: null,
    eigenvalues: real(-1, 0),
    eigenvectors: [
      [1, 0],
      [0, 1],
    ],
  },
  // singular but not diagonal: λ = 0, 5; (J − 5I)v = 0 gives v ∝ (1, 2), Jv = 0 gives v ∝ (2, −1)
  {
    name: "zero eigenvalue (rank one)",
    J: [
      [1, 2],
      [2, 4],
    ],
    type: "non-hyperbolic",
    hyperbolic: false,
    stable: null,
    eigenvalues: real(0, 5),
    eigenvectors: [
      [2 / s5, -1 / s5],
      [1 / s5, 2 / s5],
    ],
  },
  // nilpotent: both eigenvalues zero
  {
    name: "nilpotent",
    J: [
      [0, 1],
      [0, 0],
    ],
    type: "non-hyperbolic",
    hyperbolic: false,
    stable: null,
    eigenvalues: real(0, 0),
    eigenvectors: null,
  },
];

describe("classifyEquilibrium on matrices of every type", () => {
  for (const c of LINEAR_CASES) {
    it(`classifyEquilibrium(${JSON.stringify(c.J)}) is ${c.type} (${c.name})`, () => {
      const r = classifyEquilibrium(c.J);
      const [[a, b], [cc, d]] = c.J;
      expect(r.type).toBe(c.type);
      expect(r.hyperbolic).toBe(c.hyperbolic);
      expect(r.stable).toBe(c.stable);
      expect(r.trace).toBe(a + d);
      expect(r.determinant).toBe(a * d - b * cc);
      // τ² − 4Δ = (a − d)² + 4bc, exact for these integer entries
      expect(r.discriminant).toBe((a + d) ** 2 - 4 * (a * d - b * cc));
      expect(r.jacobian).toEqual(c.J);
      // each case is decided with margin or is a boundary type read at zero: nothing borderline
      expect(r.borderline).toBeNull();
      expectEigenvalues(r.eigenvalues, c.eigenvalues);
      if (c.eigenvectors) expectEigenvectors(r.eigenvectors, c.eigenvectors);
      for (const [k, v] of r.eigenvectors.entries()) {
        // A·v = λ v for every reported real eigenvector, and v is a unit vector
        const lambda = r.eigenvalues[k].re;
        expect(Math.abs(a * v[0] + b * v[1] - lambda * v[0])).toBeLessThanOrEqual(EXACT_TOL);
        expect(Math.abs(cc * v[0] + d * v[1] - lambda * v[1])).toBeLessThanOrEqual(EXACT_TOL);
        expect(Math.abs(Math.hypot(v[0], v[1]) - 1)).toBeLessThanOrEqual(EXACT_TOL);
      }
    });
  }

  it("classifyEquilibrium(zero matrix) is non-hyperbolic", () => {
    const r = classifyEquilibrium([
      [0, 0],
      [0, 0],
    ]);
    expect(r.type).toBe("non-hyperbolic");
    expect(r.stable).toBeNull();
    expectEigenvalues(r.eigenvalues, real(0, 0));
  });

  it("classifyEquilibrium returns a copy of its input as jacobian, so editing the result leaves J alone", () => {
    const J: Matrix2 = [
      [0, 1],
      [6, 1],
    ];
    const r = classifyEquilibrium(J);
    r.jacobian[0][0] = 99;
    expect(J).toEqual([
      [0, 1],
      [6, 1],
    ]);
  });
});

describe("findEquilibria classifies linear systems at the origin", () => {
  // the same HSD 3rd ed. chapter 3 cases, through the whole compile → Newton → classify path
  const systems: { name: string; x: string; y: string; type: EquilibriumType; eigenvalues: Complex[] }[] = [
    { name: "saddle", x: "y", y: "6*x + y", type: "saddle", eigenvalues: real(-2, 3) },
    { name: "stable focus", x: "-x + 2*y", y: "-2*x - y", type: "stable-focus", eigenvalues: pair(-1, 2) },
    { name: "center", x: "y", y: "-4*x", type: "center", eigenvalues: pair(0, 2) },
    { name: "unstable star", x: "3*x", y: "3*y", type: "unstable-star", eigenvalues: real(3, 3) },
    {
      name: "stable degenerate node",
      x: "-x + y",
      y: "-y",
      type: "stable-degenerate-node",
      eigenvalues: real(-1, -1),
    },
    // x' = −x, y' = y²: an isolated equilibrium with a zero eigenvalue (a saddle-node)
    { name: "non-hyperbolic", x: "-x", y: "y^2", type: "non-hyperbolic", eigenvalues: real(-1, 0) },
  ];
  for (const s of systems) {
    it(`findEquilibria(x' = ${s.x}, y' = ${s.y}) finds one ${s.type} at the origin`, () => {
      const model = buildModel({ equations: { x: s.x, y: s.y }, window: { x: [-1, 1], y: [-1, 1] } });
      const found = findEquilibria(model);
      expect(found).toHaveLength(1);
      expect(found[0].point).toEqual({ x: 0, y: 0 });
      expect(found[0].type).toBe(s.type);
      expectEigenvalues(found[0].eigenvalues, s.eigenvalues);
    });
  }
});

/**
 * Entries on a grid of step 1e-5 in [−10, 10]. fast-check's bias still gives zeros, small values
 * and exactly repeated eigenvalues; a grid keeps out sub-normal entries like 1e-160, whose
 * products (b·c) underflow in any 2 × 2 formula and are no Jacobian a model produces.
 */
const entry = fc.integer({ min: -1_000_000, max: 1_000_000 }).map((k) => k / 100_000);
const matrix = fc.tuple(entry, entry, entry, entry).map(([a, b, c, d]): Matrix2 => [
  [a, b],
  [c, d],
]);

describe("classifyEquilibrium eigenvalues against an independent solver (seeded random matrices)", () => {
  it("classifyEquilibrium eigenvalues equal mathjs eigs to 1e-10 of ‖J‖", () => {
    fc.assert(
      fc.property(matrix, (J) => {
        const norm = frobenius(J);
        const ours = classifyEquilibrium(J).eigenvalues;
        const theirs = mathjsEigenvalues(J);
        const separation = Math.hypot(ours[0].re - ours[1].re, ours[0].im - ours[1].im);
        const tol =
          separation > NEAR_REPEATED_SEPARATION * norm ? CROSS_CHECK_REL_TOL : NEAR_REPEATED_REL_TOL;
        expect(pairDistance(ours, theirs)).toBeLessThanOrEqual(tol * norm);
      }),
      { seed: SEED, numRuns: RUNS },
    );
  });

  // eigenvalue invariants of the kind ml-matrix's own tests check (common practice)
  it("classifyEquilibrium eigenvalues sum to the trace and multiply to the determinant", () => {
    fc.assert(
      fc.property(matrix, (J) => {
        const norm = frobenius(J);
        const r = classifyEquilibrium(J);
        const [l1, l2] = r.eigenvalues;
        expect(Math.abs(l1.re + l2.re - r.trace)).toBeLessThanOrEqual(INVARIANT_REL_TOL * norm);
        expect(Math.abs(l1.im + l2.im)).toBeLessThanOrEqual(INVARIANT_REL_TOL * norm);
        const productRe = l1.re * l2.re - l1.im * l2.im;
        const productIm = l1.re * l2.im + l1.im * l2.re;
        expect(Math.abs(productRe - r.determinant)).toBeLessThanOrEqual(INVARIANT_REL_TOL * norm * norm);
        expect(Math.abs(productIm)).toBeLessThanOrEqual(INVARIANT_REL_TOL * norm * norm);
      }),
      { seed: SEED + 1, numRuns: RUNS },
    );
  });

  it("classifyEquilibrium eigenvectors satisfy A·v = λv and have unit length", () => {
    fc.assert(
      fc.property(matrix, (J) => {
        const norm = frobenius(J);
        const r = classifyEquilibrium(J);
        for (const [k, v] of r.eigenvectors.entries()) {
          const lambda = r.eigenvalues[k].re;
          const residual = Math.hypot(
            J[0][0] * v[0] + J[0][1] * v[1] - lambda * v[0],
            J[1][0] * v[0] + J[1][1] * v[1] - lambda * v[1],
          );
          expect(residual).toBeLessThanOrEqual(INVARIANT_REL_TOL * Math.max(norm, Number.MIN_VALUE));
          if (norm > 0) expect(Math.abs(Math.hypot(v[0], v[1]) - 1)).toBeLessThanOrEqual(INVARIANT_REL_TOL);
        }
      }),
      { seed: SEED + 2, numRuns: RUNS },
    );
  });

  // linear stability: asymptotically stable iff every eigenvalue has negative real part, unstable
  // if one has positive real part (HSD 3rd ed., section 4.1); eigenvalues here from mathjs
  it("classifyEquilibrium(J).stable follows the signs of mathjs eigenvalue real parts", () => {
    fc.assert(
      fc.property(matrix, (J) => {
        const norm = frobenius(J);
        const theirs = mathjsEigenvalues(J);
        const maxRe = Math.max(theirs[0].re, theirs[1].re);
        const minAbs = Math.min(
          Math.hypot(theirs[0].re, theirs[0].im),
          Math.hypot(theirs[1].re, theirs[1].im),
        );
        // away from the borderline, where the type is decided with margin
        fc.pre(Math.abs(maxRe) > 1e-6 * norm && minAbs > 1e-6 * norm);
        const r = classifyEquilibrium(J);
        expect(r.stable).toBe(maxRe < 0);
      }),
      { seed: SEED + 3, numRuns: RUNS },
    );
  });
});

/**
 * Borderline calls. Node, focus and degenerate node are the regions of the trace–determinant
 * plane split by the parabola τ² = 4Δ (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section
 * 5.2); on it, star against degenerate node is the Jordan structure of J − λI (Horn and Johnson,
 * Matrix Analysis, 2nd ed., section 3.1). The expected quantities are closed forms:
 * discriminant/τ² = ((λ₁ − λ₂)/(λ₁ + λ₂))², and for J = λI + N, ‖S⁻¹NS‖_F/|λ|.
 */
interface BorderlineCase {
  name: string;
  J: Matrix2;
  scales?: [number, number];
  type: EquilibriumType;
  /** null: decided with margin; else the other type, the quantity and its closed-form value. */
  borderline: { other: EquilibriumType; quantity: "discriminant" | "jordan"; value: number } | null;
}

/** The quantities are formed from entries rounded once or twice: 1e-5 of a value of 1e-10 is far above that. */
const BORDERLINE_VALUE_REL_TOL = 1e-5;

const BORDERLINE_CASES: BorderlineCase[] = [
  // [[α, β], [−β, α]] has eigenvalues α ± iβ: −1 ± 1e-5 i, so discriminant/τ² = (2iβ/2α)² = −1e-10
  {
    name: "focus −1 ± 1e-5 i, canonical form",
    J: [
      [-1, 1e-5],
      [-1e-5, -1],
    ],
    type: "stable-focus",
    borderline: { other: "stable-node", quantity: "discriminant", value: -1e-10 },
  },
  // companion form of λ² + 2λ + (1 + 1e-10): the same eigenvalues, far from normal
  {
    name: "focus −1 ± 1e-5 i, companion form",
    J: [
      [0, 1],
      [-(1 + 1e-10), -2],
    ],
    type: "stable-focus",
    borderline: { other: "stable-node", quantity: "discriminant", value: -1e-10 },
  },
  // λ = −1 ± 1e-5: discriminant/τ² = (2e-5 / −2)² = 1e-10
  {
    name: "node −1 ± 1e-5, diagonal",
    J: [
      [-1 + 1e-5, 0],
      [0, -1 - 1e-5],
    ],
    type: "stable-node",
    borderline: { other: "stable-focus", quantity: "discriminant", value: 1e-10 },
  },
  {
    name: "node −1 ± 1e-5, triangular",
    J: [
      [-1 + 1e-5, 1],
      [0, -1 - 1e-5],
    ],
    type: "stable-node",
    borderline: { other: "stable-focus", quantity: "discriminant", value: 1e-10 },
  },
  // 1 ± 1e-3 i: discriminant/τ² = −1e-6, outside the band
  {
    name: "focus 1 ± 1e-3 i, decided",
    J: [
      [1, 1e-3],
      [-1e-3, 1],
    ],
    type: "unstable-focus",
    borderline: null,
  },
  // the Jordan block [[−1, 1], [0, −1]] with its second state in units 1e10 larger:
  // D B D⁻¹ for D = diag(1, 1e10) has coupling 1e-10, and the window of that state spans 1e10
  {
    name: "Jordan block, units 1e10 apart, window scales given",
    J: [
      [-1, 1e-10],
      [0, -1],
    ],
    scales: [1, 1e10],
    type: "stable-degenerate-node",
    borderline: null,
  },
  // the same matrix read as given: ‖N‖/|λ| = 1e-10, a degenerate node borderline with a star
  {
    name: "Jordan block, units 1e10 apart, read as given",
    J: [
      [-1, 1e-10],
      [0, -1],
    ],
    type: "stable-degenerate-node",
    borderline: { other: "stable-star", quantity: "jordan", value: 1e-10 },
  },
  // units 1e12 apart: as given the coupling is below rounding, so only the scales tell
  {
    name: "Jordan block, units 1e12 apart, window scales given",
    J: [
      [2, 1e-12],
      [0, 2],
    ],
    scales: [1, 1e12],
    type: "unstable-degenerate-node",
    borderline: null,
  },
  {
    name: "Jordan block, units 1e12 apart, read as given",
    J: [
      [2, 1e-12],
      [0, 2],
    ],
    type: "unstable-star",
    borderline: null,
  },
  // J = kI is a star in any units: D (kI) D⁻¹ = kI
  {
    name: "star, units 1e10 apart",
    J: [
      [-2, 0],
      [0, -2],
    ],
    scales: [1e-5, 1e5],
    type: "stable-star",
    borderline: null,
  },
];

describe("classifyEquilibrium on borderline and unit-scaled matrices", () => {
  for (const c of BORDERLINE_CASES) {
    it(`classifyEquilibrium(${JSON.stringify(c.J)}${c.scales ? `, ${JSON.stringify(c.scales)}` : ""}) is ${c.type}${c.borderline ? `, borderline with ${c.borderline.other}` : ""} (${c.name})`, () => {
      const r = classifyEquilibrium(c.J, c.scales);
      expect(r.type).toBe(c.type);
      expect(r.hyperbolic).toBe(true);
      if (!c.borderline) {
        expect(r.borderline).toBeNull();
        return;
      }
      expect(r.borderline).not.toBeNull();
      const b = r.borderline!;
      expect(b.between).toEqual([c.type, c.borderline.other]);
      expect(b.quantity).toBe(c.borderline.quantity);
      expect(Math.abs(b.value - c.borderline.value)).toBeLessThanOrEqual(
        BORDERLINE_VALUE_REL_TOL * Math.abs(c.borderline.value),
      );
      expect(Math.abs(b.value)).toBeLessThanOrEqual(b.tolerance);
    });
  }

  // the same Jordan block through the whole compile → Newton → classify path, the window in the
  // state's own units: x' = −x + 1e-10·y, y' = −y on [−1, 1] × [−1e10, 1e10]
  it("findEquilibria(x' = -x + 1e-10*y, y' = -y) on a window 1e10 wider in y finds a stable degenerate node", () => {
    const model = buildModel({
      equations: { x: "-x + 1e-10*y", y: "-y" },
      window: { x: [-1, 1], y: [-1e10, 1e10] },
    });
    const found = findEquilibria(model);
    expect(found).toHaveLength(1);
    expect(found[0].type).toBe("stable-degenerate-node");
    expect(found[0].borderline).toBeNull();
  });
});

/** T = [[1, p], [q, 1 + pq]] has determinant 1 and the exact inverse [[1 + pq, −p], [−q, 1]]. */
const small = fc.integer({ min: -3, max: 3 });
const similarity = fc.tuple(small, small);
/** A nonzero eigenvalue size on a grid, either sign. */
const rate = fc.integer({ min: 1, max: 1000 }).chain((k) => fc.constantFrom(k / 100, -k / 100));

function conjugate(A: Matrix2, p: number, q: number): Matrix2 {
  const T: Matrix2 = [
    [1, p],
    [q, 1 + p * q],
  ];
  const Ti: Matrix2 = [
    [1 + p * q, -p],
    [-q, 1],
  ];
  const mul = (X: Matrix2, Y: Matrix2): Matrix2 => [
    [X[0][0] * Y[0][0] + X[0][1] * Y[1][0], X[0][0] * Y[0][1] + X[0][1] * Y[1][1]],
    [X[1][0] * Y[0][0] + X[1][1] * Y[1][0], X[1][0] * Y[0][1] + X[1][1] * Y[1][1]],
  ];
  return mul(mul(T, A), Ti);
}

describe("classifyEquilibrium near the parabola τ² = 4Δ (seeded matrices T A T⁻¹ with known eigenvalues)", () => {
  // eigenvalues λ(1 ± δ) or λ(1 ± iδ): discriminant/τ² = ±δ², borderline exactly when δ² ≤ 1e-8;
  // δ = 10^-k keeps clear of the band's edge (δ² = 1e-8 is never drawn) and of the rounding floor
  it("classifyEquilibrium(T A T⁻¹) is A's node or focus, with discriminant/τ² = ±δ², borderline iff δ² ≤ 1e-8", () => {
    fc.assert(
      fc.property(
        rate,
        fc.constantFrom(1, 2, 3, 5),
        fc.boolean(),
        similarity,
        (lambda, k, complex, [p, q]) => {
          const delta = 10 ** -k;
          const A: Matrix2 = complex
            ? [
                [lambda, lambda * delta],
                [-lambda * delta, lambda],
              ]
            : [
                [lambda * (1 + delta), 0],
                [0, lambda * (1 - delta)],
              ];
          const r = classifyEquilibrium(conjugate(A, p, q));
          const side = lambda < 0 ? "stable" : "unstable";
          expect(r.type).toBe(`${side}-${complex ? "focus" : "node"}`);
          const expected = (complex ? -1 : 1) * delta * delta;
          if (delta * delta > 1e-8) {
            expect(r.borderline).toBeNull();
            return;
          }
          expect(r.borderline?.quantity).toBe("discriminant");
          expect(Math.abs(r.borderline!.value - expected)).toBeLessThanOrEqual(
            BORDERLINE_VALUE_REL_TOL * Math.abs(expected),
          );
        },
      ),
      { seed: SEED + 5, numRuns: RUNS },
    );
  });

  // A = [[λ, μ], [0, λ]]: J − λI = μ (T e₁)(e₂ᵀ T⁻¹), a rank-one matrix, so in scales S its
  // Frobenius norm is |μ| ‖S⁻¹ T e₁‖ ‖e₂ᵀ T⁻¹ S‖; with S = I here. λ = k/64 and μ = λ·2^-e keep
  // T A T⁻¹ exact in binary; 2^-30 (1 + q²) ≤ 9.4e-9 lies inside the band, 2^-8 far outside.
  const binaryRate = fc.integer({ min: 1, max: 640 }).chain((k) => fc.constantFrom(k / 64, -k / 64));
  it("classifyEquilibrium(T [[λ, μ], [0, λ]] T⁻¹) is a degenerate node with ‖J − λI‖/|λ| in closed form", () => {
    fc.assert(
      fc.property(binaryRate, fc.constantFrom(0, 4, 8, 30), similarity, (lambda, e, [p, q]) => {
        const mu = lambda * 2 ** -e;
        const r = classifyEquilibrium(
          conjugate(
            [
              [lambda, mu],
              [0, lambda],
            ],
            p,
            q,
          ),
        );
        const side = lambda < 0 ? "stable" : "unstable";
        expect(r.type).toBe(`${side}-degenerate-node`);
        const ratio = (Math.abs(mu) * Math.hypot(1, q) * Math.hypot(-q, 1)) / Math.abs(lambda);
        if (ratio > 1e-8) {
          expect(r.borderline).toBeNull();
          return;
        }
        expect(r.borderline?.between).toEqual([`${side}-degenerate-node`, `${side}-star`]);
        expect(Math.abs(r.borderline!.value - ratio)).toBeLessThanOrEqual(BORDERLINE_VALUE_REL_TOL * ratio);
      }),
      { seed: SEED + 6, numRuns: RUNS },
    );
  });
});

describe("classifyEquilibrium is invariant under a change of units", () => {
  // rescaling state k by d_k maps J to D J D⁻¹ and the window widths w to D w; in window units
  // nothing changes, so neither may the type nor its borderline (HSD 3rd ed., section 3.4,
  // changing coordinates). Random entries, and matrices on the parabola τ² = 4Δ and beside it.
  const scales = fc.tuple(fc.integer({ min: -3, max: 3 }), fc.integer({ min: -3, max: 3 }));
  const units = fc.tuple(fc.integer({ min: -10, max: 10 }), fc.integer({ min: -10, max: 10 }));
  const nearParabola = fc
    .tuple(
      rate,
      fc.constantFrom(0, 1e-5, 1e-3),
      fc.constantFrom(-1, 0, 1),
      fc.constantFrom(0, 1e-10, 1),
      similarity,
    )
    .map(([lambda, delta, kind, coupling, [p, q]]) =>
      conjugate(
        kind === 0
          ? [
              [lambda, coupling * lambda],
              [0, lambda],
            ]
          : [
              [lambda * (1 + delta), kind * lambda * delta],
              [-lambda * delta, lambda * (1 - delta)],
            ],
        p,
        q,
      ),
    );
  for (const [name, matrices] of [
    ["random entries", matrix],
    ["near τ² = 4Δ", nearParabola],
  ] as const) {
    it(`classifyEquilibrium(D J D⁻¹, D w) has the type and borderline of classifyEquilibrium(J, w) (${name})`, () => {
      fc.assert(
        fc.property(matrices, scales, units, (J, [w0, w1], [k0, k1]) => {
          const w: [number, number] = [10 ** w0, 10 ** w1];
          const d = [10 ** k0, 10 ** k1];
          const scaled: Matrix2 = [
            [J[0][0], (J[0][1] * d[0]) / d[1]],
            [(J[1][0] * d[1]) / d[0], J[1][1]],
          ];
          const r = classifyEquilibrium(J, w);
          const s = classifyEquilibrium(scaled, [w[0] * d[0], w[1] * d[1]]);
          expect(s.type).toBe(r.type);
          expect(s.borderline?.between).toEqual(r.borderline?.between);
          if (r.borderline)
            expect(Math.abs(s.borderline!.value - r.borderline.value)).toBeLessThanOrEqual(
              BORDERLINE_VALUE_REL_TOL * Math.abs(r.borderline.value),
            );
        }),
        { seed: SEED + 4, numRuns: RUNS },
      );
    });
  }

  it("classifyEquilibrium keeps a stable focus when one state is in 1e5 units", () => {
    // the canonical focus [[−1, 2], [−2, −1]] with its second state rescaled by 1e-5
    const r = classifyEquilibrium([
      [-1, 2e5],
      [-2e-5, -1],
    ]);
    expect(r.type).toBe("stable-focus");
    expectEigenvalues(r.eigenvalues, pair(-1, 2));
  });
});

/**
 * Types are invariant under J → sJ for s > 0: the trace–determinant plane's regions are cones
 * (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 5.2). Scales near the ends of double
 * range must not change the call; a Jacobian that is not finite decides nothing.
 */
describe("classifyEquilibrium at the ends of double range", () => {
  const cases: { J: number[][]; type: string }[] = [
    {
      J: [
        [-1, 0],
        [0, -2],
      ],
      type: "stable-node",
    },
    {
      J: [
        [1, 0],
        [0, -2],
      ],
      type: "saddle",
    },
    {
      J: [
        [-0.1, -1],
        [1, -0.1],
      ],
      type: "stable-focus",
    },
    {
      J: [
        [0.5, 2],
        [-1, 0.3],
      ],
      type: "unstable-focus",
    },
  ];
  for (const { J, type } of cases)
    for (const s of [1e-300, 1e-160, 1e160, 1e300]) {
      it(`classifyEquilibrium(${s} · ${JSON.stringify(J)}) is ${type}, with eigenvalues ${s} times J's`, () => {
        const scaled = J.map((row) => row.map((v) => v * s));
        const result = classifyEquilibrium(scaled);
        const plain = classifyEquilibrium(J);
        expect(result.type).toBe(type);
        expect(result.hyperbolic).toBe(true);
        expect(result.undecided).toBeUndefined();
        for (let k = 0; k < 2; k++) {
          expect(result.eigenvalues[k].re / s).toBeCloseTo(plain.eigenvalues[k].re, 12);
          expect(result.eigenvalues[k].im / s).toBeCloseTo(plain.eigenvalues[k].im, 12);
        }
        expect(result.trace / s).toBeCloseTo(plain.trace, 12);
      });
    }

  it.each([NaN, Infinity, -Infinity])(
    "classifyEquilibrium(a Jacobian holding %s) is undecided: non-hyperbolic, stable null, never a hyperbolic type",
    (bad) => {
      const result = classifyEquilibrium([
        [-1, bad],
        [0, -2],
      ]);
      expect(result.undecided).toBe("jacobian-not-finite");
      expect(result.hyperbolic).toBe(false);
      expect(result.stable).toBeNull();
    },
  );
});

import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { findEquilibria, type EquilibriumResult } from "../../../src/analysis/phase/equilibria.js";
import { ROOT_RESIDUAL_TOL } from "../../../src/analysis/constants.js";
import type { Complex, EquilibriumType } from "../../../src/analysis/phase/stability.js";
import { runPipeline } from "../../../src/pipeline.js";
import { mathjsEigenvalues, pairDistance } from "../../fixtures/eigen.js";
import { EXAMPLE_IDS, exampleField, SPECS_DIR } from "../../fixtures/examples.js";
import { buildModel } from "../../fixtures/models.js";

/** Newton polishes to full precision on these O(1) hand-worked cases; 1e-12 leaves ~4 digits. */
const POINT_TOL = 1e-12;
const EIGEN_TOL = 1e-12;
/** Relative agreement with a closed form when states span several orders of magnitude. */
const CLOSED_FORM_REL_TOL = 1e-10;
/** Closed-form Jacobian eigenvalues, by an independent solver (mathjs), relative to |λ|max. */
const EIGEN_REL_TOL = 1e-10;

const real = (...values: number[]): Complex[] => values.map((re) => ({ re, im: 0 }));

interface Expected {
  point: Record<string, number>;
  type: EquilibriumType;
  eigenvalues: Complex[];
  boundaryStates: string[];
  eigenvectors?: number[][];
}

function expectEquilibria(found: EquilibriumResult[], expected: Expected[]) {
  expect(found.map((e) => e.id)).toEqual(expected.map((_, k) => `E${k + 1}`));
  found.forEach((e, k) => {
    const want = expected[k];
    for (const [name, value] of Object.entries(want.point)) {
      expect(Math.abs(e.point[name] - value), `${e.id}.${name}`).toBeLessThanOrEqual(POINT_TOL);
    }
    expect(e.type, e.id).toBe(want.type);
    expect(e.eigenvalues).toHaveLength(2);
    e.eigenvalues.forEach((l, j) => {
      expect(Math.abs(l.re - want.eigenvalues[j].re), `${e.id} λ${j + 1}`).toBeLessThanOrEqual(EIGEN_TOL);
      expect(Math.abs(l.im - want.eigenvalues[j].im), `${e.id} λ${j + 1}`).toBeLessThanOrEqual(EIGEN_TOL);
    });
    expect(e.boundaryStates, e.id).toEqual(want.boundaryStates);
    expect(e.onBoundary, e.id).toBe(want.boundaryStates.length > 0);
    want.eigenvectors?.forEach((v, j) => {
      expect(Math.abs(e.eigenvectors[j][0] - v[0]), `${e.id} v${j + 1}`).toBeLessThanOrEqual(EIGEN_TOL);
      expect(Math.abs(e.eigenvectors[j][1] - v[1]), `${e.id} v${j + 1}`).toBeLessThanOrEqual(EIGEN_TOL);
    });
  });
}

describe("findEquilibria on textbook models", () => {
  // Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4 (rabbits versus sheep):
  // J = [[3 − 2x − 2y, −2x], [−y, 2 − x − 2y]].
  //   (0,0): J = diag(3, 2), unstable node.   (0,2): J = [[−1, 0], [−2, −2]], stable node.
  //   (1,1): J = [[−1, −2], [−1, −1]], τ = −2, Δ = −1, λ = −1 ± √2, saddle.
  //   (3,0): J = [[−3, −6], [0, −1]], stable node.
  // Eigenvectors worked by hand from (J − λI)v = 0, scaled to unit length, largest component positive.
  const competition = {
    equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
    window: { x: [0, 4], y: [0, 4] } as Record<string, [number, number]>,
  };
  const r2 = Math.SQRT2;
  const r3 = Math.sqrt(3);

  it("findEquilibria(competition) finds four equilibria, sorted by x then y", () => {
    const found = findEquilibria(buildModel(competition));
    expectEquilibria(found, [
      {
        point: { x: 0, y: 0 },
        type: "unstable-node",
        eigenvalues: real(2, 3),
        boundaryStates: ["x", "y"],
        eigenvectors: [
          [0, 1],
          [1, 0],
        ],
      },
      {
        point: { x: 0, y: 2 },
        type: "stable-node",
        eigenvalues: real(-2, -1),
        boundaryStates: ["x"],
        eigenvectors: [
          [0, 1],
          [-1 / Math.sqrt(5), 2 / Math.sqrt(5)],
        ],
      },
      {
        point: { x: 1, y: 1 },
        type: "saddle",
        eigenvalues: real(-1 - r2, -1 + r2),
        boundaryStates: [],
        eigenvectors: [
          [r2 / r3, 1 / r3],
          [r2 / r3, -1 / r3],
        ],
      },
      {
        point: { x: 3, y: 0 },
        type: "stable-node",
        eigenvalues: real(-3, -1),
        boundaryStates: ["y"],
        eigenvectors: [
          [1, 0],
          [3 / Math.sqrt(10), -1 / Math.sqrt(10)],
        ],
      },
    ]);
  });

  it("findEquilibria(competition) reports the hand-derived Jacobians, traces and determinants", () => {
    const found = findEquilibria(buildModel(competition));
    const jacobians = [
      [
        [3, 0],
        [0, 2],
      ],
      [
        [-1, 0],
        [-2, -2],
      ],
      [
        [-1, -2],
        [-1, -1],
      ],
      [
        [-3, -6],
        [0, -1],
      ],
    ];
    const traces = [5, -3, -2, -4];
    const determinants = [6, 2, -1, 3];
    found.forEach((e, k) => {
      e.jacobian
        .flat()
        .forEach((v, j) => expect(Math.abs(v - jacobians[k].flat()[j])).toBeLessThanOrEqual(POINT_TOL));
      expect(Math.abs(e.trace - traces[k])).toBeLessThanOrEqual(POINT_TOL);
      expect(Math.abs(e.determinant - determinants[k])).toBeLessThanOrEqual(POINT_TOL);
      expect(e.hyperbolic).toBe(true);
      expect(e.stable).toBe(e.type === "stable-node");
    });
  });

  it("findEquilibria(competition) gives the same result twice (determinism)", () => {
    // common practice: the same spec must give identical results
    const model = buildModel(competition);
    expect(JSON.stringify(findEquilibria(model))).toBe(JSON.stringify(findEquilibria(model)));
  });

  // Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.3 (example 6.3.1):
  // J = [[−1 + 3x², 0], [0, −2]]; (0,0) stable node (λ = −2, −1); (±1,0) saddles (λ = −2, 2).
  it("findEquilibria(x' = -x + x^3, y' = -2y) finds a stable node between two saddles", () => {
    const found = findEquilibria(
      buildModel({ equations: { x: "-x + x^3", y: "-2*y" }, window: { x: [-2, 2], y: [-2, 2] } }),
    );
    expectEquilibria(found, [
      {
        point: { x: -1, y: 0 },
        type: "saddle",
        eigenvalues: real(-2, 2),
        boundaryStates: [],
        eigenvectors: [
          [0, 1],
          [1, 0],
        ],
      },
      {
        point: { x: 0, y: 0 },
        type: "stable-node",
        eigenvalues: real(-2, -1),
        boundaryStates: [],
        eigenvectors: [
          [0, 1],
          [1, 0],
        ],
      },
      {
        point: { x: 1, y: 0 },
        type: "saddle",
        eigenvalues: real(-2, 2),
        boundaryStates: [],
        eigenvectors: [
          [0, 1],
          [1, 0],
        ],
      },
    ]);
  });

  it("findEquilibria finds only the equilibria inside the window", () => {
    // the same model on [0, 2] × [-2, 2] keeps (0,0) and (1,0) and drops (−1,0); (0,0) is now on x's bound
    const found = findEquilibria(
      buildModel({ equations: { x: "-x + x^3", y: "-2*y" }, window: { x: [0, 2], y: [-2, 2] } }),
    );
    expect(found.map((e) => e.point)).toEqual([
      { x: 0, y: 0 },
      { x: 1, y: 0 },
    ]);
    expect(found.map((e) => e.boundaryStates)).toEqual([["x"], []]);
  });
});

describe("findEquilibria when the states differ by five orders of magnitude", () => {
  // Predator–prey with logistic prey, x' = r x (1 − x/K) − a x y, y' = b x y − m y (Murray,
  // Mathematical Biology I, 3rd ed., section 3.3, realistic predator–prey models; section number
  // from memory). Closed form, solved by hand: (0,0); (K,0); x* = m/b, y* = (r/a)(1 − m/(bK)).
  // Prey counted in 1e5 units, predators around 1. Jacobians worked by hand:
  //   (0,0): diag(r, −m);  (K,0): [[−r, −aK], [0, bK − m]];  (x*,y*): [[−r x*/K, −a x*], [b y*, 0]].
  const p = { r: 0.5, K: 1e5, a: 0.5, b: 1e-5, m: 0.3 };
  const model = buildModel({
    equations: { x: "r*x*(1 - x/K) - a*x*y", y: "b*x*y - m*y" },
    window: { x: [0, 2e5], y: [0, 2] },
    parameters: p,
  });
  const xs = p.m / p.b;
  const ys = (p.r / p.a) * (1 - xs / p.K);
  const found = findEquilibria(model);

  it("findEquilibria(scaled predator-prey) finds the three equilibria", () => {
    expect(found.map((e) => e.id)).toEqual(["E1", "E2", "E3"]);
    expect(found[0].point).toEqual({ x: 0, y: 0 });
    expect(Math.abs(found[1].point.x - xs) / xs).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    expect(Math.abs(found[1].point.y - ys) / ys).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    expect(found[2].point).toEqual({ x: p.K, y: 0 });
    expect(found.map((e) => e.boundaryStates)).toEqual([["x", "y"], [], ["y"]]);
  });

  it("findEquilibria(scaled predator-prey) classifies as with O(1) units", () => {
    expect(found.map((e) => e.type)).toEqual(["saddle", "stable-focus", "saddle"]);
    const closedForm: number[][][] = [
      [
        [p.r, 0],
        [0, -p.m],
      ],
      [
        [(-p.r * xs) / p.K, -p.a * xs],
        [p.b * ys, 0],
      ],
      [
        [-p.r, -p.a * p.K],
        [0, p.b * p.K - p.m],
      ],
    ];
    found.forEach((e, k) => {
      const theirs = mathjsEigenvalues(closedForm[k]);
      const size = Math.max(...theirs.map((l) => Math.hypot(l.re, l.im)));
      expect(pairDistance(e.eigenvalues, theirs)).toBeLessThanOrEqual(EIGEN_REL_TOL * size);
    });
  });
});

/** Real roots of a polynomial (coefficients in ascending order): companion matrix by mathjs, then Newton. */
function realRoots(coefficients: number[]): number[] {
  const n = coefficients.length - 1;
  const lead = coefficients[n];
  const companion = Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j): number => (i === j + 1 ? 1 : 0)),
  );
  for (let i = 0; i < n; i++) companion[i][n - 1] = -coefficients[i] / lead;
  const value = (v: number) => coefficients.reduceRight((acc, c) => acc * v + c, 0);
  const slope = (v: number) => coefficients.slice(1).reduceRight((acc, c, k) => acc * v + (k + 1) * c, 0);
  return mathjsEigenvalues(companion)
    .filter((l) => Math.abs(l.im) <= 1e-6 * Math.max(1, Math.abs(l.re)))
    .map((l) => {
      let v = l.re;
      for (let it = 0; it < 20; it++) v -= value(v) / slope(v);
      return v;
    })
    .sort((u, v) => u - v);
}

function polyMultiply(p: number[], q: number[]): number[] {
  const out = new Array(p.length + q.length - 1).fill(0);
  p.forEach((a, i) => q.forEach((b, j) => (out[i + j] += a * b)));
  return out;
}

describe("example specs run end to end", () => {
  const dir = SPECS_DIR;
  const files = EXAMPLE_IDS.map((id) => `${id}.json`);

  it("specs/ holds the example specs", () => {
    expect(files).toEqual(expect.arrayContaining(["grazer-forage.json", "reservoir-competition.json"]));
  });

  // one full run per example, shared by the tests below (the same spec text gives the same results)
  const runs = new Map<string, ReturnType<typeof runPipeline>>();
  const pipelineOn = (file: string, text: string) => {
    if (!runs.has(file)) runs.set(file, runPipeline(text));
    return runs.get(file)!;
  };

  for (const file of files) {
    // tier-two invariants, common practice: each reported equilibrium is a root inside the window
    it(`runPipeline(${file}) succeeds with no warning and every equilibrium is a root`, () => {
      const out = pipelineOn(file, readFileSync(join(dir, file), "utf8"));
      if (!out.ok) throw new Error(out.issues.map((i) => i.message).join("; "));
      const { model, results } = out.value;
      expect(results.diagnostics.filter((d) => d.severity === "warning")).toEqual([]);
      expect(results.equilibria.length).toBeGreaterThan(0);
      for (const e of results.equilibria) {
        const x = model.stateNames.map((n) => e.point[n]);
        model.stateNames.forEach((n, k) => {
          expect(x[k]).toBeGreaterThanOrEqual(model.spec.window[n][0]);
          expect(x[k]).toBeLessThanOrEqual(model.spec.window[n][1]);
        });
        expect(e.residual).toBeLessThan(ROOT_RESIDUAL_TOL);
        // the field typed out by hand from the spec, not keel's compiled right-hand side
        const f = exampleField(file.replace(/\.json$/, ""))(x[0], x[1]);
        const size = Math.max(...x.map(Math.abs), 1);
        for (const v of f) expect(Math.abs(v)).toBeLessThanOrEqual(1e-9 * size);
      }
    });
  }

  it("runPipeline(reservoir-competition) has one stable equilibrium, interior, at the closed form", () => {
    // Lotka–Volterra competition (Murray, Mathematical Biology I, 3rd ed., section 3.5):
    // N* = (K1 − a12 K2)/(1 − a12 a21), S* = (K2 − a21 K1)/(1 − a12 a21); with a12 < K1/K2 and
    // a21 < K2/K1 it is the stable coexistence state, and (0,0), (K1,0), (0,K2) are the others.
    const text = readFileSync(join(dir, "reservoir-competition.json"), "utf8");
    const raw = JSON.parse(text) as { parameters: { name: string; value: number }[] };
    const q = Object.fromEntries(raw.parameters.map((p) => [p.name, p.value]));
    const out = pipelineOn("reservoir-competition.json", text);
    if (!out.ok) throw new Error("reservoir-competition did not parse");
    const equilibria = out.value.results.equilibria;
    const stable = equilibria.filter((e) => e.stable === true);
    expect(stable).toHaveLength(1);
    const [e] = stable;
    const D = 1 - q.a12 * q.a21;
    const Ns = (q.K1 - q.a12 * q.K2) / D;
    const Ss = (q.K2 - q.a21 * q.K1) / D;
    expect(e.onBoundary).toBe(false);
    expect(Math.abs(e.point.N - Ns) / Ns).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    expect(Math.abs(e.point.S - Ss) / Ss).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    // Jacobian at the coexistence state, by hand: [[−r1 N*/K1, −r1 a12 N*/K1], [−r2 a21 S*/K2, −r2 S*/K2]]
    const J = [
      [(-q.r1 * Ns) / q.K1, (-q.r1 * q.a12 * Ns) / q.K1],
      [(-q.r2 * q.a21 * Ss) / q.K2, (-q.r2 * Ss) / q.K2],
    ];
    const theirs = mathjsEigenvalues(J);
    const size = Math.max(...theirs.map((l) => Math.hypot(l.re, l.im)));
    expect(pairDistance(e.eigenvalues, theirs)).toBeLessThanOrEqual(EIGEN_REL_TOL * size);
    // the boundary equilibria
    const rest = equilibria.filter((x) => x !== e).map((x) => x.point);
    expect(rest).toEqual(
      expect.arrayContaining([
        { N: 0, S: 0 },
        { N: q.K1, S: 0 },
        { N: 0, S: q.K2 },
      ]),
    );
    expect(equilibria).toHaveLength(4);
  });

  it("runPipeline(grazer-forage) has exactly two stable equilibria, at roots of the nullcline quintic", () => {
    // V' = 0 off V = 0 gives G = r(1 − V/K)(h² + V²)/(cV); G' = 0 off G = 0 gives
    // G = (y c V²/(h² + V²) − m)/q. Equating them (common practice: intersecting nullclines):
    //   q r (1 − V/K)(h² + V²)² − c V ((c y − m) V² − m h²) = 0,
    // a quintic whose real roots with G > 0 in the window are the interior equilibria.
    const text = readFileSync(join(dir, "grazer-forage.json"), "utf8");
    const raw = JSON.parse(text) as {
      parameters: { name: string; value: number }[];
      window: Record<string, [number, number]>;
    };
    const q = Object.fromEntries(raw.parameters.map((p) => [p.name, p.value]));
    const A = q.h * q.h;
    const left = polyMultiply([q.q * q.r, (-q.q * q.r) / q.K], [A * A, 0, 2 * A, 0, 1]);
    const right = [0, -q.c * q.m * A, 0, q.c * (q.c * q.y - q.m)];
    const quintic = left.map((c, k) => c - (right[k] ?? 0));
    const grazersAt = (V: number) => ((q.y * q.c * V * V) / (A + V * V) - q.m) / q.q;
    const [vlo, vhi] = raw.window.V;
    const [glo, ghi] = raw.window.G;
    const interior = realRoots(quintic)
      .filter((V) => V > vlo && V < vhi)
      .map((V) => ({ V, G: grazersAt(V) }))
      .filter((p) => p.G > glo && p.G < ghi);

    const out = pipelineOn("grazer-forage.json", text);
    if (!out.ok) throw new Error("grazer-forage did not parse");
    const equilibria = out.value.results.equilibria;
    const found = equilibria.filter((e) => !e.onBoundary);
    expect(found).toHaveLength(interior.length);
    found.forEach((e, k) => {
      expect(Math.abs(e.point.V - interior[k].V) / interior[k].V).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
      expect(Math.abs(e.point.G - interior[k].G) / interior[k].G).toBeLessThanOrEqual(CLOSED_FORM_REL_TOL);
    });
    // V = 0 is invariant and G' = −G(m + qG) there, so (0,0) is the only equilibrium on it; G = 0 adds (K,0)
    expect(equilibria.filter((e) => e.onBoundary).map((e) => e.point)).toEqual([
      { V: 0, G: 0 },
      { V: q.K, G: 0 },
    ]);
    expect(equilibria.filter((e) => e.stable === true)).toHaveLength(2);
  });
});

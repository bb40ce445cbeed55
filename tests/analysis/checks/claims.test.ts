/**
 * checkClaims (src/analysis/checks/claims.ts) through the whole analysis, on reference models whose
 * answers are published: each claim kind once supported and once contradicted, and undecided
 * where the mathematics does not decide.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline } from "../../../src/pipeline.js";
import { formatIssues } from "../../../src/diagnostics/format.js";
import type { ClaimEvidence, ClaimResult } from "../../../src/analysis/checks/claims.js";

/** A small basin map: these claims do not read the basins, and the default map is the slow part. */
const FAST_ANALYSIS = { basins: { resolution: 64, coarse: 16 } };

interface StateRange {
  name: string;
  min: number;
  max: number;
}

function spec(parts: {
  id: string;
  states: StateRange[];
  equations: Record<string, string>;
  parameters?: object[];
  scenarios?: object[];
  claims: object[];
  analysis?: object;
}): object {
  return {
    keel: 1,
    id: parts.id,
    title: `${parts.id} (reference model)`,
    time: { unit: "time" },
    states: parts.states,
    parameters: parts.parameters ?? [],
    equations: parts.equations,
    scenarios: parts.scenarios ?? [],
    claims: parts.claims,
    analysis: { ...FAST_ANALYSIS, ...parts.analysis },
  };
}

/** The claim verdicts of a spec, by claim id; throws with every issue when the spec is refused. */
function checkSpec(value: object): Map<string, ClaimResult> {
  const out = runPipeline(JSON.stringify(value));
  if (!out.ok) throw new Error(formatIssues(out.issues));
  return new Map(out.value.results.claims.map((c) => [c.id, c]));
}

function verdictOf(claims: Map<string, ClaimResult>, id: string): ClaimResult {
  const c = claims.get(id);
  if (!c) throw new Error(`no verdict for claim ${id}`);
  return c;
}

/** The claim's evidence, which must be of this kind. */
function evidenceOf<K extends ClaimEvidence["kind"]>(
  c: ClaimResult,
  kind: K,
): Extract<ClaimEvidence, { kind: K }> {
  expect(c.evidence.kind, `${c.id} evidence`).toBe(kind);
  return c.evidence as Extract<ClaimEvidence, { kind: K }>;
}

/**
 * Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4 (rabbits versus sheep):
 * x' = x(3 − x − 2y), y' = y(2 − x − y) has four equilibria, (0,0) an unstable node, (3,0) and
 * (0,2) stable nodes, (1,1) a saddle; the saddle's stable manifold splits the quadrant into the
 * basins of (3,0) and (0,2). (2.5, 0.5) lies below it (the stable eigenvector at (1,1) has slope
 * 1/√2, so the separatrix is near y ≈ 2 at x = 2.5): it goes to (3,0).
 */
describe("checkClaims on the competition model (Strogatz 6.4)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    claims = checkSpec(
      spec({
        id: "strogatz-competition",
        states: [
          { name: "x", min: 0, max: 3.5 },
          { name: "y", min: 0, max: 3.5 },
        ],
        equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
        scenarios: [{ name: "sheep-few", initial: { x: 2.5, y: 0.5 }, horizon: 60 }],
        claims: [
          { id: "four", kind: "equilibrium-count", count: 4 },
          { id: "three", kind: "equilibrium-count", count: 3 },
          { id: "two-stable", kind: "equilibrium-count", count: 2, stableOnly: true },
          { id: "saddle-at-1-1", kind: "equilibrium-type", near: { x: 1, y: 1 }, type: "saddle" },
          { id: "node-at-1-1", kind: "equilibrium-type", near: { x: 1, y: 1 }, type: "stable-node" },
          {
            id: "to-3-0",
            kind: "scenario-fate",
            scenario: "sheep-few",
            reaches: "equilibrium",
            near: { x: 3, y: 0 },
          },
          {
            id: "to-0-2",
            kind: "scenario-fate",
            scenario: "sheep-few",
            reaches: "equilibrium",
            near: { x: 0, y: 2 },
          },
        ],
      }),
    );
  });

  it("checkClaims(competition) supports a count of 4 equilibria and contradicts a count of 3", () => {
    expect(verdictOf(claims, "four")).toMatchObject({
      verdict: "supported",
      evidence: { kind: "count", claimed: 4, found: 4 },
      where: { section: "equilibria" },
    });
    expect(verdictOf(claims, "three")).toMatchObject({
      verdict: "contradicted",
      evidence: { kind: "count", claimed: 3, found: 4 },
    });
  });

  it("checkClaims(competition) supports two stable equilibria", () => {
    const twoStable = verdictOf(claims, "two-stable");
    expect(twoStable.verdict).toBe("supported");
    expect(evidenceOf(twoStable, "count")).toMatchObject({ stableOnly: true, found: 2 });
  });

  it("checkClaims(competition) supports a saddle near (1,1) and contradicts a stable node there", () => {
    const saddle = verdictOf(claims, "saddle-at-1-1");
    expect(saddle.verdict).toBe("supported");
    // at (1,1) the Jacobian is [[-1, -2], [-1, -1]]: trace -2, determinant -1 (Strogatz 6.4)
    const found = evidenceOf(saddle, "type");
    expect(found.trace).toBeCloseTo(-2, 9);
    expect(found.determinant).toBeCloseTo(-1, 9);
    expect(saddle.where).toEqual({ section: "equilibria", equilibrium: found.equilibrium });
    const node = verdictOf(claims, "node-at-1-1");
    expect(node.verdict).toBe("contradicted");
    expect(evidenceOf(node, "type")).toMatchObject({
      type: "saddle",
      claimedType: "stable-node",
      matches: false,
      hyperbolic: true,
    });
  });

  it("checkClaims(competition) supports that (2.5, 0.5) reaches (3,0) and contradicts that it reaches (0,2)", () => {
    const right = verdictOf(claims, "to-3-0");
    expect(right.verdict).toBe("supported");
    expect(right.where).toEqual({ section: "summary", scenario: "sheep-few" });
    expect(evidenceOf(right, "fate-near").point.x).toBeCloseTo(3, 9);
    const wrong = verdictOf(claims, "to-0-2");
    expect(wrong.verdict).toBe("contradicted");
    // the distance to the claimed point is that of (3,0) from (0,2), scaled by the window: max(3, 2)/3.5
    expect(evidenceOf(wrong, "fate-near").distance).toBeCloseTo(3 / 3.5, 6);
  });
});

/**
 * Hirsch, Smale and Devaney, Differential Equations, Dynamical Systems, and an Introduction to
 * Chaos, 3rd ed., chapter 3: x' = y, y' = −x has a center at the origin (eigenvalues ±i). The
 * linearisation cannot tell a center from a weak focus, so a claim of a focus is undecided.
 */
describe("checkClaims on the linear center (Hirsch–Smale–Devaney ch. 3)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    claims = checkSpec(
      spec({
        id: "linear-center",
        states: [
          { name: "x", min: -1, max: 1 },
          { name: "y", min: -1, max: 1 },
        ],
        equations: { x: "y", y: "-x" },
        claims: [
          { id: "focus-at-origin", kind: "equilibrium-type", near: { x: 0, y: 0 }, type: "stable-focus" },
        ],
      }),
    );
  });

  it("checkClaims(center) leaves a stable-focus claim at the origin undecided", () => {
    const c = verdictOf(claims, "focus-at-origin");
    expect(c.verdict).toBe("undecided");
    const e = evidenceOf(c, "type");
    expect([e.matches, e.hyperbolic]).toEqual([false, false]);
    expect(e.trace).toBeCloseTo(0, 12);
    expect(e.determinant).toBeCloseTo(1, 12);
  });
});

/**
 * x' = −x + 1e-5·y, y' = −1e-5·x − y is the canonical form [[α, β], [−β, α]] with eigenvalues
 * α ± iβ = −1 ± 1e-5 i (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 5.2): a stable
 * focus a hair from the node region (discriminant/trace² = −β²/α² = −1e-10). Its stability is
 * decided; node against focus, and the degenerate node between them, are not.
 */
describe("checkClaims on a borderline focus, eigenvalues −1 ± 1e-5 i (Strogatz 5.2)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    const near = { x: 0, y: 0 };
    claims = checkSpec(
      spec({
        id: "borderline-focus",
        states: [
          { name: "x", min: -1, max: 1 },
          { name: "y", min: -1, max: 1 },
        ],
        equations: { x: "-x + 1e-5*y", y: "-1e-5*x - y" },
        claims: [
          { id: "focus", kind: "equilibrium-type", near, type: "stable-focus" },
          { id: "node", kind: "equilibrium-type", near, type: "stable-node" },
          { id: "degenerate", kind: "equilibrium-type", near, type: "stable-degenerate-node" },
          { id: "saddle", kind: "equilibrium-type", near, type: "saddle" },
          { id: "stable", kind: "equilibrium-type", near, type: "stable" },
        ],
      }),
    );
  });

  it("checkClaims(borderline focus) leaves focus, node and degenerate node undecided, with the evidence", () => {
    for (const id of ["focus", "node", "degenerate"]) {
      const c = verdictOf(claims, id);
      expect(c.verdict, id).toBe("undecided");
      const b = evidenceOf(c, "type").borderline;
      expect(b?.between).toEqual(["stable-focus", "stable-node"]);
      expect(b!.value).toBeCloseTo(-1e-10, 15);
    }
  });

  it("checkClaims(borderline focus) still contradicts a saddle and supports 'stable'", () => {
    expect(verdictOf(claims, "saddle").verdict).toBe("contradicted");
    expect(verdictOf(claims, "stable").verdict).toBe("supported");
  });
});

/**
 * van der Pol's equation x'' − μ(1 − x²)x' + x = 0 with μ = 1 has one stable limit cycle, which
 * attracts every orbit but the origin (Liénard's theorem: Strogatz, Nonlinear Dynamics and
 * Chaos, 2nd ed., section 7.4); the origin is an unstable focus.
 */
describe("checkClaims on the van der Pol oscillator, mu = 1 (Strogatz 7.4)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    claims = checkSpec(
      spec({
        id: "van-der-pol",
        states: [
          { name: "x", min: -4, max: 4 },
          { name: "y", min: -4, max: 4 },
        ],
        parameters: [{ name: "mu", value: 1 }],
        equations: { x: "y", y: "mu*(1 - x^2)*y - x" },
        scenarios: [{ name: "small-start", initial: { x: 0.5, y: 0 }, horizon: 100 }],
        claims: [
          { id: "reaches-cycle", kind: "scenario-fate", scenario: "small-start", reaches: "cycle" },
          {
            id: "reaches-origin",
            kind: "scenario-fate",
            scenario: "small-start",
            reaches: "equilibrium",
            near: { x: 0, y: 0 },
          },
        ],
      }),
    );
  });

  it("checkClaims(van der Pol) supports that a start near the origin settles on the cycle", () => {
    const c = verdictOf(claims, "reaches-cycle");
    expect(c.verdict).toBe("supported");
    expect(evidenceOf(c, "fate-cycle").scenario).toBe("small-start");
  });

  it("checkClaims(van der Pol) contradicts that the start converges to the origin", () => {
    const c = verdictOf(claims, "reaches-origin");
    expect(c.verdict).toBe("contradicted");
    expect(evidenceOf(c, "fate-other")).toMatchObject({ expected: "equilibrium", fate: "cycle" });
  });
});

/**
 * Lotka–Volterra competition, Murray, Mathematical Biology I, 3rd ed., section 3.5:
 * N' = r1 N (1 − (N + a12 S)/K1), S' = r2 S (1 − (S + a21 N)/K2). The coexistence equilibrium
 * N* = (K1 − a12 K2)/(1 − a12 a21), S* = (K2 − a21 K1)/(1 − a12 a21) is positive and stable
 * exactly when a12 < K1/K2 and a21 < K2/K1; at a12 = K1/K2 it meets (0, K2) (a transcritical
 * exchange of stability) and S alone wins beyond.
 */
const MURRAY = { r1: 1, r2: 1, K1: 100, K2: 80, a12: 1, a21: 0.5 };
const A12_THRESHOLD = MURRAY.K1 / MURRAY.K2; // 1.25
// the upper end stays below 1/a21 = 2, where the nullclines are parallel and the model degenerates
const A12_RANGE: [number, number] = [0.5, 1.8];
const A21_RANGE: [number, number] = [0.3, 1.5]; // crosses K2/K1 = 0.8

function murraySpec(
  id: string,
  ranges: Record<string, [number, number]>,
  claims: object[],
  analysis?: object,
): object {
  return spec({
    id,
    states: [
      { name: "N", min: 0, max: 120 },
      { name: "S", min: 0, max: 100 },
    ],
    parameters: Object.entries(MURRAY).map(([name, value]) => ({
      name,
      value,
      ...(ranges[name] ? { range: ranges[name] } : {}),
    })),
    equations: { N: "r1*N*(1 - (N + a12*S)/K1)", S: "r2*S*(1 - (S + a21*N)/K2)" },
    claims,
    analysis,
  });
}

/** Murray 3.5 in closed form: does a positive, stable coexistence equilibrium exist at these values? */
function coexistenceStable(p: typeof MURRAY): boolean {
  const d = 1 - p.a12 * p.a21;
  const n = (p.K1 - p.a12 * p.K2) / d;
  const s = (p.K2 - p.a21 * p.K1) / d;
  if (!(n > 0 && s > 0)) return false;
  // Jacobian at (n, s), where both brackets vanish
  const j11 = (-p.r1 * n) / p.K1,
    j12 = (-p.r1 * p.a12 * n) / p.K1;
  const j21 = (-p.r2 * p.a21 * s) / p.K2,
    j22 = (-p.r2 * s) / p.K2;
  return j11 + j22 < 0 && j11 * j22 - j12 * j21 > 0;
}

describe("checkClaims on Lotka–Volterra competition with a12 ranged (Murray 3.5)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    claims = checkSpec(
      murraySpec("murray-a12", { a12: A12_RANGE }, [
        { id: "a12-below", kind: "parameter-side", parameter: "a12", side: "below" },
        { id: "a12-above", kind: "parameter-side", parameter: "a12", side: "above" },
        { id: "a12-decides", kind: "condition-decides", condition: "a12 < K1/K2", attractor: "coexistence" },
        {
          id: "threshold-at-K1-over-K2",
          kind: "threshold-value",
          parameter: "a12",
          value: A12_THRESHOLD,
          tolerance: 1e-3,
        },
        {
          id: "threshold-10pc-off",
          kind: "threshold-value",
          parameter: "a12",
          value: 1.1 * A12_THRESHOLD,
          tolerance: 1e-2,
        },
        { id: "threshold-outside", kind: "threshold-value", parameter: "a12", value: 3, tolerance: 1e-2 },
      ]),
    );
  });

  it("checkClaims(Murray) supports a12 below its threshold K1/K2 and contradicts 'above'", () => {
    const below = verdictOf(claims, "a12-below");
    expect(below.verdict).toBe("supported");
    const side = evidenceOf(below, "side");
    expect(side.nominal).toBe(MURRAY.a12);
    expect(side.threshold.value).toBeCloseTo(A12_THRESHOLD, 6);
    // (1.25 − 1)/1.25, relative to a threshold away from zero
    expect(side.margin.form).toBe("relative");
    expect(side.margin.relative!).toBeCloseTo(0.2, 6);
    expect(side.margin.absolute).toBeCloseTo(0.25, 6);
    expect(below.where).toEqual({ section: "conditions", parameter: "a12" });
    expect(verdictOf(claims, "a12-above").verdict).toBe("contradicted");
  });

  it("checkClaims(Murray) supports 'a12 < K1/K2 decides coexistence' when only a12 varies", () => {
    const c = verdictOf(claims, "a12-decides");
    expect(c.verdict).toBe("supported");
    expect(evidenceOf(c, "condition-agrees").agreeing).toBeGreaterThan(0);
  });

  it("checkClaims(Murray) supports a threshold at K1/K2 within 1e-3 and contradicts one at 1.1·K1/K2 within 1e-2", () => {
    const at = verdictOf(claims, "threshold-at-K1-over-K2");
    expect(at.verdict).toBe("supported");
    expect(evidenceOf(at, "threshold-value").located.value).toBeCloseTo(A12_THRESHOLD, 6);
    const off = verdictOf(claims, "threshold-10pc-off");
    expect(off.verdict).toBe("contradicted");
    // |1.25 − 1.375| / 1.25
    expect(evidenceOf(off, "threshold-value").relativeDifference!).toBeCloseTo(0.1, 6);
    expect(evidenceOf(off, "threshold-value").form).toBe("relative");
  });

  it("checkClaims(Murray) leaves a threshold claimed outside the searched range undecided", () => {
    const c = verdictOf(claims, "threshold-outside");
    expect(c.verdict).toBe("undecided");
    expect(evidenceOf(c, "value-outside-range")).toMatchObject({ claimed: 3, range: A12_RANGE });
  });
});

describe("checkClaims on Lotka–Volterra competition with a12 and a21 ranged (Murray 3.5)", () => {
  let claims: Map<string, ClaimResult>;
  beforeAll(() => {
    claims = checkSpec(
      murraySpec(
        "murray-both",
        { a12: A12_RANGE, a21: A21_RANGE },
        [
          {
            id: "a12-decides",
            kind: "condition-decides",
            condition: "a12 < K1/K2",
            attractor: "coexistence",
          },
        ],
        { parameters: ["a12"] },
      ),
    );
  });

  it("checkClaims(Murray) contradicts 'a12 < K1/K2 decides coexistence' once a21 crosses K2/K1, with a true counterexample", () => {
    const c = verdictOf(claims, "a12-decides");
    expect(c.verdict).toBe("contradicted");
    const counter = evidenceOf(c, "counterexample");
    const stated = counter.values;
    expect(Object.keys(stated).sort()).toEqual(["a12", "a21"]);
    expect(stated.a12).toBeGreaterThanOrEqual(A12_RANGE[0]);
    expect(stated.a12).toBeLessThanOrEqual(A12_RANGE[1]);
    expect(stated.a21).toBeGreaterThanOrEqual(A21_RANGE[0]);
    expect(stated.a21).toBeLessThanOrEqual(A21_RANGE[1]);
    // recomputed from Murray's closed form at the stated values: the condition and the outcome disagree
    const at = { ...MURRAY, ...stated };
    const conditionHolds = at.a12 < at.K1 / at.K2;
    expect([counter.holds, counter.present]).toEqual([conditionHolds, !conditionHolds]);
    expect(coexistenceStable(at)).toBe(!conditionHolds);
    // the attractors found there agree with the closed form: coexistence present exactly when stable
    expect(counter.attractors.some((a) => a.kind === "equilibrium" && a.present.join() === "N,S")).toBe(
      coexistenceStable(at),
    );
  });
});

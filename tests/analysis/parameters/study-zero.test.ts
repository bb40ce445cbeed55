/**
 * Margins and claims where the threshold is zero: the Hopf normal form, whose Hopf point is μ = 0
 * exactly. No margin or claim may be a percentage of zero: no NaN or Infinity in results.json, no
 * "NaN %" in the dossier's words.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline } from "../../../src/pipeline.js";
import { serializeResults } from "../../../src/report/archive/serialize.js";
import { assembleDossierHtml } from "../../../src/report/assemble.js";
import {
  claimEvidenceWords,
  intervalCondition,
  marginStatement,
  stateTerms,
} from "../../../src/report/words/index.js";
import type { ClaimResult, ParameterStudyResult, Results } from "../../../src/analysis/types.js";
import type { NormalizedSpec } from "../../../src/spec/types.js";

/**
 * The Hopf normal form in Cartesian coordinates, x' = μx − y − x(x² + y²), y' = x + μy − y(x² + y²):
 * in polar form r' = μr − r³, θ' = 1 (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 8.2,
 * from memory). The origin is a stable focus for μ < 0 and an unstable one for μ > 0, inside a stable
 * cycle of radius √μ: a supercritical Hopf bifurcation at μ = 0 exactly.
 */
function hopfSpec(mu: number): string {
  return JSON.stringify({
    keel: 1,
    id: "hopf-normal-form",
    title: "Hopf normal form (invented scenario)",
    time: { unit: "s" },
    states: [
      { name: "x", min: -2, max: 2 },
      { name: "y", min: -2, max: 2 },
    ],
    parameters: [{ name: "mu", value: mu, unit: "1/s", range: [-1, 1], source: "invented for the test" }],
    equations: { x: "mu*x - y - x*(x^2 + y^2)", y: "x + mu*y - y*(x^2 + y^2)" },
    scenarios: [{ name: "near", initial: { x: 0.5, y: 0 }, horizon: 200 }],
    claims: [
      {
        id: "hopf-at-0",
        kind: "threshold-value",
        parameter: "mu",
        value: 0,
        tolerance: 0.01,
        threshold: "hopf",
      },
      { id: "hopf-at-0.05", kind: "threshold-value", parameter: "mu", value: 0.05, tolerance: 0.01 },
      // within the 0.02 a claimed 0 would be allowed, but a claimed value away from 0 is compared
      // relatively: 0.015 is 100 % off the located 0
      { id: "hopf-at-0.015", kind: "threshold-value", parameter: "mu", value: 0.015, tolerance: 0.01 },
      { id: "below", kind: "parameter-side", parameter: "mu", side: "below" },
    ],
    analysis: { basins: { resolution: 32, coarse: 8 }, parameters: ["mu"] },
  });
}

const BAD_WORDS = /\bNaN\b|Infinity|not a number|∞|undefined/;

interface Run {
  spec: NormalizedSpec;
  results: Results;
  study: ParameterStudyResult;
  claims: Map<string, ClaimResult>;
}

function run(mu: number): Run {
  const out = runPipeline(hopfSpec(mu));
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  const { spec, results } = out.value;
  return {
    spec,
    results,
    study: results.conditions.studies[0],
    claims: new Map(results.claims.map((c) => [c.id, c])),
  };
}

function expectFiniteEverywhere({ spec, results, study, claims }: Run) {
  // results.json encodes a non-finite number as null and lists it under nonFinite: there is none
  expect(JSON.parse(serializeResults(results)).nonFinite).toBeUndefined();
  const words = [
    marginStatement(study, stateTerms(spec.states), "1/s"),
    ...study.intervals.map((iv) => intervalCondition(study, iv).text),
    ...[...claims.values()].map((c) => claimEvidenceWords(c, stateTerms(spec.states))),
  ];
  for (const w of words) expect(w, w).not.toMatch(BAD_WORDS);
  const html = assembleDossierHtml(spec, results, [], {
    paper: "a4",
    dateEpoch: 0,
    runSeconds: null,
    nodeVersion: "test",
    libraries: {},
  });
  // the words a reader sees: the inlined fonts and styles are base64 and CSS, not words
  const text = html
    .replace(/<style[\s\S]*?<\/style>/g, " ")
    .replace(/data:[^"')\s]+/g, " ")
    .replace(/<[^>]+>/g, " ");
  expect(text.match(BAD_WORDS)?.[0] ?? null).toBeNull();
}

describe("studyParameter(Hopf normal form, mu): the threshold at zero", () => {
  let atZero: Run, below: Run;
  beforeAll(() => {
    atZero = run(0);
    below = run(-0.2);
  });

  it("studyParameter(hopf, mu = 0) locates the Hopf point at 0, puts the current value in one interval closed at it, and gives the margin absolutely", () => {
    const st = atZero.study;
    const hopf = st.thresholds.filter((t) => t.decisive);
    expect(hopf.map((t) => [t.kind, t.criticality])).toEqual([["hopf", "supercritical"]]);
    expect(Math.abs(hopf[0].value)).toBeLessThanOrEqual(1e-10);
    // the current value sits on the break: it belongs to exactly one interval, closed there
    const home = st.intervals.filter((iv) => iv.containsNominal);
    expect(home).toHaveLength(1);
    const closedAtBreak =
      (home[0].to.kind === "threshold" && home[0].toClosed) ||
      (home[0].from.kind === "threshold" && home[0].fromClosed);
    expect(closedAtBreak).toBe(true);
    expect(intervalCondition(st, home[0]).text).toMatch(/mu (<=|>=) 0$/);
    // no other interval holds the break
    for (const iv of st.intervals.filter((q) => !q.containsNominal))
      expect(iv.fromClosed && iv.from.kind !== "range-end").toBe(false);
    expect(st.margin).toMatchObject({ side: "at", form: "absolute", relative: null });
    expect(Math.abs(st.margin!.absolute)).toBeLessThanOrEqual(1e-10);
    expect(marginStatement(st, stateTerms(atZero.spec.states), "1/s")).toContain(
      "on the Hopf threshold at mu = 0",
    );
    expectFiniteEverywhere(atZero);
  });

  it("studyParameter(hopf, mu = -0.2) gives the margin to the Hopf point at 0 as a distance, 0.2 below it", () => {
    const st = below.study;
    expect(st.margin).toMatchObject({ side: "below", form: "absolute", relative: null });
    expect(st.margin!.absolute).toBeCloseTo(0.2, 9);
    expect(st.margin!.ofRange).toBeCloseTo(0.1, 9);
    const text = marginStatement(st, stateTerms(below.spec.states), "1/s");
    expect(text).toContain("0.2 1/s below the Hopf threshold at mu = 0");
    expectFiniteEverywhere(below);
  });

  it("checkClaims(hopf) compares a claimed threshold of 0 absolutely, a tolerance of 0.01 allowing 0.01 of the range's width", () => {
    for (const r of [atZero, below]) {
      const zero = r.claims.get("hopf-at-0")!;
      expect(zero.verdict).toBe("supported");
      expect(zero.evidence).toMatchObject({
        kind: "threshold-value",
        form: "absolute",
        relativeDifference: null,
      });
      if (zero.evidence.kind === "threshold-value") {
        expect(zero.evidence.allowed).toBeCloseTo(0.02, 12);
        expect(zero.evidence.difference).toBeLessThanOrEqual(1e-10);
      }
      // claimed values away from 0 stay relative: 0.05 and 0.015 are 100 % off the located 0
      for (const id of ["hopf-at-0.05", "hopf-at-0.015"]) {
        const c = r.claims.get(id)!;
        expect(c.verdict, id).toBe("contradicted");
        expect(c.evidence, id).toMatchObject({ form: "relative" });
        if (c.evidence.kind === "threshold-value") expect(c.evidence.relativeDifference).toBeCloseTo(1, 9);
      }
    }
  });

  it("checkClaims(hopf) leaves 'mu lies below its threshold' undecided on the threshold and supports it at -0.2, margin 0.2 absolute", () => {
    const on = atZero.claims.get("below")!;
    expect(on.verdict).toBe("undecided");
    expect(on.evidence).toMatchObject({ kind: "side", side: "at" });
    const off = below.claims.get("below")!;
    expect(off.verdict).toBe("supported");
    expect(off.evidence).toMatchObject({
      kind: "side",
      side: "below",
      margin: { form: "absolute", relative: null },
    });
    if (off.evidence.kind === "side") expect(off.evidence.margin.absolute).toBeCloseTo(0.2, 9);
    expect(claimEvidenceWords(off, stateTerms(below.spec.states))).toContain("margin 0.2, absolute");
  });
});

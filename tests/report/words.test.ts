/**
 * The dossier's words are built from the analysis's structures: the words of two outcomes are
 * equal exactly when their structural keys are (so the text tells apart what the analysis tells
 * apart, and nothing more), and every number a statement prints is the structure's number.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { evaluate } from "mathjs";
import { describe, expect, it } from "vitest";
import {
  outcomeKey,
  type AttractorResult,
  type OutcomeFateResult,
  type OutcomeResult,
} from "../../src/analysis/parameters/outcomes.js";
import type { ClaimResult } from "../../src/analysis/checks/claims.js";
import type { ParameterStudyResult, ThresholdResult } from "../../src/analysis/parameters/study.js";
import {
  claimEvidenceWords,
  claimReferenceWords,
  intervalCondition,
  marginStatement,
  outcomeWords,
  presenceWords,
  stateTerms,
  borderlineWords,
  equilibriumTypeWords,
  TYPE_WORDS,
  type StateTerms,
} from "../../src/report/words/index.js";
import { classifyEquilibrium } from "../../src/analysis/phase/stability.js";
import { formatNumber } from "../../src/report/format.js";
import { renderMath } from "../../src/report/math.js";
import { PROJECT_ROOT } from "../fixtures/cli.js";

const STATES = ["N", "S"];
/** The same two states declared populations, left neutral on [0, max], and as deviations on [−1, 1]. */
const VOCABULARIES: Record<string, StateTerms> = {
  populations: stateTerms(STATES.map((name) => ({ name, min: 0, population: true }))),
  neutral: stateTerms(STATES.map((name) => ({ name, min: 0, population: false }))),
  deviations: stateTerms(STATES.map((name) => ({ name, min: -1, population: false }))),
};
const TERMS = VOCABULARIES.populations;
const PATTERNS = [["N", "S"], ["N"], ["S"], []];

/** Every equilibrium attractor of up to three per pattern, and the stable cycle. */
function allAttractors(): AttractorResult[] {
  const out: AttractorResult[] = [{ kind: "cycle" }];
  for (const present of PATTERNS)
    for (let of = 1; of <= 3; of++)
      for (let index = 0; index < of; index++)
        out.push({ kind: "equilibrium", present, rank: { index, of } });
  return out;
}

function allFates(): OutcomeFateResult[] {
  const out: OutcomeFateResult[] = [{ kind: "undecided", reason: "horizon" }, { kind: "blow-up" }];
  for (const a of allAttractors())
    if (a.kind === "equilibrium") out.push({ kind: "attractor", attractor: a });
  for (const present of PATTERNS)
    out.push(
      { kind: "equilibrium", type: "saddle", present },
      { kind: "equilibrium", type: "stable-node", present },
    );
  for (const state of STATES) out.push({ kind: "left-window", state });
  out.push(
    { kind: "cycle", stability: "stable" },
    { kind: "cycle", stability: "unstable" },
    { kind: "cycle", stability: null },
  );
  return out;
}

/** A deterministic pseudo-random choice (Park–Miller minimal standard generator, common practice). */
function generator(seed: number) {
  let s = seed;
  return (n: number) => {
    s = (s * 16807) % 2147483647;
    return s % n;
  };
}

describe("outcomeWords", () => {
  it.each(Object.keys(VOCABULARIES))(
    "outcomeWords(o, %s) are equal exactly when outcomeKey(o) are, over every attractor and fate of a two-state model",
    (vocabulary) => {
      const fates = allFates();
      const pick = generator(12345);
      const outcomes: OutcomeResult[] = [];
      for (let k = 0; k < 3000; k++) {
        // as at a parameter point: per presence pattern, some of the stable equilibria that share it
        const list: AttractorResult[] = pick(3) === 0 ? [{ kind: "cycle" }] : [];
        for (const present of PATTERNS) {
          const of = pick(4);
          for (let index = 0; index < of; index++)
            if (pick(2)) list.push({ kind: "equilibrium", present, rank: { index, of } });
        }
        outcomes.push({
          attractors: list,
          scenarios: [
            { name: "first", fate: fates[pick(fates.length)] },
            { name: "second", fate: fates[pick(fates.length)] },
          ],
        });
      }
      const byWords = new Map<string, string>(),
        byKey = new Map<string, string>();
      for (const o of outcomes) {
        const words = outcomeWords(o, VOCABULARIES[vocabulary]),
          key = outcomeKey(o);
        expect(byWords.get(words) ?? key, words).toBe(key);
        expect(byKey.get(key) ?? words, key).toBe(words);
        byWords.set(words, key);
        byKey.set(key, words);
      }
      // the sample is rich enough to mean something: many distinct outcomes
      expect(byKey.size).toBeGreaterThan(2000);
    },
  );
});

/** Lotka–Volterra competition's a12 threshold K1/K2 (Murray, Mathematical Biology I, 3rd ed., §3.5). */
const VALUES = { K1: 100, K2: 80 };
const BREAK = VALUES.K1 / VALUES.K2;

function study(nominal: number): ParameterStudyResult {
  const outcome = (present: string[]): OutcomeResult => ({
    attractors: [{ kind: "equilibrium", present, rank: { index: 0, of: 1 } }],
    scenarios: [],
  });
  const threshold = {
    value: BREAK,
    kind: "transcritical",
    symbolic: { text: "K1 / K2", tex: "\\frac{K_1}{K_2}" },
  } as unknown as ThresholdResult;
  const end = { value: BREAK, kind: "threshold", threshold: "transcritical" } as const;
  return {
    parameter: "a12",
    nominal,
    range: [0.5, 2.5],
    continuation: { parameter: "a12", range: [0.5, 2.5], branches: [], points: [], cycles: [] },
    thresholds: [threshold],
    intervals: [
      {
        from: { value: 0.5, kind: "range-end" },
        to: end,
        fromClosed: true,
        toClosed: nominal === BREAK,
        containsNominal: nominal <= BREAK,
        outcome: outcome(["N", "S"]),
      },
      {
        from: end,
        to: { value: 2.5, kind: "range-end" },
        fromClosed: false,
        toClosed: true,
        containsNominal: nominal > BREAK,
        outcome: outcome(["S"]),
      },
    ],
    margin: {
      to: end,
      side: nominal < BREAK ? "below" : "above",
      absolute: BREAK - nominal,
      relative: (BREAK - nominal) / BREAK,
      form: "relative",
      ofRange: (BREAK - nominal) / 2,
      undecidedFrom: null,
    },
    evaluations: 0,
  };
}

describe("presence words follow the spec's population key", () => {
  const patterns = PATTERNS.map((present) => ({
    populations: presenceWords(present, VOCABULARIES.populations),
    neutral: presenceWords(present, VOCABULARIES.neutral),
    deviations: presenceWords(present, VOCABULARIES.deviations),
  }));

  it("presenceWords names populations only when every state is declared one", () => {
    expect(patterns[0].populations).toBe("coexistence");
    const mixed = stateTerms([
      { name: "N", min: 0, population: true },
      { name: "S", min: 0, population: false },
    ]);
    expect(mixed.populations).toBe(false);
    for (const p of patterns)
      for (const words of [p.neutral, p.deviations, presenceWords(PATTERNS[0], mixed)])
        expect(words).not.toMatch(/coexist|absent/);
  });

  it("presenceWords calls no state positive, nor a corner the origin, where a lower bound is not 0", () => {
    for (const p of patterns) expect(p.deviations).not.toMatch(/positive|origin/);
    // with every bound at 0, nothing present is the origin
    expect(patterns[PATTERNS.length - 1].neutral).toContain("origin");
  });

  it("the example specs declare their states populations, so their dossiers keep population words", () => {
    for (const file of ["reservoir-competition.json", "grazer-forage.json"]) {
      const spec = JSON.parse(readFileSync(join(PROJECT_ROOT, "specs", file), "utf8"));
      expect(stateTerms(spec.states).populations, file).toBe(true);
    }
  });
});

describe("borderline types in words", () => {
  // [[α, β], [−β, α]] has eigenvalues α ± iβ (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed.,
  // section 5.2): −1 ± 1e-5 i, a focus with discriminant/trace² = −β²/α² = −1e-10
  const focus = classifyEquilibrium([
    [-1, 1e-5],
    [-1e-5, -1],
  ]);

  it("borderlineWords(−1 ± 1e-5 i) names both types and prints the structure's value and band", () => {
    const text = borderlineWords(focus.borderline!);
    expect(text).toContain(`between ${TYPE_WORDS["stable-focus"]} and ${TYPE_WORDS["stable-node"]}`);
    expect(text).toContain(formatNumber(focus.borderline!.value, 2));
    expect(text).toContain(formatNumber(focus.borderline!.tolerance));
    expect(equilibriumTypeWords(focus)).toContain("borderline");
  });
});

describe("interval and margin statements", () => {
  it("intervalCondition(study, interval) states the break by its closed form and its value, and the TeX renders", () => {
    const st = study(0.6);
    for (const iv of st.intervals) {
      const { text, tex } = intervalCondition(st, iv);
      const m = /^a12 ([<>]) (.+) = ([\d.e+-]+)$/.exec(text);
      expect(m, text).not.toBeNull();
      expect(m![1]).toBe(iv.from.kind === "range-end" ? "<" : ">");
      expect(evaluate(m![2], VALUES)).toBeCloseTo(BREAK, 12);
      expect(Number(m![3])).toBe(BREAK);
      // KaTeX marks what it cannot parse with this class instead of throwing
      expect(renderMath(tex, false)).not.toContain("katex-error");
    }
  });

  it("marginStatement(study) prints the current value and its distance to the break: 52% below at a12 = 0.6", () => {
    // (1.25 − 0.6)/1.25 = 0.52, worked by hand
    const text = marginStatement(study(0.6), TERMS);
    expect(text).toContain("now a12 = 0.6");
    expect(text).toContain("52% below");
    // at 1.6: (1.6 − 1.25)/1.25 = 0.28 above
    expect(marginStatement(study(1.6), TERMS)).toContain("28% above");
  });
});

describe("claim evidence and references", () => {
  const claim = (evidence: ClaimResult["evidence"], where: ClaimResult["where"]): ClaimResult => ({
    id: "c",
    kind: "parameter-side",
    text: "",
    verdict: "supported",
    evidence,
    where,
  });

  it("claimEvidenceWords(side) prints the nominal value, the threshold and the margin in percent", () => {
    const text = claimEvidenceWords(
      claim(
        {
          kind: "side",
          parameter: "a12",
          nominal: 1,
          threshold: { value: BREAK, kind: "transcritical" },
          side: "below",
          margin: { absolute: BREAK - 1, relative: 0.2, form: "relative" },
        },
        { section: "conditions", parameter: "a12" },
      ),
      TERMS,
    );
    const numbers = [...text.matchAll(/(?<![\w.])-?\d+(\.\d+)?/g)].map((m) => Number(m[0]));
    expect(numbers).toEqual([1, BREAK, 20]);
  });

  it("claimReferenceWords names the dossier's section headings", () => {
    const heading = (partial: string) =>
      /<h2>([^<]+)<\/h2>/.exec(readFileSync(join(PROJECT_ROOT, "templates/partials", partial), "utf8"))![1];
    expect(
      claimReferenceWords({ section: "conditions", parameter: "a12" }).startsWith(heading("conditions.hbs")),
    ).toBe(true);
    expect(
      claimReferenceWords({ section: "equilibria", equilibrium: "E2" }).startsWith(heading("equilibria.hbs")),
    ).toBe(true);
    expect(
      claimReferenceWords({ section: "summary", scenario: "survey" }).startsWith(
        heading("summary.hbs").split(" ")[0],
      ),
    ).toBe(true);
    expect(claimReferenceWords({ section: "equilibria", equilibrium: "E2" })).toContain("E2");
    expect(claimReferenceWords({ section: "summary", scenario: "survey" })).toContain("survey");
  });
});

/**
 * A seeded slice of the differential crosscheck (the full corpus: `npm run crosscheck`). keel's
 * answers are checked against an independent reference (tests/reference/crosscheck.py: scipy's
 * DOP853 and MINPACK's hybrid method, sharing no code with keel): one model of each of the 12 families for
 * equilibria, their types and every scenario's fate, and three for the location of every outcome
 * break. Expected values come from the reference, never from keel.
 */
import { describe, expect, it } from "vitest";
import { runPipeline } from "../../src/pipeline.js";
import { parseSpecText } from "../../src/spec/parse.js";
import { findScipyPython, runReference } from "../fixtures/scipy.js";
import { compareModel, type Disagreement, type Quantity } from "./compare.js";
import { FAMILY_NAMES, generateCorpus, type GeneratedSpec } from "./generate.js";
import { summarizeResults, type KeelSummary, type ReferenceModel } from "./summary.js";

const SLICE_TIMEOUT_MS = 180_000;

/** The models with their parameter studies switched off (the slice compares what needs none). */
const withoutStudies = (g: GeneratedSpec): GeneratedSpec => ({
  ...g,
  spec: { ...g.spec, analysis: { ...(g.spec.analysis as object), parameters: [] } },
});

function crosscheck(models: GeneratedSpec[], quantities: Quantity[]): Disagreement[] {
  const keel = models.map((g) => {
    const out = runPipeline(JSON.stringify(g.spec));
    if (!out.ok) throw new Error(`${g.id} refused: ${JSON.stringify(out.issues)}`);
    return summarizeResults(out.value.results, 0);
  });
  const input = models.map((g, i) => ({
    spec: g.spec,
    cycles: keel[i].cycles.map((c) => ({ id: c.id, point: c.point, period: c.period })),
  }));
  const reference = runReference<ReferenceModel[]>("crosscheck.py", input);
  return keel
    .flatMap((k, i) => compareModel(k, reference[i]).disagreements)
    .filter((d) => d.quantity === "crash" || quantities.includes(d.quantity));
}

describe("crosscheck corpus", () => {
  const corpus = generateCorpus();

  it("generateCorpus() gives at least 200 models over every family, with deterministic, unique ids", () => {
    expect(corpus.length).toBeGreaterThanOrEqual(200);
    expect(new Set(corpus.map((g) => g.family))).toEqual(new Set(FAMILY_NAMES));
    expect(new Set(corpus.map((g) => g.id)).size).toBe(corpus.length);
    expect(generateCorpus({ count: 30 }).map((g) => g.spec)).toEqual(corpus.slice(0, 30).map((g) => g.spec));
    const only = generateCorpus({ only: "hopf", count: 3 });
    expect(only.map((g) => g.spec)).toEqual(
      corpus
        .filter((g) => g.family === "hopf")
        .slice(0, 3)
        .map((g) => g.spec),
    );
  });

  // compiling all 240 takes over a minute (symbolic derivatives): the slice compiles its own, the full run all
  it("every generated spec passes keel's validation", () => {
    const refused = corpus.flatMap((g) => {
      const out = parseSpecText(JSON.stringify(g.spec));
      return out.ok ? [] : [{ id: g.id, issues: out.issues.map((i) => `${i.path.join(".")}: ${i.message}`) }];
    });
    expect(refused).toEqual([]);
  });
});

describe("compareModel", () => {
  // a hand-made answer pair (no keel, no reference run): the comparison itself must see each difference
  const reference: ReferenceModel = {
    id: "m",
    ok: true,
    states: ["x", "y"],
    window: [
      [0, 10],
      [0, 10],
    ],
    equilibria: [
      { point: [0, 0], type: "saddle", stable: false, borderline: false, inside: true, nearEdge: false },
      { point: [5, 5], type: "stable-focus", stable: true, borderline: false, inside: true, nearEdge: false },
    ],
    scenarios: [
      {
        name: "s1",
        fate: { kind: "equilibrium", point: [5, 5] },
        feasibleFate: { kind: "equilibrium", point: [5, 5] },
      },
    ],
    cycles: [],
    studies: [
      {
        parameter: "p",
        range: [0, 2],
        breaks: [{ value: 1, bracket: [1, 1], resolved: true, cause: "fates" }],
        undecided: [],
        budgetSpent: false,
      },
    ],
    seconds: 0,
  };
  const keel: KeelSummary = {
    id: "m",
    ok: true,
    seconds: 0,
    states: ["x", "y"],
    window: reference.window,
    equilibria: [
      { id: "E1", point: [0, 0], type: "saddle", stable: false },
      { id: "E2", point: [5, 5], type: "stable-focus", stable: true },
    ],
    scenarios: [{ name: "s1", kind: "equilibrium", target: [5, 5], state: null, reason: null }],
    cycles: [],
    studies: [
      {
        parameter: "p",
        range: [0, 2],
        breaks: [{ value: 1, kind: "sampled-break", threshold: null }],
        limits: [],
      },
    ],
  };
  const quantities = (k: KeelSummary) => compareModel(k, reference).disagreements.map((d) => d.quantity);

  it("compareModel(equal answers) finds no disagreement", () => {
    expect(quantities(keel)).toEqual([]);
  });

  it("compareModel sees a changed type, a moved equilibrium, another fate and a shifted break", () => {
    const eq = (type: string, point: [number, number]) => [
      keel.equilibria[0],
      { ...keel.equilibria[1], type, point },
    ];
    expect(quantities({ ...keel, equilibria: eq("stable-node", [5, 5]) })).toEqual(["equilibrium-type"]);
    expect(quantities({ ...keel, equilibria: eq("stable-focus", [5, 5.001]) })).toEqual([
      "equilibrium-position",
    ]);
    expect(quantities({ ...keel, equilibria: [keel.equilibria[1]] })).toEqual(["equilibrium-count"]);
    const fate = { ...keel.scenarios[0], kind: "left-window", target: null, state: "x" };
    expect(quantities({ ...keel, scenarios: [fate] })).toEqual([
      "fate-kind (window definition)",
      "fate-kind",
    ]);
    const shifted = [
      { ...keel.studies[0], breaks: [{ value: 1.01, kind: "sampled-break", threshold: null }] },
    ];
    expect(quantities({ ...keel, studies: shifted })).toEqual(["break-location", "break-location"]);
  });
});

describe.skipIf(findScipyPython() === null)("crosscheck slice against the scipy reference", () => {
  const corpus = generateCorpus();
  // the first model of each family: every family's code paths in the suite's time budget (the
  // full corpus, 20 of each, is `npm run crosscheck`)
  const slice = FAMILY_NAMES.map((f) => corpus.find((g) => g.id === `xc-${f}-1`)!);

  it(
    "models of every family: equilibrium count and types, and every scenario's fate, agree with the reference",
    () => {
      const found = crosscheck(slice.map(withoutStudies), [
        "equilibrium-count",
        "equilibrium-type",
        "fate-kind",
        "fate-target",
      ]);
      expect(found).toEqual([]);
    },
    SLICE_TIMEOUT_MS,
  );

  it(
    "the Hopf threshold at μ = 0, a degenerate node and a window graze: every outcome break agrees with the reference",
    () => {
      const pick = ["xc-hopf-1", "xc-borderline-1", "xc-window-graze-1"].map((id) =>
        corpus.find((g) => g.id === id)!,
      );
      expect(crosscheck(pick, ["break-location"])).toEqual([]);
    },
    SLICE_TIMEOUT_MS,
  );
});

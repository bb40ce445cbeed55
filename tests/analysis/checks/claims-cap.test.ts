/**
 * A cap on the equilibrium search must never turn a true claim false. The field u' = sin u,
 * v' = sin v has an equilibrium at every (jπ, kπ) (common practice: the zeros of sine); over the
 * window [1, 26]² that is 8 × 8 = 64 equilibria, more than the search keeps (MAX_EQUILIBRIA).
 */
import { describe, expect, it } from "vitest";
import { checkClaims } from "../../../src/analysis/checks/claims.js";
import { findEquilibriumCandidates } from "../../../src/analysis/phase/equilibria.js";
import { DEFAULT_EQUILIBRIUM_OPTIONS, MAX_EQUILIBRIA } from "../../../src/analysis/constants.js";
import type { Diagnostic } from "../../../src/diagnostics/issue.js";
import { compileModel } from "../../../src/model/compile.js";
import { parseSpecValue } from "../../../src/spec/parse.js";

const TRUE_COUNT = 64;

function sineField() {
  const spec = parseSpecValue({
    keel: 1,
    id: "sine-lattice",
    title: "A lattice of equilibria (invented)",
    time: { unit: "day" },
    states: [
      { name: "u", min: 1, max: 26 },
      { name: "v", min: 1, max: 26 },
    ],
    parameters: [],
    equations: { u: "sin(u)", v: "sin(v)" },
    scenarios: [],
    claims: [
      { id: "true-count", kind: "equilibrium-count", count: TRUE_COUNT },
      { id: "too-few", kind: "equilibrium-count", count: 10 },
    ],
  });
  if (!spec.ok) throw new Error(JSON.stringify(spec.issues));
  const model = compileModel(spec.value);
  if (!model.ok) throw new Error(JSON.stringify(model.issues));
  return model.value;
}

describe("checkClaims(sine lattice of 64 equilibria) with the search capped", () => {
  it("keeps MAX_EQUILIBRIA, says so, leaves the true count undecided and still contradicts a count below the cap", () => {
    const model = sineField();
    const diagnostics: Diagnostic[] = [];
    const { equilibria } = findEquilibriumCandidates(model, DEFAULT_EQUILIBRIUM_OPTIONS, diagnostics);
    expect(MAX_EQUILIBRIA).toBeLessThan(TRUE_COUNT);
    expect(equilibria).toHaveLength(MAX_EQUILIBRIA);
    expect(diagnostics.map((d) => d.code)).toContain("too-many-equilibria");
    // every equilibrium kept is a true one: both coordinates multiples of π
    for (const e of equilibria)
      for (const x of [e.point.u, e.point.v])
        expect(Math.abs(x / Math.PI - Math.round(x / Math.PI))).toBeLessThan(1e-9);
    const [trueCount, tooFew] = checkClaims({
      model,
      equilibria,
      equilibriaCapped: true,
      scenarios: [],
      studies: [],
    });
    expect(trueCount).toMatchObject({
      verdict: "undecided",
      evidence: { kind: "count-capped", claimed: TRUE_COUNT, cap: MAX_EQUILIBRIA },
    });
    expect(tooFew).toMatchObject({ verdict: "contradicted", evidence: { kind: "count", claimed: 10 } });
  });
});

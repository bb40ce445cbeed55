import { formatNumber } from "../format.js";
import {
  equilibriumTypeWords,
  claimEvidenceWords,
  claimReferenceWords,
  fateWords,
  pointWords,
  stateTerms,
} from "../words/index.js";
import type { ViewInput } from "./common.js";
import { buildMarginsView, currentOutcomeWords } from "./conditions.js";
import { buildAssumptionsView } from "./model.js";

function buildClaimsView({ spec, results }: ViewInput) {
  const claims = results.claims;
  const count = (verdict: string) => claims.filter((c) => c.verdict === verdict).length;
  return {
    claims: claims.map((c) => ({
      id: c.id,
      text: c.text,
      verdict: c.verdict,
      evidence: claimEvidenceWords(c, stateTerms(spec.states)),
      where: claimReferenceWords(c.where),
    })),
    claimCounts: {
      supported: count("supported"),
      contradicted: count("contradicted"),
      undecided: count("undecided"),
    },
  };
}

/** The first page: each scenario's outcome, the equilibria with their types, the margins, the claims. */
export function buildSummaryView(input: ViewInput) {
  const { spec, results } = input;
  const attractorCount =
    results.equilibria.filter((e) => e.stable === true).length +
    results.cycles.filter((c) => c.stability === "stable").length;
  return {
    equilibriumCount: results.equilibria.length,
    attractorCount,
    multistable: attractorCount > 1,
    scenarios: results.scenarios.map((s) => ({
      name: s.name,
      start: pointWords(s.start),
      outcome: fateWords(s.fate, results, spec.timeUnit),
      horizon: `${formatNumber(s.horizon)} ${spec.timeUnit}`,
    })),
    equilibria: results.equilibria.map((e) => ({
      id: e.id,
      type: equilibriumTypeWords(e),
      at: pointWords(e.point, 4),
    })),
    assumptionsFailing: buildAssumptionsView(input).filter((a) => a.holds === false).length,
    margins: buildMarginsView(input),
    currentOutcome: currentOutcomeWords(input),
    ...buildClaimsView(input),
  };
}

// Compares the fields issue 14 turned from English and TeX into data with the words the base wrote:
// each new structure (outcomes, interval ends, margins, map legends and curve origins, claim
// evidence and references) is worded by this checkout's report/words (from dist/) into the old
// shape, so results-compare.mjs checks the old sentences and signatures leaf by leaf, exactly.
// The words come from dist/ as it is when this module loads: build first (npx tsc -p tsconfig.json).
import { resolve, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..");
const words = await import(pathToFileURL(resolve(ROOT, "dist/report/words/index.js")).href);

const endKind = (end) => (end.kind === "range-end" ? "range" : words.breakKindName(end));

/** The old OutcomeResult: phrases, a signature made of them, and the one-line summary. */
function oldOutcome(o, states) {
  const attractors = words.attractorListWords(o.attractors, states);
  const scenarios = o.scenarios.map((s) => ({ name: s.name, fate: words.outcomeFateWords(s.fate, states) }));
  const signature = JSON.stringify({ a: attractors, s: scenarios.map((s) => s.fate) });
  return { signature, attractors, scenarios, words: words.outcomeWords(o, states) };
}

function oldStudy(st, states) {
  const intervals = st.intervals.map((iv) => {
    const condition = words.intervalCondition(st, iv);
    return {
      from: iv.from.value,
      to: iv.to.value,
      fromKind: endKind(iv.from),
      toKind: endKind(iv.to),
      containsNominal: iv.containsNominal,
      outcome: oldOutcome(iv.outcome, states),
      statement: { text: words.intervalStatement(st, iv, states), tex: condition.tex },
    };
  });
  const m = st.margin;
  const margin = m && {
    threshold: m.to.value,
    kind: endKind(m.to),
    relative: m.relative,
    side: m.side,
    statement: words.marginStatement(st, states),
  };
  return { ...st, intervals, margin };
}

/** The old `numbers` of a claim, from its evidence. */
function oldNumbers(e) {
  switch (e.kind) {
    case "count":
      return { claimed: e.claimed, found: e.found };
    case "count-undecided":
      return { claimed: e.claimed, found: e.found, undecided: e.undecided };
    case "none-near":
      return { distance: e.nearest?.distance ?? null };
    case "type":
      return { equilibrium: e.equilibrium, trace: e.trace, determinant: e.determinant };
    case "fate-undecided":
    case "fate-other":
      return { t: e.t };
    case "fate-cycle":
      return { cycle: e.cycle, t: e.t };
    case "fate-equilibrium":
      return { equilibrium: e.equilibrium, t: e.t };
    case "fate-near":
      return { equilibrium: e.equilibrium, distance: e.distance };
    case "not-studied":
    case "value-outside-range":
      return {};
    case "no-deciding-threshold":
      return { nominal: e.nominal };
    case "side":
      return { nominal: e.nominal, threshold: e.threshold.value, margin: e.margin };
    case "no-threshold":
      return { claimed: e.claimed };
    case "threshold-value":
      return { claimed: e.claimed, located: e.located.value, relativeDifference: e.relativeDifference };
    default:
      return { agreeing: e.agreeing, skipped: e.skipped };
  }
}

/** ADAPT rule: rewrites the new results' structures into the base's words, in place. */
export function wordsFromStructure(_old, now) {
  if (!now?.conditions) return;
  const states = now.model.states;
  now.conditions.studies = now.conditions.studies.map((st) => oldStudy(st, states));
  for (const map of now.conditions.maps) {
    map.legend = map.legend.map((o) => words.outcomeWords(o, states));
    for (const c of map.curves) c.origin = `${c.origin.parameter} = ${c.origin.value}`;
  }
  now.claims = now.claims.map((c) => ({
    ...c,
    evidence: words.claimEvidenceWords(c, states),
    where: words.claimReferenceWords(c.where),
    numbers: oldNumbers(c.evidence),
  }));
}

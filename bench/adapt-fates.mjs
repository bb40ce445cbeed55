// Adapts base results to the vocabulary of issue 14 (fates, window edges, curves, sides): fields
// renamed or re-typed without changing their meaning. Used by results-compare.mjs.
//
//   scenarios[].fate.edge, scenarios[].exit.edge, trajectories[].fate.edge: "N = 0" → { state, value }
//   separatrices[].end → separatrices[].fate (its edge as above); separatrices[].branch → .side
//   nullclines[].pieces[].branch → nullclines[].pieces[].curve
//   every undecided fate's reason (scenarios, trajectories, separatrices, claim evidence):
//   English sentence → code, matched by wording each code with dist/report/words (build first)
//   diagnostics[]: { code, data, at? } → { message }, worded by dist/report/words, so the base's
//   message is compared with the new wording exactly
import { resolve, dirname } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..");
const words = await import(pathToFileURL(resolve(ROOT, "dist/report/words/index.js")).href);

const UNDECIDED_REASONS = [
  "non-finite-rhs",
  "step-limit",
  "horizon",
  "recurrent-candidate",
  "no-periodic-orbit",
  "blow-up",
];
const REASON_OF_SENTENCE = new Map(UNDECIDED_REASONS.map((code) => [words.undecidedReasonWords(code), code]));

/** Replaces, anywhere in the tree, an undecided fate's sentence by the code worded exactly so. */
function reasonsAsCodes(node) {
  if (Array.isArray(node)) return node.forEach(reasonsAsCodes);
  if (!node || typeof node !== "object") return;
  const undecided = node.kind === "undecided" || node.kind === "fate-undecided";
  if (undecided && REASON_OF_SENTENCE.has(node.reason)) node.reason = REASON_OF_SENTENCE.get(node.reason);
  for (const value of Object.values(node)) reasonsAsCodes(value);
}

/** "N = 0" → { state: "N", value: 0 }; the value printed by String(number), so Number() reads it back exactly. */
function edgeRecord(text) {
  const at = text.lastIndexOf(" = ");
  return { state: text.slice(0, at), value: Number(text.slice(at + 3)) };
}

function fixEdge(holder) {
  if (holder && typeof holder.edge === "string") holder.edge = edgeRecord(holder.edge);
}

/** Renames key `from` to `to` in place, keeping the key order of the object. */
function renameKey(object, from, to) {
  if (!(from in object)) return;
  const entries = Object.entries(object).map(([k, v]) => [k === from ? to : k, v]);
  for (const k of Object.keys(object)) delete object[k];
  Object.assign(object, Object.fromEntries(entries));
}

/** The base's diagnostic shape, { severity, stage, message }, from a code and its data. */
function diagnosticsAsMessages(now) {
  if (!Array.isArray(now?.diagnostics)) return;
  now.diagnostics = now.diagnostics.map((d) =>
    "code" in d ? { severity: d.severity, stage: d.stage, message: words.diagnosticWords(d) } : d,
  );
}

export function fatesAsRecords(old, now) {
  diagnosticsAsMessages(now);
  for (const s of old.scenarios ?? []) {
    fixEdge(s.fate);
    fixEdge(s.exit);
  }
  for (const t of old.trajectories ?? []) fixEdge(t.fate);
  for (const s of old.separatrices ?? []) {
    renameKey(s, "branch", "side");
    renameKey(s, "end", "fate");
    fixEdge(s.fate);
  }
  for (const n of old.nullclines ?? []) for (const p of n.pieces ?? []) renameKey(p, "branch", "curve");
  reasonsAsCodes(old);
}

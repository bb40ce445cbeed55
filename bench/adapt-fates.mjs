// Adapts base results to the vocabulary of issue 14 (fates, window edges, curves, sides): fields
// renamed or re-typed without changing their meaning. Used by results-compare.mjs.
//
//   scenarios[].fate.edge, scenarios[].exit.edge, trajectories[].fate.edge: "N = 0" → { state, value }
//   separatrices[].end → separatrices[].fate (its edge as above); separatrices[].branch → .side
//   nullclines[].pieces[].branch → nullclines[].pieces[].curve

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

export function fatesAsRecords(old) {
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
}

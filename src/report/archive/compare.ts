/**
 * Archived results against re-computed ones: exact for counts, labels, ids and every other
 * non-number; within a stated tolerance for numbers (floating-point results may move in the last
 * digits between platforms or library versions, never more than this on a correct re-run).
 */
export const VERIFY_REL_TOL = 1e-6;
export const VERIFY_ABS_TOL = 1e-12;

export interface Difference {
  path: string;
  kind: "drift" | "mismatch";
  archived: string;
  now: string;
}

const show = (v: unknown) => {
  const s = JSON.stringify(v);
  return s === undefined ? "absent" : s.length > 80 ? s.slice(0, 77) + "..." : s;
};

export function compareResults(archived: unknown, now: unknown, path = "", out: Difference[] = [], limit = 200): Difference[] {
  if (out.length >= limit) return out;
  if (typeof archived === "number" && typeof now === "number") {
    const tol = VERIFY_REL_TOL * Math.max(Math.abs(archived), Math.abs(now)) + VERIFY_ABS_TOL;
    if (!(Math.abs(archived - now) <= tol)) out.push({ path, kind: "drift", archived: String(archived), now: String(now) });
    return out;
  }
  if (Array.isArray(archived) && Array.isArray(now)) {
    if (archived.length !== now.length) {
      out.push({ path: `${path}.length`, kind: "mismatch", archived: String(archived.length), now: String(now.length) });
      return out;
    }
    archived.forEach((v, k) => compareResults(v, now[k], `${path}[${k}]`, out, limit));
    return out;
  }
  if (archived && now && typeof archived === "object" && typeof now === "object" && !Array.isArray(archived) && !Array.isArray(now)) {
    const keys = [...new Set([...Object.keys(archived), ...Object.keys(now)])];
    for (const k of keys) compareResults((archived as Record<string, unknown>)[k], (now as Record<string, unknown>)[k], path ? `${path}.${k}` : k, out, limit);
    return out;
  }
  if (archived !== now) out.push({ path, kind: "mismatch", archived: show(archived), now: show(now) });
  return out;
}

/**
 * The archive, part 3 of 3: archived results against re-computed ones, for `keel verify`. Exact
 * for counts, labels, ids and every other non-number; numbers within a stated tolerance.
 * serialize.ts writes results.json; manifest.ts hashes and embeds the files of a build.
 */

/**
 * Floating-point results may move in the last digits between platforms or library versions,
 * never more than this on a correct re-run: relative part, then absolute floor (for zeros).
 */
export const VERIFY_REL_TOL = 1e-6;
export const VERIFY_ABS_TOL = 1e-12;

/** Differences listed at most; past this the archive is plainly not the same run. */
const DIFFERENCE_LIMIT = 200;
/** A value longer than this, as JSON, is shown cut short. */
const PREVIEW_LENGTH = 80;

/** One difference: a number beyond the tolerance ("drift"), or anything else unequal ("mismatch"). */
export interface Difference {
  /** Path in results.json, e.g. "equilibria[2].trace". */
  path: string;
  kind: "drift" | "mismatch";
  archived: string;
  now: string;
}

function preview(value: unknown): string {
  const text = JSON.stringify(value);
  if (text === undefined) return "absent";
  return text.length > PREVIEW_LENGTH ? text.slice(0, PREVIEW_LENGTH - 3) + "..." : text;
}

const isRecord = (value: unknown): value is Record<string, unknown> =>
  Boolean(value) && typeof value === "object" && !Array.isArray(value);

const childPath = (path: string, key: string) => (path ? `${path}.${key}` : key);

function compareNumbers(archived: number, now: number, path: string, out: Difference[]): void {
  const tol = VERIFY_REL_TOL * Math.max(Math.abs(archived), Math.abs(now)) + VERIFY_ABS_TOL;
  if (!(Math.abs(archived - now) <= tol))
    out.push({ path, kind: "drift", archived: String(archived), now: String(now) });
}

/**
 * Every difference between two results.json values, depth first in key order (archived keys,
 * then keys only the re-run has), at most `limit` of them.
 */
export function compareResults(
  archived: unknown,
  now: unknown,
  path = "",
  out: Difference[] = [],
  limit = DIFFERENCE_LIMIT,
): Difference[] {
  if (out.length >= limit) return out;
  if (typeof archived === "number" && typeof now === "number") {
    compareNumbers(archived, now, path, out);
  } else if (Array.isArray(archived) && Array.isArray(now)) {
    if (archived.length !== now.length) {
      out.push({
        path: `${path}.length`,
        kind: "mismatch",
        archived: String(archived.length),
        now: String(now.length),
      });
    } else archived.forEach((v, k) => compareResults(v, now[k], `${path}[${k}]`, out, limit));
  } else if (isRecord(archived) && isRecord(now)) {
    const keys = [...new Set([...Object.keys(archived), ...Object.keys(now)])];
    for (const k of keys) compareResults(archived[k], now[k], childPath(path, k), out, limit);
  } else if (archived !== now) {
    out.push({ path, kind: "mismatch", archived: preview(archived), now: preview(now) });
  }
  return out;
}

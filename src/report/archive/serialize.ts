import type { Results } from "../../analysis/types.js";

/**
 * The archive, part 1 of 3: results.json, the record of one analysis. manifest.ts hashes and
 * embeds the files of a build; compare.ts sets archived results against re-computed ones.
 */

/**
 * One entry of `nonFinite`: the JSON path of a number, then its value.
 * @pattern ^.*: (NaN|-?Infinity)$
 */
export type NonFiniteEntry = string;

// schema/keel-results.schema.json is generated from ResultsDocument (npm run schema:results);
// its doc comment becomes the schema's description.
/**
 * results.json, written by keel analyze and keel build: everything keel computed from one spec.
 * A number that was NaN or ±Infinity is written as null, and its path is listed under nonFinite.
 */
export interface ResultsDocument extends Results {
  /**
   * Every number that was NaN or ±Infinity, as "path: value" (e.g. "cycles[0].period: Infinity");
   * each is written as null at its path. Absent when every number is finite.
   */
  nonFinite?: NonFiniteEntry[];
}

/**
 * results.json text. JSON has no NaN or ±Infinity: any such number becomes null, and its path is
 * listed under "nonFinite" so nothing is lost silently. Key order is the construction order,
 * which every pass keeps fixed, so equal results give equal bytes. (Any object is accepted, so
 * a test can serialise a part of Results.)
 */
export function serializeResults(results: object): string {
  const nonFinite: string[] = [];
  const walk = (value: unknown, path: string): unknown => {
    if (typeof value === "number") {
      if (Number.isFinite(value)) return value;
      nonFinite.push(`${path}: ${value}`);
      return null;
    }
    if (Array.isArray(value)) return value.map((v, i) => walk(v, `${path}[${i}]`));
    if (value instanceof Float64Array) return Array.from(value, (v, i) => walk(v, `${path}[${i}]`));
    if (value && typeof value === "object") {
      const out: Record<string, unknown> = {};
      for (const [k, v] of Object.entries(value))
        if (v !== undefined) out[k] = walk(v, path ? `${path}.${k}` : k);
      return out;
    }
    return value;
  };
  const clean = walk(results, "") as ResultsDocument;
  if (nonFinite.length) clean.nonFinite = nonFinite;
  return JSON.stringify(clean, null, 2) + "\n";
}

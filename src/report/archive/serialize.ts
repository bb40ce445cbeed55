/**
 * results.json text. JSON has no NaN or ±Infinity: any such number becomes null, and its path is
 * listed under "nonFinite" so nothing is lost silently. Key order is the construction order,
 * which every pass keeps fixed, so equal results give equal bytes.
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
      for (const [k, v] of Object.entries(value)) if (v !== undefined) out[k] = walk(v, path ? `${path}.${k}` : k);
      return out;
    }
    return value;
  };
  const clean = walk(results, "") as Record<string, unknown>;
  if (nonFinite.length) clean.nonFinite = nonFinite;
  return JSON.stringify(clean, null, 2) + "\n";
}

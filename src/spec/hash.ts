import { createHash } from "node:crypto";

/**
 * Canonical serialisation after RFC 8785 (JSON Canonicalization Scheme): object keys sorted by
 * UTF-16 code units, no whitespace, numbers in ECMAScript's shortest round-trip form.
 */
export function canonicalJson(value: unknown): string {
  if (typeof value === "number" && !Number.isFinite(value))
    throw new Error(`canonical JSON has no form for ${value}`);
  if (value === undefined) return "null";
  if (value === null || typeof value !== "object") return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  const entries = Object.keys(value as Record<string, unknown>)
    .sort()
    .filter((k) => (value as Record<string, unknown>)[k] !== undefined)
    .map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`);
  return `{${entries.join(",")}}`;
}

export function hashSpec(raw: unknown): string {
  return createHash("sha256").update(canonicalJson(raw), "utf8").digest("hex");
}

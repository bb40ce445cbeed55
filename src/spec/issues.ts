import { z } from "zod";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import { KeelSpecSchema } from "./schema.js";

type Path = (string | number)[];

/**
 * JSON.parse keeps "__proto__" as an own key, but copying it into a record (as validation does)
 * hits the prototype setter and the key vanishes silently; an own "constructor" or "prototype"
 * makes the object look like no plain record to the validator, which then gives messages that
 * miss the point. So they are refused before validation (as state or parameter names they are
 * reserved too). Iterative, so a deeply nested file cannot overflow the stack.
 */
const FORBIDDEN_KEYS = ["__proto__", "constructor", "prototype"];

export function findForbiddenKeys(raw: unknown): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const pending: { value: unknown; path: Path }[] = [{ value: raw, path: [] }];
  while (pending.length) {
    const { value, path } = pending.pop()!;
    if (value === null || typeof value !== "object") continue;
    if (Array.isArray(value)) {
      value.forEach((item, k) => pending.push({ value: item, path: [...path, k] }));
      continue;
    }
    for (const key of Object.keys(value)) {
      const child = [...path, key];
      if (FORBIDDEN_KEYS.includes(key))
        issues.push({ code: "forbidden_key", path: child, message: messages.forbiddenKey(key) });
      else pending.push({ value: (value as Record<string, unknown>)[key], path: child });
    }
  }
  return issues.reverse();
}

function valueAt(raw: unknown, path: Path): unknown {
  let node: unknown = raw;
  for (const part of path) {
    if (node === null || typeof node !== "object" || !Object.prototype.hasOwnProperty.call(node, part))
      return undefined;
    node = (node as Record<string | number, unknown>)[part];
  }
  return node;
}

/** The keys the schema accepts for the object at `path`, to suggest the one a typo meant. */
function knownKeysAt(path: Path): string[] {
  let node: z.ZodType | undefined = KeelSpecSchema;
  const unwrap = (n: z.ZodType): z.ZodType =>
    n instanceof z.ZodOptional ? unwrap(n.unwrap() as z.ZodType) : n;
  for (const part of path) {
    const current: z.ZodType = unwrap(node!);
    if (current instanceof z.ZodObject) node = (current.shape as Record<string, z.ZodType>)[String(part)];
    else if (current instanceof z.ZodArray) node = current.element as z.ZodType;
    else if (current instanceof z.ZodRecord) node = current.valueType as z.ZodType;
    else return [];
    if (!node) return [];
  }
  const last = unwrap(node!);
  return last instanceof z.ZodObject ? Object.keys(last.shape) : [];
}

/** Optimal string alignment distance: edits, counting a swap of neighbours as one. */
function editDistance(a: string, b: string): number {
  const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...Array(b.length).fill(0)] as number[]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1])
        d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}

/** Two edits catch the usual typo (a dropped, doubled or swapped letter) without wild guesses. */
const MAX_SUGGESTION_EDITS = 2;

function suggestKey(key: string, known: string[]): string | null {
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const candidate of known) {
    // the distance is at least the difference in length: a far longer key is no typo, and its
    // table (length × length) is not worth building
    if (Math.abs(key.length - candidate.length) > MAX_SUGGESTION_EDITS) continue;
    const distance = editDistance(key.toLowerCase(), candidate.toLowerCase());
    if (distance < bestDistance && distance <= MAX_SUGGESTION_EDITS && distance < candidate.length / 2) {
      best = candidate;
      bestDistance = distance;
    }
  }
  return best;
}

/** zod's issues as SpecIssues: an unknown key is located at the key itself; a missing key says so. */
export function fromZodIssues(zodIssues: z.core.$ZodIssue[], raw: unknown): SpecIssue[] {
  return zodIssues.flatMap((i): SpecIssue[] => {
    const path = i.path.map((p) => (typeof p === "symbol" ? String(p) : p));
    if (i.code === "unrecognized_keys") {
      const known = knownKeysAt(path);
      return i.keys.map((key) => ({
        code: "unknown_key",
        path: [...path, key],
        message: messages.unknownKey(key, suggestKey(key, known)),
      }));
    }
    const last = path[path.length - 1];
    const value = valueAt(raw, path);
    // JSON has no Infinity, but a literal such as 1e999 overflows to it; zod then says "expected number, received number"
    if (i.code === "invalid_type" && i.expected === "number" && typeof value === "number")
      return [{ code: "not_finite", path, message: messages.numberOverflows() }];
    if (
      (i.code === "invalid_type" || i.code === "invalid_value") &&
      typeof last === "string" &&
      value === undefined
    ) {
      const expected =
        i.code === "invalid_type"
          ? `a value of type ${i.expected}`
          : i.values.map((v) => JSON.stringify(v)).join(" or ");
      return [{ code: "missing_key", path, message: messages.missingKey(last, expected) }];
    }
    return [{ code: i.code, path, message: i.message }];
  });
}

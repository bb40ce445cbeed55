import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";

/**
 * Limits on a spec's text, checked by one linear, non-recursive pass before the text is parsed,
 * so that no later stage (validation, path-building, the expression parser) meets a hostile size
 * or depth. A spec is written by hand or by a short script: the examples are about 10 kB, five
 * levels deep, with strings of at most a few hundred characters. Each limit leaves wide room above
 * that.
 */
/** Bytes of a spec file (read with this cap, so a device or a huge file is never read whole). */
export const SPEC_MAX_BYTES = 4 * 1024 * 1024;
/** Nesting of objects and arrays; the deepest legal path is six levels (claims[k].point.N). */
export const SPEC_MAX_DEPTH = 32;
/** Characters of one string: a title, a label, an equation. */
export const SPEC_MAX_STRING = 20_000;
/** Entries of one array (states, parameters, scenarios, claims, …). */
export const SPEC_MAX_ARRAY = 10_000;

type Frame =
  { kind: "object"; key: string | null; keys: Map<string, number> } | { kind: "array"; index: number };

/** The JSON path of the value being read, from the open containers. */
function pathOf(stack: Frame[]): (string | number)[] {
  const path: (string | number)[] = [];
  for (const f of stack) {
    if (f.kind === "object") {
      if (f.key !== null) path.push(f.key);
    } else path.push(f.index);
  }
  return path;
}

/** 1-based line and column of an offset. */
function lineColumnAt(text: string, offset: number): { line: number; column: number } {
  let line = 1,
    start = 0;
  for (let k = text.indexOf("\n"); k !== -1 && k < offset; k = text.indexOf("\n", k + 1)) {
    line++;
    start = k + 1;
  }
  return { line, column: offset - start + 1 };
}

/** The end of the string starting at `open` (the offset of its closing quote), or -1 when it never closes. */
function stringEnd(text: string, open: number): number {
  for (let k = open + 1; k < text.length; k++) {
    const ch = text.charCodeAt(k);
    if (ch === 0x5c) k++;
    else if (ch === 0x22) return k;
  }
  return -1;
}

/** A key's text with its escapes decoded; the raw text when it is not a valid JSON string (the parser then reports it). */
function decodeKey(raw: string): string {
  try {
    return JSON.parse(raw) as string;
  } catch {
    return raw;
  }
}

/**
 * Every limit exceeded, and every key repeated within one object (JSON.parse keeps the last
 * silently, so a spec would read one way in an editor and be analysed another), as issues with
 * their JSON paths. Stops at the first excess of depth, which would make every later path
 * meaningless, and at the first over-long key, which every later path would repeat. Malformed JSON is left to the parser: the scan gives up quietly where it loses
 * its way.
 */
export function findLimitIssues(text: string): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const stack: Frame[] = [];
  /** In an object, the next string is a key. */
  let expectKey = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (ch === '"') {
      const end = stringEnd(text, i);
      if (end < 0) return issues;
      const top = stack[stack.length - 1];
      if (expectKey && top?.kind === "object") {
        top.key = null; // the path of the object itself, not of its previous key
        // a key is a string too: refused at the object's path, and the scan stops, so no message
        // (a later path, a repeat of it) prints the key
        if (end - i - 1 > SPEC_MAX_STRING) {
          issues.push({
            code: "limit_string",
            path: pathOf(stack),
            message: messages.stringTooLong(end - i - 1, SPEC_MAX_STRING),
          });
          return issues;
        }
        const key = decodeKey(text.slice(i, end + 1));
        const first = top.keys.get(key);
        if (first !== undefined) {
          const a = lineColumnAt(text, first),
            b = lineColumnAt(text, i);
          issues.push({
            code: "duplicate_key",
            path: [...pathOf(stack), key],
            message: messages.duplicateKey(key, a.line, a.column, b.line, b.column),
          });
        } else top.keys.set(key, i);
        top.key = key;
        expectKey = false;
      } else if (end - i - 1 > SPEC_MAX_STRING) {
        issues.push({
          code: "limit_string",
          path: pathOf(stack),
          message: messages.stringTooLong(end - i - 1, SPEC_MAX_STRING),
        });
      }
      i = end;
    } else if (ch === "{" || ch === "[") {
      if (stack.length >= SPEC_MAX_DEPTH) {
        issues.push({
          code: "limit_depth",
          path: pathOf(stack),
          message: messages.nestingTooDeep(SPEC_MAX_DEPTH),
        });
        return issues;
      }
      stack.push(ch === "{" ? { kind: "object", key: null, keys: new Map() } : { kind: "array", index: 0 });
      expectKey = ch === "{";
    } else if (ch === "}" || ch === "]") {
      stack.pop();
      expectKey = false;
    } else if (ch === ",") {
      const top = stack[stack.length - 1];
      if (top?.kind === "object") expectKey = true;
      else if (top?.kind === "array" && ++top.index === SPEC_MAX_ARRAY)
        issues.push({
          code: "limit_array",
          path: pathOf(stack.slice(0, -1)),
          message: messages.arrayTooLong(SPEC_MAX_ARRAY),
        });
    }
  }
  return issues;
}

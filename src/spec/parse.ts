import type { Parsed, SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import { KeelSpecSchema } from "./schema.js";
import { validateSpecRules } from "./validate.js";
import { normalizeSpec } from "./normalize.js";
import { hashSpec } from "./hash.js";
import type { NormalizedSpec } from "./types.js";

function lineColumn(text: string, position: number): { line: number; column: number } {
  const before = text.slice(0, position);
  const line = before.split("\n").length;
  return { line, column: position - before.lastIndexOf("\n") };
}

/** JSON text to a value, with a located message on a syntax error. */
export function parseJsonText(text: string): Parsed<unknown> {
  try {
    return { ok: true, value: JSON.parse(text) };
  } catch (err) {
    const detail = (err as Error).message;
    const match = /position (\d+)/.exec(detail);
    const pos = match ? Number(match[1]) : text.length;
    const { line, column } = lineColumn(text, pos);
    const lineText = text.split("\n")[line - 1] ?? "";
    return {
      ok: false,
      issues: [{
        code: "json_syntax",
        path: [],
        message: messages.jsonSyntax(detail.replace(/ in JSON at position \d+.*$/s, ""), line, column),
        source: { text: lineText.slice(0, 200), column },
      }],
    };
  }
}

/** Shape check (zod), cross-field rules, then normalisation. Collects every issue. */
export function parseSpecValue(raw: unknown): Parsed<NormalizedSpec> {
  const shaped = KeelSpecSchema.safeParse(raw);
  if (!shaped.success) {
    const issues: SpecIssue[] = shaped.error.issues.map((i) => ({
      code: i.code,
      path: i.path.map((p) => (typeof p === "symbol" ? String(p) : p)),
      message: i.message,
    }));
    return { ok: false, issues };
  }
  const ruleIssues = validateSpecRules(shaped.data);
  if (ruleIssues.length) return { ok: false, issues: ruleIssues };
  return { ok: true, value: normalizeSpec(shaped.data, hashSpec(raw)) };
}

export function parseSpecText(text: string): Parsed<NormalizedSpec> {
  const json = parseJsonText(text);
  return json.ok ? parseSpecValue(json.value) : json;
}

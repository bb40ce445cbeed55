import type { Parsed } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import { KeelSpecSchema } from "./schema.js";
import { validateSpecRules } from "./validate.js";
import { normalizeSpec } from "./normalize.js";
import { hashSpec } from "./hash.js";
import { showInvisibleDeep } from "../diagnostics/visible.js";
import { locateJsonFault } from "./json-locate.js";
import { findLimitIssues, SPEC_MAX_BYTES } from "./limits.js";
import { findForbiddenKeys, fromZodIssues } from "./issues.js";
import type { NormalizedSpec } from "./types.js";

function lineColumn(text: string, position: number): { line: number; column: number } {
  const before = text.slice(0, position);
  const line = before.split("\n").length;
  return { line, column: position - before.lastIndexOf("\n") };
}

/** Shown from a long line (a minified file): enough either side of the fault to recognise it. */
const SOURCE_CONTEXT = 80;

/** A byte-order mark, which some editors write; RFC 8259 section 8.1 lets a parser ignore it. */
const BYTE_ORDER_MARK = "\uFEFF";

/** JSON text to a value, with a located message on a syntax error. */
export function parseJsonText(text: string): Parsed<unknown> {
  const body = text.startsWith(BYTE_ORDER_MARK) ? text.slice(1) : text;
  if (body.length > SPEC_MAX_BYTES)
    return {
      ok: false,
      issues: [{ code: "limit_size", path: [], message: messages.textTooLarge(body.length, SPEC_MAX_BYTES) }],
    };
  // sizes, depth and repeated keys before JSON.parse: later stages never meet a hostile shape
  const limits = findLimitIssues(body);
  if (limits.length) return { ok: false, issues: limits };
  try {
    return { ok: true, value: JSON.parse(body) };
  } catch (err) {
    // V8 omits the position of some faults; our own scan finds it, the engine's message is the fallback
    const fault = locateJsonFault(body) ?? { offset: body.length, detail: (err as Error).message };
    const { line, column } = lineColumn(body, fault.offset);
    const lineText = body.split("\n")[line - 1] ?? "";
    const start = Math.max(0, column - 1 - SOURCE_CONTEXT);
    return {
      ok: false,
      issues: [
        {
          code: "json_syntax",
          path: [],
          message: messages.jsonSyntax(fault.detail, line, column),
          source: { text: lineText.slice(start, column - 1 + SOURCE_CONTEXT), column: column - start },
        },
      ],
    };
  }
}

/** Shape check (zod), cross-field rules, then normalisation. Collects every issue. */
export function parseSpecValue(raw: unknown): Parsed<NormalizedSpec> {
  const forbidden = findForbiddenKeys(raw);
  if (forbidden.length) return { ok: false, issues: forbidden };
  const shaped = KeelSpecSchema.safeParse(raw);
  if (!shaped.success) return { ok: false, issues: fromZodIssues(shaped.error.issues, raw) };
  const ruleIssues = validateSpecRules(shaped.data);
  if (ruleIssues.length) return { ok: false, issues: ruleIssues };
  // free text reaches terminals and dossiers: controls and direction overrides are shown, not obeyed
  return { ok: true, value: showInvisibleDeep(normalizeSpec(shaped.data, hashSpec(raw))) };
}

export function parseSpecText(text: string): Parsed<NormalizedSpec> {
  const json = parseJsonText(text);
  return json.ok ? parseSpecValue(json.value) : json;
}

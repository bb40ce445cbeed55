import { messages } from "../diagnostics/messages.js";

/**
 * Finds where JSON text stops being valid (RFC 8259's grammar), for the error message.
 * Called only after JSON.parse has failed: V8's messages omit the position of some faults
 * ("Unexpected token 'x', ... is not valid JSON"), and their wording changes between Node
 * versions. Iterative, so deep nesting cannot overflow the stack.
 */
export interface JsonFault {
  /** 0-based offset of the offending character (text.length when the file ends early). */
  offset: number;
  detail: string;
}

const WHITESPACE = " \t\n\r";
const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
const ESCAPES = '"\\/bfnrt';

type Expect = "value" | "value-or-close" | "key" | "key-or-close" | "after-value";

function describeFound(ch: string): string {
  return /^[\x20-\x7e]$/.test(ch) ? `'${ch}'` : JSON.stringify(ch);
}

/** The scanner's state: the text, the position, the open containers, and what may come next. */
interface Scan {
  readonly text: string;
  i: number;
  readonly stack: ("{" | "[")[];
  expect: Expect;
}

/** A step's verdict: a fault, the end of a valid document, or null to go on. */
type Step = JsonFault | "end" | null;

const fault = (offset: number, detail: string): JsonFault => ({ offset, detail });

function skipWhitespace(scan: Scan): void {
  while (scan.i < scan.text.length && WHITESPACE.includes(scan.text[scan.i])) scan.i++;
}

/** Scans a string starting at its opening quote; returns a fault or moves past the closing quote. */
function scanString(scan: Scan): JsonFault | null {
  const { text } = scan;
  const start = scan.i++;
  while (scan.i < text.length) {
    const ch = text[scan.i];
    if (ch === '"') {
      scan.i++;
      return null;
    }
    if (ch === "\\") {
      const next = text[scan.i + 1];
      if (next !== undefined && ESCAPES.includes(next)) scan.i += 2;
      else if (next === "u" && /^[0-9a-fA-F]{4}$/.test(text.slice(scan.i + 2, scan.i + 6))) scan.i += 6;
      else return fault(scan.i, messages.jsonBadEscape());
      continue;
    }
    if (ch.charCodeAt(0) < 0x20) return fault(scan.i, messages.jsonControlInString());
    scan.i++;
  }
  return fault(start, messages.jsonUnterminatedString());
}

function open(scan: Scan, bracket: "{" | "["): null {
  scan.stack.push(bracket);
  scan.i++;
  scan.expect = bracket === "{" ? "key-or-close" : "value-or-close";
  return null;
}

function close(scan: Scan): null {
  scan.stack.pop();
  scan.i++;
  scan.expect = "after-value";
  return null;
}

/** A scalar: a string, a number or a literal. */
function scanScalar(scan: Scan, ch: string): Step {
  scan.expect = "after-value";
  if (ch === '"') return scanString(scan);
  if (ch === "-" || (ch >= "0" && ch <= "9")) {
    NUMBER.lastIndex = scan.i;
    const match = NUMBER.exec(scan.text);
    const end = match ? scan.i + match[0].length : scan.i;
    if (!match || /[0-9.eE+-]/.test(scan.text[end] ?? "")) return fault(scan.i, messages.jsonBadNumber());
    scan.i = end;
    return null;
  }
  const literal = ["true", "false", "null"].find((word) => scan.text.startsWith(word, scan.i));
  if (literal) {
    scan.i += literal.length;
    return null;
  }
  if (ch === "'") return fault(scan.i, messages.jsonSingleQuotes());
  return fault(scan.i, messages.jsonExpected("a value", describeFound(ch)));
}

/** Where a value is expected (or, in an array, its closing bracket). */
function stepValue(scan: Scan, ch: string | undefined): Step {
  if (ch === undefined) return fault(scan.i, messages.jsonEndOfFile("a value"));
  if (scan.expect === "value-or-close" && ch === "]") return close(scan);
  if (ch === "{" || ch === "[") return open(scan, ch);
  return scanScalar(scan, ch);
}

/** Where a key is expected (or, in an object, its closing brace): the key, then its colon. */
function stepKey(scan: Scan, ch: string | undefined): Step {
  if (ch === undefined) return fault(scan.i, messages.jsonEndOfFile("a key in double quotes"));
  if (scan.expect === "key-or-close" && ch === "}") return close(scan);
  if (ch === "'") return fault(scan.i, messages.jsonSingleQuotes());
  if (ch !== '"') return fault(scan.i, messages.jsonExpected("a key in double quotes", describeFound(ch)));
  const bad = scanString(scan);
  if (bad) return bad;
  skipWhitespace(scan);
  const colon = scan.text[scan.i];
  if (colon === undefined) return fault(scan.i, messages.jsonEndOfFile("':'"));
  if (colon !== ":") return fault(scan.i, messages.jsonExpected("':' after the key", describeFound(colon)));
  scan.i++;
  scan.expect = "value";
  return null;
}

/** After a value: the end of the document, a comma, or the enclosing container's close. */
function stepAfterValue(scan: Scan, ch: string | undefined): Step {
  const top = scan.stack[scan.stack.length - 1];
  if (top === undefined) return ch === undefined ? "end" : fault(scan.i, messages.jsonTrailing());
  const closing = top === "{" ? "}" : "]";
  if (ch === undefined) return fault(scan.i, messages.jsonEndOfFile(`',' or '${closing}'`));
  if (ch === ",") {
    scan.i++;
    scan.expect = top === "{" ? "key" : "value";
    return null;
  }
  if (ch === closing) return close(scan);
  return fault(scan.i, messages.jsonExpected(`',' or '${closing}'`, describeFound(ch)));
}

const STEPS: Record<Expect, (scan: Scan, ch: string | undefined) => Step> = {
  value: stepValue,
  "value-or-close": stepValue,
  key: stepKey,
  "key-or-close": stepKey,
  "after-value": stepAfterValue,
};

export function locateJsonFault(text: string): JsonFault | null {
  const scan: Scan = { text, i: 0, stack: [], expect: "value" };
  for (;;) {
    skipWhitespace(scan);
    const ch: string | undefined = text[scan.i];
    const step = STEPS[scan.expect](scan, ch);
    if (step === "end") return null;
    if (step) return step;
  }
}

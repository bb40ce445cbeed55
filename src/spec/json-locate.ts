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
const ESCAPES = "\"\\/bfnrt";

type Expect = "value" | "value-or-close" | "key" | "key-or-close" | "after-value";

function describeFound(ch: string): string {
  return /^[\x20-\x7e]$/.test(ch) ? `'${ch}'` : JSON.stringify(ch);
}

export function locateJsonFault(text: string): JsonFault | null {
  const stack: ("{" | "[")[] = [];
  let i = 0;
  let expect: Expect = "value";
  const at = (offset: number, detail: string): JsonFault => ({ offset, detail });

  /** Scans a string starting at its opening quote; returns a fault or moves i past the closing quote. */
  const scanString = (): JsonFault | null => {
    const start = i++;
    while (i < text.length) {
      const ch = text[i];
      if (ch === '"') {
        i++;
        return null;
      }
      if (ch === "\\") {
        const next = text[i + 1];
        if (next !== undefined && ESCAPES.includes(next)) i += 2;
        else if (next === "u" && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) i += 6;
        else return at(i, messages.jsonBadEscape());
        continue;
      }
      if (ch.charCodeAt(0) < 0x20) return at(i, messages.jsonControlInString());
      i++;
    }
    return at(start, messages.jsonUnterminatedString());
  };

  for (;;) {
    while (i < text.length && WHITESPACE.includes(text[i])) i++;
    const ch = text[i];
    const top = stack[stack.length - 1];
    if (expect === "value" || expect === "value-or-close") {
      if (ch === undefined) return at(i, messages.jsonEndOfFile("a value"));
      if (expect === "value-or-close" && ch === "]") {
        stack.pop();
        i++;
        expect = "after-value";
        continue;
      }
      if (ch === "{" || ch === "[") {
        stack.push(ch);
        i++;
        expect = ch === "{" ? "key-or-close" : "value-or-close";
        continue;
      }
      expect = "after-value";
      if (ch === '"') {
        const fault = scanString();
        if (fault) return fault;
        continue;
      }
      if (ch === "-" || (ch >= "0" && ch <= "9")) {
        NUMBER.lastIndex = i;
        const match = NUMBER.exec(text);
        const end = match ? i + match[0].length : i;
        if (!match || /[0-9.eE+-]/.test(text[end] ?? "")) return at(i, messages.jsonBadNumber());
        i = end;
        continue;
      }
      const literal = ["true", "false", "null"].find((word) => text.startsWith(word, i));
      if (literal) {
        i += literal.length;
        continue;
      }
      if (ch === "'") return at(i, messages.jsonSingleQuotes());
      return at(i, messages.jsonExpected("a value", describeFound(ch)));
    }
    if (expect === "key" || expect === "key-or-close") {
      if (ch === undefined) return at(i, messages.jsonEndOfFile("a key in double quotes"));
      if (expect === "key-or-close" && ch === "}") {
        stack.pop();
        i++;
        expect = "after-value";
        continue;
      }
      if (ch === "'") return at(i, messages.jsonSingleQuotes());
      if (ch !== '"') return at(i, messages.jsonExpected("a key in double quotes", describeFound(ch)));
      const fault = scanString();
      if (fault) return fault;
      while (i < text.length && WHITESPACE.includes(text[i])) i++;
      if (text[i] === undefined) return at(i, messages.jsonEndOfFile("':'"));
      if (text[i] !== ":") return at(i, messages.jsonExpected("':' after the key", describeFound(text[i])));
      i++;
      expect = "value";
      continue;
    }
    // after a value
    if (top === undefined) return ch === undefined ? null : at(i, messages.jsonTrailing());
    const close = top === "{" ? "}" : "]";
    if (ch === undefined) return at(i, messages.jsonEndOfFile(`',' or '${close}'`));
    if (ch === ",") {
      i++;
      expect = top === "{" ? "key" : "value";
    } else if (ch === close) {
      stack.pop();
      i++;
    } else return at(i, messages.jsonExpected(`',' or '${close}'`, describeFound(ch)));
  }
}

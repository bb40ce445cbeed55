/**
 * Characters that change how text around them is shown rather than showing themselves: C0 and C1
 * controls (a terminal obeys ESC sequences), bidirectional embeddings, overrides, isolates and
 * marks (text that reads one way and is stored another: Unicode Technical Standard #39 and
 * CVE-2021-42574, "Trojan Source"), zero-width characters, and the Unicode line and paragraph
 * separators (U+2028, U+2029: a break to some readers, none to HTML). Tab and line breaks stay.
 */
const INVISIBLE =
  // eslint-disable-next-line no-control-regex -- matching control characters is the point
  /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F-\u009F\u061C\u200B-\u200F\u2028-\u202E\u2060\u2066-\u2069\uFEFF]/g;

/** The text with each such character written out visibly, as ⟨U+XXXX⟩. */
export function showInvisible(text: string): string {
  return text.replace(
    INVISIBLE,
    (ch) => `⟨U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")}⟩`,
  );
}

/** Every string in a JSON-like value passed through showInvisible; other values as they are. */
export function showInvisibleDeep<T>(value: T): T {
  if (typeof value === "string") return showInvisible(value) as T;
  if (Array.isArray(value)) return value.map((v) => showInvisibleDeep(v)) as T;
  if (value !== null && typeof value === "object")
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, showInvisibleDeep(v)])) as T;
  return value;
}

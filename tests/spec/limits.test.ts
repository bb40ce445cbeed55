/**
 * Limits on a spec's text (spec/limits.ts) and its encoding (cli/io.ts), checked before the
 * text is parsed. The limits are keel's own (named constants); the encoding rules are RFC 8259
 * (JSON) §8.1, "JSON text exchanged between systems … MUST be encoded using UTF-8", and the
 * UTF-8 byte table of RFC 3629 §4.
 */
import { isUtf8 } from "node:buffer";
import fc from "fast-check";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { parseSpecText } from "../../src/spec/parse.js";
import { SPEC_MAX_ARRAY, SPEC_MAX_DEPTH, SPEC_MAX_STRING } from "../../src/spec/limits.js";
import { firstInvalidUtf8 } from "../../src/cli/io.js";

const BASE_TEXT = readFileSync(join(import.meta.dirname, "../fixtures/bad/base-spec.json"), "utf8");

function issuesOf(text: string) {
  const parsed = parseSpecText(text);
  if (parsed.ok) throw new Error("expected the spec to be refused");
  return parsed.issues;
}

describe("parseSpecText on hostile sizes and shapes", () => {
  it("parseSpecText(arrays nested 100 000 deep) refuses at the depth limit, with the path so far", () => {
    const text = BASE_TEXT.replace(/}\s*$/, `, "x": ${"[".repeat(100_000)}${"]".repeat(100_000)} }`);
    const issues = issuesOf(text);
    expect(issues).toHaveLength(1);
    expect(issues[0].code).toBe("limit_depth");
    // the top-level object is one level, the arrays under "x" the other SPEC_MAX_DEPTH − 1
    expect(issues[0].path).toEqual(["x", ...Array.from({ length: SPEC_MAX_DEPTH - 1 }, () => 0)]);
  });

  it("parseSpecText(a title one character over SPEC_MAX_STRING) names the title and both lengths", () => {
    const spec = JSON.parse(BASE_TEXT) as { title: string };
    spec.title = "t".repeat(SPEC_MAX_STRING + 1);
    const issues = issuesOf(JSON.stringify(spec));
    expect(issues.map((i) => [i.code, i.path])).toEqual([["limit_string", ["title"]]]);
    expect(issues[0].message).toContain(String(SPEC_MAX_STRING + 1));
    spec.title = "t".repeat(SPEC_MAX_STRING);
    expect(parseSpecText(JSON.stringify(spec)).ok).toBe(true);
  });

  it("parseSpecText(a key one character over SPEC_MAX_STRING) refuses it at its object, without repeating it", () => {
    const key = "k".repeat(SPEC_MAX_STRING + 1);
    const issues = issuesOf(BASE_TEXT.replace(/}\s*$/, `, "x": { "${key}": 1 } }`));
    expect(issues.map((i) => [i.code, i.path])).toEqual([["limit_string", ["x"]]]);
    expect(issues[0].message).not.toContain(key.slice(0, 100));
  });

  it("parseSpecText(an array of SPEC_MAX_ARRAY + 1 cautions) refuses it at cautions", () => {
    const spec = JSON.parse(BASE_TEXT) as { cautions?: string[] };
    spec.cautions = Array.from({ length: SPEC_MAX_ARRAY + 1 }, () => "c");
    expect(issuesOf(JSON.stringify(spec)).map((i) => [i.code, i.path])).toEqual([
      ["limit_array", ["cautions"]],
    ]);
  });

  it("parseSpecText(a key given twice) names the key, its object and both positions", () => {
    // line 2 of the compact text below holds both keys; columns counted by hand
    const text = BASE_TEXT.replace(/^\{/, '{\n"purpose": "one", "purpose": "two",');
    const issues = issuesOf(text);
    expect(issues.map((i) => [i.code, i.path])).toEqual([["duplicate_key", ["purpose"]]]);
    expect(issues[0].message).toContain("line 2, column 1 and line 2, column 19");
  });

  it("parseSpecText(a key repeated under an escape, and the same key in two objects) refuses the first, accepts the second", () => {
    expect(issuesOf('{"a": 1, "\\u0061": 2}').map((i) => i.path)).toEqual([["a"]]);
    const twoObjects = issuesOf('{"p": {"a": 1}, "q": {"a": 2}}').filter((i) => i.code === "duplicate_key");
    expect(twoObjects).toEqual([]);
  });

  it("parseSpecText(an own constructor key) refuses the key itself, not the record around it", () => {
    const text = BASE_TEXT.replace('"equations": {', '"equations": {\n    "constructor": "x",');
    const issues = issuesOf(text);
    expect(issues.map((i) => [i.code, i.path])).toEqual([["forbidden_key", ["equations", "constructor"]]]);
  });
});

describe("firstInvalidUtf8 against RFC 3629 and Node's own validator", () => {
  // RFC 3629 §4 and its examples (§7): valid sequences of 1 to 4 bytes, and the ill-formed kinds
  const cases: [string, number[], number][] = [
    ["ASCII", [0x7b, 0x7d], -1],
    ["U+20AC (three bytes, RFC 3629 §7)", [0x22, 0xe2, 0x82, 0xac, 0x22], -1],
    ["U+233B4 (four bytes, RFC 3629 §7)", [0xf0, 0xa3, 0x8e, 0xb4], -1],
    ["a lone continuation byte", [0x41, 0x80], 1],
    ["an overlong '/' (C0 AF)", [0xc0, 0xaf], 0],
    ["a surrogate (ED A0 80)", [0x20, 0xed, 0xa0, 0x80], 1],
    ["above U+10FFFF (F4 90 80 80)", [0xf4, 0x90, 0x80, 0x80], 0],
    ["a sequence cut short at the end", [0x41, 0xe2, 0x82], 1],
    ["FF, never in UTF-8", [0xff], 0],
  ];
  for (const [name, bytes, at] of cases)
    it(`firstInvalidUtf8(${name}) = ${at}`, () => expect(firstInvalidUtf8(Buffer.from(bytes))).toBe(at));

  it("firstInvalidUtf8 agrees with node:buffer isUtf8 on 3000 seeded byte strings", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 12 }), (bytes) => {
        const buffer = Buffer.from(bytes);
        expect(firstInvalidUtf8(buffer) === -1).toBe(isUtf8(buffer));
      }),
      { seed: 20261203, numRuns: 3000 },
    );
  });
});

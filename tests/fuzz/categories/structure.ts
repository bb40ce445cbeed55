/**
 * json-structure: files that are not JSON, or JSON of the wrong shape (RFC 8259 grammar; keel's
 * own caps on depth, duplicate keys and types, README "Limits").
 */
import fc from "fast-check";
import { baseSpec, specCase, specText, type FuzzCase, type Json } from "../base.js";
import { draw, setAt } from "../mutate.js";

const C = "json-structure";
const DEEP = 100_000;

function truncations(seed: number): FuzzCase[] {
  const text = specText(baseSpec());
  // any cut before the final brace leaves an unclosed object: never valid JSON
  const cuts = draw(fc.integer({ min: 0, max: text.length - 1 }), seed, 30);
  return cuts.map((at) => specCase(C, `truncated at byte ${at}`, text.slice(0, at), "check", { expect: 2 }));
}

function deepNesting(): FuzzCase[] {
  const arrays = "[".repeat(DEEP) + "]".repeat(DEEP);
  const objects = '{"a":'.repeat(DEEP) + "1" + "}".repeat(DEEP);
  const base = specText(baseSpec());
  const inside = (value: string) => base.replace('"cautions": [', `"cautions": [${value}, `);
  const cases: [string, string][] = [
    ["100k nested arrays as the file", arrays],
    ["100k nested objects as the file", objects],
    ["100k unclosed arrays", "[".repeat(DEEP)],
    ["100k nested arrays inside cautions", inside(arrays)],
    ["100k nested objects inside cautions", inside(objects)],
    ["33 nested arrays inside cautions", inside("[".repeat(33) + "]".repeat(33))],
    ["100k closing brackets", "]".repeat(DEEP)],
  ];
  return cases.map(([name, text]) => specCase(C, name, text, "check", { expect: 2 }));
}

function repeatedKeys(): FuzzCase[] {
  const base = specText(baseSpec());
  const cases: [string, string][] = [
    ["id given twice", base.replace('"id": "fuzz-base",', '"id": "fuzz-base",\n  "id": "other",')],
    ["keel given twice", base.replace('"keel": 1,', '"keel": 1,\n  "keel": 1,')],
    ["equations given twice", base.replace('"equations": {', '"equations": { "u": "u" },\n  "equations": {')],
    ["an equation key twice", base.replace('"equations": {', '"equations": {\n    "u": "0",')],
    ["__proto__ twice", base.replace('"keel": 1,', '"__proto__": {}, "__proto__": {}, "keel": 1,')],
    ["a state name key twice", base.replace('"name": "u",', '"name": "u", "name": "v",')],
    ["window key twice", base.replace('"window": {', '"window": { "u": [0, 1],')],
    [
      "a key twice with an escape",
      base.replace('"id": "fuzz-base",', '"id": "fuzz-base",\n  "\\u0069d": "x",'),
    ],
  ];
  return cases.map(([name, text]) => specCase(C, name, text, "check", { expect: 2 }));
}

const WRONG_VALUES: Json[] = [null, 0, -1, "text", "", [], {}, true, [null], [[]], { a: {} }];

function wrongTypes(seed: number): FuzzCase[] {
  const keys = Object.keys(baseSpec());
  const picks = draw(fc.tuple(fc.constantFrom(...keys), fc.constantFrom(...WRONG_VALUES)), seed, 40);
  return picks.map(([key, value]) => {
    const spec = baseSpec();
    setAt(spec, [key], value);
    return specCase(C, `${key} := ${JSON.stringify(value)}`, specText(spec));
  });
}

function oddFiles(): FuzzCase[] {
  const base = specText(baseSpec());
  const cases: [string, string, (0 | 2)?][] = [
    ["empty file", "", 2],
    ["whitespace only", " \n\t\r\n ", 2],
    ["top-level array", "[]", 2],
    ["top-level number", "1", 2],
    ["top-level string", '"spec"', 2],
    ["top-level null", "null", 2],
    ["trailing garbage", `${base} x`, 2],
    ["two documents", `${base}\n${base}`, 2],
    ["a line comment", `// spec\n${base}`, 2],
    ["a block comment", base.replace('"keel": 1,', '/* c */ "keel": 1,'), 2],
    ["a trailing comma", base.replace('"keel": 1,', '"keel": 1,,'), 2],
    ["a NaN literal", base.replace('"value": 1,', '"value": NaN,'), 2],
    ["an Infinity literal", base.replace('"value": 1,', '"value": Infinity,'), 2],
    ["single quotes", base.replace('"keel"', "'keel'"), 2],
    ["an unterminated string", base.replace('"fuzz-base",', '"fuzz-base,'), 2],
    ["a bad escape", base.replace('"fuzz-base"', '"fuzz\\x-base"'), 2],
    ["CRLF line ends", base.split("\n").join("\r\n")],
    ["CR line ends", base.split("\n").join("\r")],
    ["one line", JSON.stringify(baseSpec())],
    ["a hex number", base.replace('"value": 1,', '"value": 0x1,'), 2],
    ["a leading plus", base.replace('"value": 1,', '"value": +1,'), 2],
    ["a leading zero", base.replace('"value": 1,', '"value": 01,'), 2],
  ];
  return cases.map(([name, text, expect]) => specCase(C, name, text, "check", expect ? { expect } : {}));
}

function byteEdits(seed: number): FuzzCase[] {
  const text = specText(baseSpec());
  const edit = fc.tuple(
    fc.integer({ min: 0, max: text.length - 1 }),
    fc.constantFrom("delete", "insert", "replace"),
    fc.constantFrom(...'{}[]:,"\\0123456789-.eE tnfu\n'),
  );
  return draw(edit, seed, 30).map(([at, op, ch]) => {
    const edited =
      op === "delete"
        ? text.slice(0, at) + text.slice(at + 1)
        : text.slice(0, at) + ch + text.slice(op === "insert" ? at : at + 1);
    return specCase(C, `${op} ${JSON.stringify(ch)} at ${at}`, edited);
  });
}

export function jsonStructureCases(seed: number): FuzzCase[] {
  return [
    ...truncations(seed),
    ...deepNesting(),
    ...repeatedKeys(),
    ...wrongTypes(seed + 1),
    ...oddFiles(),
    ...byteEdits(seed + 2),
  ];
}

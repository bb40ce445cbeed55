import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { canonicalJson, hashSpec } from "../../src/spec/hash.js";
import { parseSpecText } from "../../src/spec/parse.js";
import { exampleSpecText } from "../fixtures/examples.js";

const sha256 = (text: string) => createHash("sha256").update(text, "utf8").digest("hex");

const fromBits = (hex: string) => {
  const view = new DataView(new ArrayBuffer(8));
  view.setBigUint64(0, BigInt(`0x${hex}`));
  return view.getFloat64(0);
};

describe("canonicalJson", () => {
  it("canonicalJson sorts keys recursively and drops whitespace", () => {
    const value = { b: [3, { z: 1, a: { d: null, c: true } }], a: "x", c: { y: 2, x: 1 } };
    expect(canonicalJson(value)).toBe('{"a":"x","b":[3,{"a":{"c":true,"d":null},"z":1}],"c":{"x":1,"y":2}}');
  });

  it("canonicalJson keeps array order and serialises literals", () => {
    expect(canonicalJson([3, 1, 2])).toBe("[3,1,2]");
    expect(canonicalJson([true, false, null, "s", 0])).toBe('[true,false,null,"s",0]');
    expect(canonicalJson({})).toBe("{}");
    expect(canonicalJson([])).toBe("[]");
  });

  it("canonicalJson leaves out undefined members, as JSON does", () => {
    expect(canonicalJson({ b: 1, a: undefined })).toBe('{"b":1}');
  });

  // Rundgren, Jordan and Erdtman, RFC 8785 JSON Canonicalization Scheme (2020), section 3.2.3:
  // keys sort by their UTF-16 code units, so the emoji (a surrogate pair, 0xD83D…) sorts before
  // U+FB33 although its code point is larger.
  it("canonicalJson sorts keys as in RFC 8785 section 3.2.3", () => {
    const input = {
      "\u20ac": "Euro Sign",
      "\r": "Carriage Return",
      "\ufb33": "Hebrew Letter Dalet With Dagesh",
      "1": "One",
      "\ud83d\ude00": "Emoji: Grinning Face",
      "\u0080": "Control",
      "\u00f6": "Latin Small Letter O With Diaeresis",
    };
    expect(canonicalJson(input)).toBe(
      '{"\\r":"Carriage Return","1":"One","\u0080":"Control","\u00f6":"Latin Small Letter O With Diaeresis",' +
        '"\u20ac":"Euro Sign","\ud83d\ude00":"Emoji: Grinning Face","\ufb33":"Hebrew Letter Dalet With Dagesh"}',
    );
  });

  // RFC 8785 section 3.2.2.2: string escaping example
  it("canonicalJson escapes strings as in RFC 8785 section 3.2.2.2", () => {
    const input = JSON.parse('"\\u20ac$\\u000F\\u000aA\'\\u0042\\u0022\\u005c\\\\\\"\\/"') as string;
    expect(canonicalJson(input)).toBe('"\u20ac$\\u000f\\nA\'B\\"\\\\\\\\\\"/"');
  });

  // RFC 8785 appendix B: IEEE 754 bit patterns and their canonical text (values from memory;
  // they are ECMAScript's Number-to-String, which RFC 8785 adopts)
  const numbers: [string, string][] = [
    ["0000000000000000", "0"],
    ["8000000000000000", "0"],
    ["0000000000000001", "5e-324"],
    ["8000000000000001", "-5e-324"],
    ["7fefffffffffffff", "1.7976931348623157e+308"],
    ["4340000000000000", "9007199254740992"],
    ["4430000000000000", "295147905179352830000"],
    ["44b52d02c7e14af5", "9.999999999999997e+22"],
    ["44b52d02c7e14af6", "1e+23"],
    ["444b1ae4d6e2ef50", "1e+21"],
    ["3eb0c6f7a0b5ed8d", "0.000001"],
    ["3eb0c6f7a0b5ed8c", "9.999999999999997e-7"],
    ["41b3de4355555555", "333333333.3333333"],
    ["becbf647612f3696", "-0.0000033333333333333333"],
  ];
  for (const [bits, text] of numbers) {
    it(`canonicalJson(0x${bits}) is ${text} (RFC 8785 appendix B)`, () => {
      expect(canonicalJson(fromBits(bits))).toBe(text);
      expect(canonicalJson({ v: fromBits(bits) })).toBe(`{"v":${text}}`);
    });
  }
});

describe("hashSpec", () => {
  it("hashSpec is the SHA-256 of the canonical text, in lower-case hex", () => {
    const value = { b: 1, a: [1, 2, { d: "x", c: 0.5 }] };
    expect(canonicalJson(value)).toBe('{"a":[1,2,{"c":0.5,"d":"x"}],"b":1}');
    expect(hashSpec(value)).toBe(sha256('{"a":[1,2,{"c":0.5,"d":"x"}],"b":1}'));
    expect(hashSpec(value)).toMatch(/^[0-9a-f]{64}$/);
  });

  const specText = exampleSpecText("reservoir-competition");
  const spec = JSON.parse(specText) as Record<string, unknown>;

  /** The same object with every key order reversed, at every depth. */
  const reversed = (value: unknown): unknown => {
    if (Array.isArray(value)) return value.map(reversed);
    if (value && typeof value === "object")
      return Object.fromEntries(
        Object.entries(value)
          .reverse()
          .map(([k, v]) => [k, reversed(v)]),
      );
    return value;
  };

  it("hashSpec is invariant under key reordering", () => {
    const other = reversed(spec);
    expect(JSON.stringify(other)).not.toBe(JSON.stringify(spec));
    expect(hashSpec(other)).toBe(hashSpec(spec));
  });

  it("parseSpecText gives the same sha256 whatever the whitespace and key order", () => {
    const compact = JSON.stringify(reversed(spec));
    const loose = JSON.stringify(spec, null, 7).replace(/\n/g, "\r\n\t");
    const a = parseSpecText(specText);
    const b = parseSpecText(compact);
    const c = parseSpecText(loose);
    if (!a.ok || !b.ok || !c.ok) throw new Error("example spec did not parse");
    expect(a.value.sha256).toBe(hashSpec(spec));
    expect(b.value.sha256).toBe(a.value.sha256);
    expect(c.value.sha256).toBe(a.value.sha256);
  });

  it("hashSpec changes when a value, a key or an array order changes", () => {
    const base = hashSpec(spec);
    const params = spec.parameters as { name: string; value: number }[];
    const changedValue = {
      ...spec,
      parameters: params.map((p, i) => (i === 0 ? { ...p, value: p.value + 1e-12 } : p)),
    };
    const changedOrder = { ...spec, parameters: [...params].reverse() };
    const changedKey = { ...spec, cautions: undefined, caution: spec.cautions };
    const changedText = { ...spec, title: `${spec.title as string} ` };
    const hashes = [changedValue, changedOrder, changedKey, changedText].map(hashSpec);
    for (const h of hashes) expect(h).not.toBe(base);
    expect(new Set(hashes).size).toBe(hashes.length);
  });
});

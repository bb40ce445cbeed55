/**
 * encoding: bytes that are not well-formed UTF-8 JSON (RFC 8259 §8.1: UTF-8 only; RFC 3629 §3-4:
 * overlong forms, surrogates and code points past U+10FFFF are ill-formed), and NUL bytes.
 */
import fc from "fast-check";
import { baseSpec, specCase, specText, type FuzzCase } from "../base.js";
import { draw } from "../mutate.js";

const C = "encoding";

const utf16be = (text: string): Buffer => {
  const le = Buffer.from(text, "utf16le");
  for (let k = 0; k + 1 < le.length; k += 2) [le[k], le[k + 1]] = [le[k + 1], le[k]];
  return le;
};

const utf32le = (text: string): Buffer => {
  const points = [...text].map((ch) => ch.codePointAt(0)!);
  const out = Buffer.alloc(points.length * 4);
  points.forEach((p, k) => out.writeUInt32LE(p, k * 4));
  return out;
};

/** The base text with `bytes` spliced into the title string. */
function inTitle(bytes: number[]): Buffer {
  const text = specText(baseSpec());
  const at = text.indexOf('"title": "') + '"title": "'.length;
  return Buffer.concat([Buffer.from(text.slice(0, at)), Buffer.from(bytes), Buffer.from(text.slice(at))]);
}

function fixedCases(): FuzzCase[] {
  const text = specText(baseSpec());
  const bytes: [string, Uint8Array, (0 | 2)?][] = [
    ["UTF-16LE with BOM", Buffer.from(`\ufeff${text}`, "utf16le"), 2],
    ["UTF-16BE with BOM", utf16be(`\ufeff${text}`), 2],
    ["UTF-16LE without BOM", Buffer.from(text, "utf16le"), 2],
    ["UTF-16BE without BOM", utf16be(text), 2],
    ["UTF-32LE with BOM", utf32le(`\ufeff${text}`), 2],
    ["UTF-8 BOM", Buffer.from(`\ufeff${text}`, "utf8")],
    ["two UTF-8 BOMs", Buffer.from(`\ufeff\ufeff${text}`, "utf8"), 2],
    ["Latin-1 e-acute in the title", inTitle([0xe9]), 2],
    ["a lone continuation byte", inTitle([0x80]), 2],
    ["an overlong slash (C0 AF)", inTitle([0xc0, 0xaf]), 2],
    ["an overlong NUL (C0 80)", inTitle([0xc0, 0x80]), 2],
    ["an encoded surrogate (ED A0 80)", inTitle([0xed, 0xa0, 0x80]), 2],
    ["a code point past U+10FFFF (F4 90 80 80)", inTitle([0xf4, 0x90, 0x80, 0x80]), 2],
    ["byte FF", inTitle([0xff]), 2],
    ["byte FE", inTitle([0xfe]), 2],
    ["a sequence cut short (E2 82)", inTitle([0xe2, 0x82]), 2],
    [
      "a multibyte sequence cut at end of file",
      Buffer.concat([Buffer.from(text), Buffer.from([0xe2, 0x82])]),
      2,
    ],
    ["a raw NUL in the title", inTitle([0x00]), 2],
    ["a raw NUL between tokens", Buffer.from(text.replace('"keel": 1,', '"keel": 1,\u0000')), 2],
    ["a NUL after the document", Buffer.concat([Buffer.from(text), Buffer.from([0])]), 2],
    ["only NUL bytes", new Uint8Array(4096), 2],
    ["a raw ESC in the title", inTitle([0x1b]), 2],
    ["a raw DEL in the title", inTitle([0x7f])],
    ["an escaped NUL in the title", Buffer.from(text.replace('"title": "', '"title": "\\u0000'))],
    ["an escaped NUL in a state name", Buffer.from(text.replace('"name": "u",', '"name": "u\\u0000",'))],
    ["an escaped NUL in an equation", Buffer.from(text.replace('"u": "r*u', '"u": "r*\\u0000u'))],
    ["an escaped lone surrogate in the title", Buffer.from(text.replace('"title": "', '"title": "\\ud800'))],
    [
      "an escaped lone low surrogate in the id",
      Buffer.from(text.replace('"id": "fuzz-base"', '"id": "\\udc00"')),
    ],
    ["a four-byte emoji in the title", Buffer.from(text.replace('"title": "', '"title": "\u{1F41F} '))],
    ["a BOM in the middle of the title", Buffer.from(text.replace('"title": "', '"title": "\ufeff'))],
  ];
  return bytes.map(([name, data, expect]) => specCase(C, name, data, "check", expect ? { expect } : {}));
}

/** Random bytes, and random bytes spliced into the title. */
function randomBytes(seed: number): FuzzCase[] {
  const junk = draw(fc.uint8Array({ minLength: 1, maxLength: 64 }), seed, 12).map((b, k) =>
    specCase(C, `random bytes ${k} (${b.length})`, b),
  );
  const spliced = draw(fc.uint8Array({ minLength: 1, maxLength: 8, min: 0x80, max: 0xff }), seed + 1, 12).map(
    (b, k) =>
      specCase(C, `high bytes in the title ${k} (${Buffer.from(b).toString("hex")})`, inTitle([...b])),
  );
  return [...junk, ...spliced];
}

export function encodingCases(seed: number): FuzzCase[] {
  return [...fixedCases(), ...randomBytes(seed)];
}

/**
 * keel check on spec files whose bytes are wrong before any JSON is read: the encoding (RFC 8259
 * §8.1: JSON exchanged between systems is UTF-8) and the size cap (SPEC_MAX_BYTES). Each must
 * exit 2 with one line that says what is wrong, and write nothing.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { listEntries, removeWorkDirs, runKeel, STACK_FRAME } from "../fixtures/cli.js";
import { SPEC_MAX_BYTES } from "../../src/spec/limits.js";

const BASE_TEXT = readFileSync(join(import.meta.dirname, "../fixtures/bad/base-spec.json"), "utf8");

afterAll(removeWorkDirs);

function expectRefused(bytes: Uint8Array, message: RegExp): void {
  const run = runKeel(["check", "spec.json"], { files: { "spec.json": bytes } });
  expect(run.status, run.stderr).toBe(2);
  expect(run.stderr).toMatch(message);
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr.trim().split("\n")).toHaveLength(1);
  expect(listEntries(run.cwd)).toEqual(["spec.json"]);
}

describe("keel check on bytes that are not a UTF-8 spec", () => {
  it("check(UTF-16 with a byte-order mark) names the encoding", () => {
    expectRefused(Buffer.from(`\ufeff${BASE_TEXT}`, "utf16le"), /is UTF-16 .*save the file as UTF-8/);
  });

  it("check(UTF-16 without a byte-order mark) says it holds zero bytes", () => {
    expectRefused(Buffer.from(BASE_TEXT, "utf16le"), /holds zero bytes/);
  });

  it("check(a Latin-1 byte in the title) names the byte and its line", () => {
    // "é" as Latin-1 (E9) where UTF-8 needs two bytes: an ill-formed sequence (RFC 3629 §4)
    const text = BASE_TEXT.replace('"title": "', '"title": "caf\u00e9 ');
    const at = Buffer.from(text.slice(0, text.indexOf("\u00e9")), "utf8").length;
    const line = text.slice(0, text.indexOf("\u00e9")).split("\n").length;
    expectRefused(Buffer.from(text, "latin1"), new RegExp(`byte ${at} \\(line ${line}\\)`));
  });

  it("check(a file one byte over SPEC_MAX_BYTES) refuses it by size, without parsing", () => {
    const padded = BASE_TEXT + " ".repeat(SPEC_MAX_BYTES + 1 - Buffer.byteLength(BASE_TEXT));
    expectRefused(Buffer.from(padded, "utf8"), new RegExp(`larger than ${SPEC_MAX_BYTES} bytes`));
  });
});

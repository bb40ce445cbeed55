/**
 * The published spec schema (schema/keel-spec.schema.json) against the CLI that prints it, a
 * general JSON Schema validator (ajv, draft 2020-12) and keel's own validator; and every example
 * spec end to end: valid, no warning, input not mutated (common practice for example specs).
 */
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { Ajv2020 } from "ajv/dist/2020.js";
import { afterAll, describe, expect, it } from "vitest";
import { parseSpecValue } from "../../src/spec/parse.js";
import { compileModel } from "../../src/model/compile.js";
import { analyze } from "../../src/analysis/analyze.js";
import { PROJECT_ROOT, removeWorkDirs, runKeel } from "../fixtures/cli.js";
import type { JsonSpec } from "../fixtures/examples.js";

const SCHEMA_PATH = join(PROJECT_ROOT, "schema", "keel-spec.schema.json");
const SCHEMA_TEXT = readFileSync(SCHEMA_PATH, "utf8");
const schema = JSON.parse(SCHEMA_TEXT) as Record<string, unknown>;
const SPECS_DIR = join(PROJECT_ROOT, "specs");
const examples = readdirSync(SPECS_DIR)
  .filter((f) => f.endsWith(".json"))
  .sort()
  .map((file) => ({ file, text: readFileSync(join(SPECS_DIR, file), "utf8") }));

// strict mode refuses unknown keywords and ambiguous constructs (e.g. a tuple of unstated length)
const ajv = new Ajv2020({ strict: true, allErrors: true });
const validateWithAjv = ajv.compile(schema);

function deepFreeze<T>(value: T): T {
  if (value && typeof value === "object" && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const child of Object.values(value)) deepFreeze(child);
  }
  return value;
}

afterAll(removeWorkDirs);

describe("keel schema", () => {
  it("keel schema prints schema/keel-spec.schema.json byte for byte", () => {
    const run = runKeel(["schema"]);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toBe(SCHEMA_TEXT);
  });

  it("the committed schema declares JSON Schema draft 2020-12", () => {
    // ajv's strict-mode compile runs when this file loads, and a schema it refuses fails the suite there
    expect(schema.$schema).toBe("https://json-schema.org/draft/2020-12/schema");
  });
});

describe.each(examples)("specs/$file against the schema", ({ file, text }) => {
  const spec = JSON.parse(text) as Record<string, unknown>;

  it(`ajv(schema) accepts ${file}`, () => {
    const valid = validateWithAjv(spec);
    expect(validateWithAjv.errors ?? []).toEqual([]);
    expect(valid).toBe(true);
  });

  it(`${file}'s $schema is ../schema/keel-spec.schema.json and resolves to the committed schema`, () => {
    expect(spec.$schema).toBe("../schema/keel-spec.schema.json");
    const target = resolve(SPECS_DIR, spec.$schema as string);
    expect(target).toBe(SCHEMA_PATH);
    expect(existsSync(target)).toBe(true);
  });

  it(`parseSpecValue, compileModel and analyze(${file}) run with no warning and mutate nothing`, () => {
    const raw = deepFreeze(JSON.parse(text));
    const parsed = parseSpecValue(raw);
    if (!parsed.ok) throw new Error(`${file} is invalid: ${JSON.stringify(parsed.issues)}`);
    const normalized = deepFreeze(parsed.value);
    const normalizedBefore = structuredClone(normalized);
    const compiled = compileModel(normalized);
    if (!compiled.ok) throw new Error(`${file} does not compile: ${JSON.stringify(compiled.issues)}`);
    const results = analyze(compiled.value);
    expect(results.diagnostics.filter((d) => d.severity === "warning")).toEqual([]);
    expect(results.equilibria.length).toBeGreaterThan(0);
    expect(raw).toEqual(JSON.parse(text));
    expect(normalized).toEqual(normalizedBefore);
  });
});

/**
 * Shape faults the schema must refuse as keel does, so an editor flags what the CLI will reject.
 * Cross-field rules (lo < hi, names declared) are keel's alone and not expected of the schema.
 */
describe("the schema and keel's validator agree on shape faults", () => {
  const base = () => JSON.parse(examples[0].text) as JsonSpec;
  const firstState = (s: JsonSpec) => s.states[0].name as string;
  const faults: [string, (s: JsonSpec) => void][] = [
    ["an unknown top-level key", (s) => (s.paramters = [])],
    ["a parameter value as a string", (s) => (s.parameters[0].value = String(s.parameters[0].value))],
    ["a missing id", (s) => delete s.id],
    ["an id that is not a slug", (s) => (s.id = "Not A Slug")],
    ["format version 2", (s) => (s.keel = 2)],
    ["a range of three numbers", (s) => (s.parameters[0].range = [0, 1, 2])],
    ["a window interval of one number", (s) => (s.window = { ...s.window, [firstState(s)]: [0] })],
    ["a state with an unknown key", (s) => (s.states[0].lable = "typo")],
  ];

  it.each(faults)("ajv(schema) and parseSpecValue both reject %s", (_name, change) => {
    const spec = base();
    change(spec);
    expect(validateWithAjv(spec)).toBe(false);
    expect(parseSpecValue(spec).ok).toBe(false);
  });
});

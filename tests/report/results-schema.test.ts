/**
 * The published results schema (schema/keel-results.schema.json) against its generator, the CLI
 * that prints it, and a general JSON Schema validator (ajv, draft-07): results.json of every
 * example spec and of fixture specs the suites compile must validate; broken ones must not.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { Ajv, type ErrorObject } from "ajv";
import { afterAll, describe, expect, it } from "vitest";
import { runPipeline } from "../../src/pipeline.js";
import { serializeResults } from "../../src/report/archive/serialize.js";
import { RESULTS_FORMAT } from "../../src/version.js";
import { EXAMPLE_IDS, exampleSpec, withBasins, type JsonSpec } from "../fixtures/examples.js";
import { PROJECT_ROOT, removeWorkDirs, runKeel } from "../fixtures/cli.js";
import { resultsSchemaText } from "../../scripts/results-schema.mjs";

const SCHEMA_PATH = join(PROJECT_ROOT, "schema", "keel-results.schema.json");
const SCHEMA_TEXT = readFileSync(SCHEMA_PATH, "utf8");
const FIXTURE_SPECS_DIR = join(PROJECT_ROOT, "tests", "fixtures", "specs");

// strict mode refuses unknown keywords and ambiguous constructs (e.g. a tuple of unstated length)
const ajv = new Ajv({ strict: true, allErrors: true });
const validate = ajv.compile(JSON.parse(SCHEMA_TEXT) as object);

/** The basin map is not under test here: 16 cells a side keep each run short. */
const TINY_BASINS = { resolution: 16, coarse: 8 };

/** results.json of a spec, as written and read back. */
function resultsJsonOf(spec: JsonSpec): Record<string, unknown> {
  const out = runPipeline(JSON.stringify(withBasins(spec, TINY_BASINS)));
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return JSON.parse(serializeResults(out.value.results)) as Record<string, unknown>;
}

function errorsOf(doc: unknown): ErrorObject[] {
  return validate(doc) ? [] : [...(validate.errors ?? [])];
}

/**
 * One spec of each family of captured fixture specs (file names are `<id>-<hash>.json`). Left
 * out: the bad-input bases, many invalid on purpose, and variants of the example specs, which
 * are validated above.
 */
const fixtureFiles = (() => {
  const firstOfFamily = new Map<string, string>();
  for (const file of readdirSync(FIXTURE_SPECS_DIR)
    .filter((f) => f.endsWith(".json"))
    .sort()) {
    const family = file.replace(/-[0-9a-f]+\.json$/, "");
    const skip = family.startsWith("bad-input") || EXAMPLE_IDS.includes(family);
    if (!skip && !firstOfFamily.has(family)) firstOfFamily.set(family, file);
  }
  return [...firstOfFamily.values()];
})();

afterAll(removeWorkDirs);

describe("schema/keel-results.schema.json", () => {
  it("generateResultsSchema() (npm run schema:results) reproduces the committed schema byte for byte", () => {
    expect(resultsSchemaText()).toBe(SCHEMA_TEXT);
  });

  it("keel schema --results prints the committed schema byte for byte; keel schema still prints the spec schema", () => {
    const results = runKeel(["schema", "--results"]);
    expect(results.status).toBe(0);
    expect(results.stdout).toBe(SCHEMA_TEXT);
    const spec = runKeel(["schema"]);
    expect(spec.stdout).toBe(readFileSync(join(PROJECT_ROOT, "schema", "keel-spec.schema.json"), "utf8"));
  });

  it("keel schema --help documents --results", () => {
    const help = runKeel(["schema", "--help"]);
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^\s+--results\s+\S/m);
  });

  it("declares draft-07 and requires format = RESULTS_FORMAT", () => {
    const schema = JSON.parse(SCHEMA_TEXT) as {
      $schema: string;
      required: string[];
      properties: Record<string, { const?: unknown }>;
    };
    expect(schema.$schema).toBe("http://json-schema.org/draft-07/schema#");
    expect(schema.required).toEqual(expect.arrayContaining(["keel", "format"]));
    expect(schema.properties.format.const).toBe(RESULTS_FORMAT);
  });

  it("every number type admits null (serializeResults may write null for any number), but literals do not", () => {
    const numberTypes: { type: unknown; const?: unknown; enum?: unknown }[] = [];
    JSON.stringify(JSON.parse(SCHEMA_TEXT), (_key, value: unknown) => {
      const type = (value as { type?: unknown } | null)?.type;
      if (type === "number" || (Array.isArray(type) && type.includes("number")))
        numberTypes.push(value as { type: unknown });
      return value;
    });
    expect(numberTypes.length).toBeGreaterThan(20);
    for (const t of numberTypes) {
      const literal = t.const !== undefined || t.enum !== undefined;
      if (literal) expect(t.type).toBe("number");
      else expect(t.type).toContain("null");
    }
  });
});

describe.each(EXAMPLE_IDS)("results.json of specs/%s.json", (id) => {
  const doc = resultsJsonOf(exampleSpec(id));

  it("validates against the results schema", () => {
    expect(errorsOf(doc)).toEqual([]);
  });

  it("starts with keel, then format = RESULTS_FORMAT", () => {
    expect(Object.keys(doc).slice(0, 2)).toEqual(["keel", "format"]);
    expect(doc.format).toBe(RESULTS_FORMAT);
  });
});

describe("results.json of fixture specs the suites compile", () => {
  it("the fixture families are found", () => {
    expect(fixtureFiles.length).toBeGreaterThanOrEqual(5);
  });

  it.each(fixtureFiles)("tests/fixtures/specs/%s validates against the results schema", (file) => {
    const spec = JSON.parse(readFileSync(join(FIXTURE_SPECS_DIR, file), "utf8")) as JsonSpec;
    expect(errorsOf(resultsJsonOf(spec))).toEqual([]);
  });
});

describe("results.json with non-finite numbers", () => {
  // x' = −√x, y' = −y: the one root is the origin, where ∂(−√x)/∂x = −1/(2√x) is −∞ (closed
  // form): a singular point, never classified, whose compiled Jacobian serializeResults must
  // write as null there, listing the path
  const spec: JsonSpec = {
    keel: 1,
    id: "infinite-jacobian",
    title: "infinite Jacobian entry at the equilibrium",
    time: { unit: "day" },
    states: [
      { name: "x", min: -1, max: 3 },
      { name: "y", min: -1, max: 1 },
    ],
    equations: { x: "-sqrt(x)", y: "-y" },
  };

  it("lists singularities[0].jacobian[0][0]: -Infinity under nonFinite, and validates", () => {
    const doc = resultsJsonOf(spec) as JsonSpec;
    expect(doc.equilibria).toEqual([]);
    expect(doc.singularities[0].jacobian[0][0]).toBeNull();
    expect(doc.nonFinite).toContain("singularities[0].jacobian[0][0]: -Infinity");
    expect(errorsOf(doc)).toEqual([]);
  });
});

describe("the schema refuses broken results", () => {
  const valid = resultsJsonOf(exampleSpec(EXAMPLE_IDS[0]));
  const broken = (edit: (doc: JsonSpec) => void): ErrorObject[] => {
    const doc = structuredClone(valid) as JsonSpec;
    edit(doc);
    return errorsOf(doc);
  };
  const at = (errors: ErrorObject[]) => errors.map((e) => `${e.instancePath} ${e.keyword}`);

  it("a number written as null by serializeResults, with its path under nonFinite, validates", () => {
    const results = structuredClone(valid) as JsonSpec;
    results.equilibria[0].trace = Number.NaN;
    results.equilibria[0].point[results.model.states[0]] = Number.POSITIVE_INFINITY;
    const doc = JSON.parse(serializeResults(results)) as JsonSpec;
    expect(doc.equilibria[0].trace).toBeNull();
    const expected = [`equilibria[0].point.${results.model.states[0]}: Infinity`, "equilibria[0].trace: NaN"];
    expect([...(doc.nonFinite as string[])].sort()).toEqual(expected.sort());
    expect(errorsOf(doc)).toEqual([]);
  });

  it("a string where a number belongs fails at its path", () => {
    expect(at(broken((doc) => (doc.equilibria[0].trace = "0")))).toContain("/equilibria/0/trace type");
  });

  it("null where a string belongs fails at its path", () => {
    expect(at(broken((doc) => (doc.equilibria[0].type = null)))).toContain("/equilibria/0/type type");
  });

  it("a format other than RESULTS_FORMAT fails at /format", () => {
    expect(at(broken((doc) => (doc.format = RESULTS_FORMAT + 1)))).toContain("/format const");
  });

  it("a missing required key fails, naming the object and the key", () => {
    const errors = broken((doc) => delete doc.spec.sha256);
    expect(at(errors)).toContain("/spec required");
    expect(errors.find((e) => e.keyword === "required")?.params).toEqual({ missingProperty: "sha256" });
  });

  it("an unknown key fails, naming it", () => {
    const errors = broken((doc) => (doc.scenarios[0].extra = 1));
    expect(errors.find((e) => e.keyword === "additionalProperties")).toMatchObject({
      instancePath: "/scenarios/0",
      params: { additionalProperty: "extra" },
    });
  });

  it("a nonFinite entry that is not 'path: NaN|Infinity|-Infinity' fails at its index", () => {
    expect(at(broken((doc) => (doc.nonFinite = ["equilibria[0].trace: 7"])))).toContain(
      "/nonFinite/0 pattern",
    );
  });
});

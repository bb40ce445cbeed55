// Writes schema/keel-results.schema.json, the JSON Schema of results.json, generated from the
// TypeScript type that describes the file (ResultsDocument in src/report/archive/serialize.ts),
// so the schema cannot drift from the code: tests/report/results-schema.test.ts regenerates it
// and compares.
//
//   npm run schema:results           write the schema
//   npm run schema:results -- --check exit 1 when the committed schema is out of date
//
// The generator is ts-json-schema-generator (draft-07 output), with two additions:
// - `import("...").Name` types and indexed literal types (e.g. ClaimSpec["kind"], where ClaimSpec
//   is inferred by zod) are resolved through TypeScript's checker, which the generator's own
//   parsers cannot do;
// - every number may be null: serializeResults writes any NaN or ±Infinity, wherever it occurs,
//   as null and lists its path under nonFinite.
import { readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import ts from "typescript";
import {
  createFormatter,
  createParser,
  createProgram,
  LiteralType,
  SchemaGenerator,
  UnionType,
} from "ts-json-schema-generator";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..");
export const RESULTS_SCHEMA_PATH = join(ROOT, "schema", "keel-results.schema.json");
const SOURCE = join(ROOT, "src", "report", "archive", "serialize.ts");
const ROOT_TYPE = "ResultsDocument";

/** Resolves `import("./file.js").Name` to Name's declaration, as a type reference would. */
function importTypeParser(checker, chain) {
  return {
    supportsNode: (node) => node.kind === ts.SyntaxKind.ImportType,
    createType: (node, context) => {
      const symbol = checker.getSymbolAtLocation(node.qualifier);
      const target = symbol.flags & ts.SymbolFlags.Alias ? checker.getAliasedSymbol(symbol) : symbol;
      return chain.createType(target.declarations[0], context);
    },
  };
}

/** The literals a type is a union of, or null when it is anything else. */
function literalsOf(checker, type) {
  const parts = type.isUnion() ? type.types : [type];
  const literal = (t) => t.isLiteral() || Boolean(t.flags & ts.TypeFlags.BooleanLiteral);
  return parts.every(literal)
    ? parts.map((t) => (t.isLiteral() ? t.value : checker.typeToString(t) === "true"))
    : null;
}

/** `T["key"]` whose value the checker knows to be literals: an enum of those literals. */
function indexedLiteralParser(checker) {
  return {
    supportsNode: (node) =>
      node.kind === ts.SyntaxKind.IndexedAccessType &&
      literalsOf(checker, checker.getTypeFromTypeNode(node)) !== null,
    createType: (node) => {
      const parts = literalsOf(checker, checker.getTypeFromTypeNode(node)).map(
        (value) => new LiteralType(value),
      );
      return parts.length === 1 ? parts[0] : new UnionType(parts);
    },
  };
}

/** Adds null to every number type (not to number constants or enums), anywhere in the schema. */
function allowNullNumbers(node) {
  if (Array.isArray(node)) return node.forEach(allowNullNumbers);
  if (!node || typeof node !== "object") return;
  const types = Array.isArray(node.type) ? node.type : node.type === undefined ? [] : [node.type];
  const numeric = types.includes("number") || types.includes("integer");
  if (numeric && !types.includes("null") && node.const === undefined && node.enum === undefined)
    node.type = [...types, "null"];
  for (const value of Object.values(node)) allowNullNumbers(value);
}

/** The JSON Schema of results.json, as an object. */
export function generateResultsSchema() {
  const config = {
    path: SOURCE,
    tsconfig: join(ROOT, "tsconfig.json"),
    type: ROOT_TYPE,
    expose: "export",
    topRef: false,
    jsDoc: "extended",
    additionalProperties: false,
    skipTypeCheck: true,
  };
  const program = createProgram(config);
  const checker = program.getTypeChecker();
  const parser = createParser(program, config, (chain) => {
    chain.addNodeParser(importTypeParser(checker, chain));
    chain.addNodeParser(indexedLiteralParser(checker));
  });
  const generated = new SchemaGenerator(program, parser, createFormatter(config), config).createSchema(
    ROOT_TYPE,
  );
  allowNullNumbers(generated);
  const { $schema, description, ...rest } = generated;
  return { $schema, $id: "keel-results.schema.json", title: "keel results", description, ...rest };
}

export function resultsSchemaText() {
  return JSON.stringify(generateResultsSchema(), null, 2) + "\n";
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const started = performance.now();
  const text = resultsSchemaText();
  if (process.argv.includes("--check")) {
    const current = readFileSync(RESULTS_SCHEMA_PATH, "utf8");
    if (current !== text) {
      process.stderr.write(`${RESULTS_SCHEMA_PATH} is out of date: run npm run schema:results\n`);
      process.exit(1);
    }
    process.stderr.write(`${RESULTS_SCHEMA_PATH} is up to date\n`);
  } else {
    writeFileSync(RESULTS_SCHEMA_PATH, text);
    process.stderr.write(
      `wrote ${RESULTS_SCHEMA_PATH} (${((performance.now() - started) / 1000).toFixed(1)} s)\n`,
    );
  }
}

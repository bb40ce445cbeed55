/**
 * sizes: files, strings, arrays and numbers at and past keel's caps (README "Limits": 4 MiB per
 * file, 20 000 characters per string, 10 000 entries per array), and far past them.
 */
import {
  baseSpec,
  specCase,
  specText,
  type CommandName,
  type FuzzCase,
  type Json,
  type JsonObject,
} from "../base.js";
import { setAt, type JsonPath } from "../mutate.js";

const C = "sizes";
const MIB = 1024 * 1024;
const FILE_CAP = 4 * MIB;
const STRING_CAP = 20_000;
const ARRAY_CAP = 10_000;

const withValue = (path: JsonPath, value: Json): string => {
  const spec = baseSpec();
  setAt(spec, path, value);
  return specText(spec);
};

const listOf = (n: number, make: (k: number) => Json): Json[] => Array.from({ length: n }, (_, k) => make(k));

const manyKeys = (n: number, key: (k: number) => string, value: (k: number) => Json): JsonObject =>
  Object.fromEntries(Array.from({ length: n }, (_, k) => [key(k), value(k)]));

const state = (k: number): Json => ({ name: `s${k}`, min: 0, max: 1 });
const parameter = (k: number): Json => ({ name: `p${k}`, value: k, source: "invented" });
const scenario = (k: number): Json => ({ name: `s${k}`, initial: { u: 0.2, v: 0.3 }, horizon: 1 });
const claim = (k: number): Json => ({ id: `c${k}`, kind: "equilibrium-count", count: 4 });
const assumption = (k: number): Json => ({ text: `assumption ${k}`, condition: "a < 1" });

function padded(bytes: number): string {
  const text = specText(baseSpec());
  return text + " ".repeat(bytes - Buffer.byteLength(text));
}

interface SizeCase {
  name: string;
  text: () => string;
  command?: CommandName;
  expect?: 0 | 2;
}

const sizeCases: SizeCase[] = [
  { name: "a 10 MB title", text: () => withValue(["title"], "t".repeat(10 * 1000 * 1000)), expect: 2 },
  {
    name: "a 10 MB equation",
    text: () => withValue(["equations", "u"], "u+".repeat(5_000_000) + "u"),
    expect: 2,
  },
  { name: "a file of exactly 4 MiB (padded)", text: () => padded(FILE_CAP), expect: 0 },
  { name: "a file one byte over 4 MiB", text: () => padded(FILE_CAP + 1), expect: 2 },
  { name: "a title at the string cap", text: () => withValue(["title"], "t".repeat(STRING_CAP)), expect: 0 },
  {
    name: "a title one over the string cap",
    text: () => withValue(["title"], "t".repeat(STRING_CAP + 1)),
    expect: 2,
  },
  {
    name: "a label at the string cap, built",
    text: () => withValue(["states", 0, "label"], "label ".repeat(STRING_CAP / 6)),
    command: "build",
  },
  { name: "a 20k-character key", text: () => withValue(["k".repeat(STRING_CAP)], 1), expect: 2 },
  { name: "a 3 MB key", text: () => withValue(["k".repeat(3 * MIB)], 1), expect: 2 },
  { name: "100k states", text: () => withValue(["states"], listOf(100_000, state)), expect: 2 },
  { name: "10 000 states", text: () => withValue(["states"], listOf(ARRAY_CAP, state)), expect: 2 },
  { name: "10 001 states", text: () => withValue(["states"], listOf(ARRAY_CAP + 1, state)), expect: 2 },
  {
    name: "10 000 cautions",
    text: () =>
      withValue(
        ["cautions"],
        listOf(ARRAY_CAP, (k) => `caution ${k}`),
      ),
    expect: 0,
  },
  {
    name: "10 000 cautions, built",
    text: () =>
      withValue(
        ["cautions"],
        listOf(ARRAY_CAP, (k) => `caution ${k}`),
      ),
    command: "build",
  },
  {
    name: "10 001 cautions",
    text: () =>
      withValue(
        ["cautions"],
        listOf(ARRAY_CAP + 1, (k) => `c${k}`),
      ),
    expect: 2,
  },
  {
    name: "10 000 authors, built",
    text: () =>
      withValue(
        ["authors"],
        listOf(ARRAY_CAP, (k) => `author ${k}`),
      ),
    command: "build",
  },
  { name: "10 000 unused parameters", text: () => withValue(["parameters"], listOf(ARRAY_CAP, parameter)) },
  {
    name: "10 000 unused parameters, analysed",
    text: () =>
      withValue(["parameters"], [...(baseSpec().parameters as Json[]), ...listOf(ARRAY_CAP - 3, parameter)]),
    command: "analyze",
  },
  { name: "10 000 scenarios", text: () => withValue(["scenarios"], listOf(ARRAY_CAP, scenario)) },
  { name: "10 000 claims", text: () => withValue(["claims"], listOf(ARRAY_CAP, claim)) },
  {
    name: "10 000 assumptions with conditions",
    text: () => withValue(["assumptions"], listOf(ARRAY_CAP, assumption)),
  },
  {
    name: "a 100k-entry window",
    text: () =>
      withValue(
        ["window", "u"],
        listOf(100_000, (k) => k),
      ),
    expect: 2,
  },
  {
    name: "a 100k-entry range",
    text: () =>
      withValue(
        ["parameters", 0, "range"],
        listOf(100_000, (k) => k),
      ),
    expect: 2,
  },
  {
    name: "1 000 unknown top-level keys",
    text: () =>
      specText({
        ...baseSpec(),
        ...manyKeys(
          1000,
          (k) => `extra${k}`,
          (k) => k,
        ),
      }),
    expect: 2,
  },
  {
    name: "1 000 extra equations",
    text: () =>
      withValue(["equations"], {
        ...(baseSpec().equations as JsonObject),
        ...manyKeys(
          1000,
          (k) => `w${k}`,
          () => "u",
        ),
      }),
    expect: 2,
  },
  {
    name: "a 100k-digit integer",
    text: () => specText(baseSpec()).replace('"value": 1,', `"value": 1${"0".repeat(100_000)},`),
    expect: 2,
  },
  {
    name: "a 100k-digit fraction",
    text: () => specText(baseSpec()).replace('"value": 1,', `"value": 1.${"0".repeat(100_000)}1,`),
  },
  {
    name: "an exponent of 100k digits",
    text: () => specText(baseSpec()).replace('"value": 1,', `"value": 1e${"9".repeat(100_000)},`),
    expect: 2,
  },
  {
    name: "an equation padded with 19 990 spaces",
    text: () => withValue(["equations", "u"], " ".repeat(19_990) + "u"),
    command: "analyze",
  },
  { name: "an id of 81 characters", text: () => withValue(["id"], "a".repeat(81)), expect: 2 },
  { name: "an id of 80 characters, built", text: () => withValue(["id"], "a".repeat(80)), command: "build" },
  {
    name: "basins at the largest grid (check only)",
    text: () => withValue(["analysis", "basins"], { resolution: 4096, coarse: 1024 }),
  },
  {
    name: "basins past the largest grid",
    text: () => withValue(["analysis", "basins"], { resolution: 8192, coarse: 1024 }),
    expect: 2,
  },
  {
    name: "a 10 000-character scenario name, built",
    text: () => withValue(["scenarios", 0, "name"], "n".repeat(ARRAY_CAP)),
    command: "build",
  },
];

export function sizeCasesAll(): FuzzCase[] {
  return sizeCases.map((c) =>
    specCase(C, c.name, c.text(), c.command ?? "check", c.expect === undefined ? {} : { expect: c.expect }),
  );
}

/**
 * mutated-values: one leaf of the base spec replaced by an extreme or ill-typed value (IEEE 754
 * limits: ±1.8e308, 5e-324; 2^53 + 1 = 9007199254740993, the first integer a double cannot hold),
 * and structural contradictions: reversed ranges and windows, negative horizons, starts outside.
 */
import fc from "fast-check";
import { baseSpec, specCase, type CommandName, type FuzzCase, type Json, type JsonObject } from "../base.js";
import { draw, leafPaths, pathText, RawNumbers, setAt, type JsonPath } from "../mutate.js";

const C = "mutated-values";

/** A value, or raw JSON number text (prefixed "raw:"). */
const VALUES: (Json | `raw:${string}`)[] = [
  1e308,
  -1e308,
  1.7976931348623157e308,
  -1.7976931348623157e308,
  5e-324,
  -5e-324,
  0,
  -1,
  -20,
  0.5,
  1e12,
  1e-300,
  2 ** 53,
  -(2 ** 53),
  4096,
  1.5,
  1e6,
  "raw:9007199254740993",
  "raw:1e999",
  "raw:-1e999",
  "raw:1e-400",
  "raw:-0",
  "raw:123456789012345678901234567890",
  "NaN",
  "Infinity",
  "-Infinity",
  "1e3",
  "",
  " ",
  "0x10",
  "null",
  null,
  true,
  false,
  [],
  {},
  [1],
  [0, 1, 2],
  [null, null],
];

function leafMutations(seed: number): FuzzCase[] {
  const paths = leafPaths(baseSpec());
  const pick = fc.tuple(
    fc.integer({ min: 0, max: paths.length - 1 }),
    fc.integer({ min: 0, max: VALUES.length - 1 }),
    fc.constantFrom<CommandName>("check", "check", "analyze"),
  );
  return draw(pick, seed, 70).map(([p, v, command], k) => {
    const spec = baseSpec();
    const raw = new RawNumbers();
    const value = VALUES[v];
    const json =
      typeof value === "string" && value.startsWith("raw:") ? raw.placeholder(value.slice(4)) : value;
    setAt(spec, paths[p], json as Json);
    const shown =
      typeof value === "string" && value.startsWith("raw:") ? value.slice(4) : JSON.stringify(value);
    return specCase(C, `${k} ${pathText(paths[p])} := ${shown} (${command})`, raw.stringify(spec), command);
  });
}

type Edit = [name: string, edits: [JsonPath, Json][], command?: CommandName];

const CONTRADICTIONS: Edit[] = [
  [
    "a reversed range",
    [
      [
        ["parameters", 0, "range"],
        [1.5, 0.5],
      ],
    ],
  ],
  [
    "an empty range",
    [
      [
        ["parameters", 0, "range"],
        [1, 1],
      ],
    ],
    "analyze",
  ],
  [
    "a range without the value",
    [
      [
        ["parameters", 0, "range"],
        [2, 3],
      ],
    ],
  ],
  [
    "a range of ±1e308",
    [
      [
        ["parameters", 0, "range"],
        [-1e308, 1e308],
      ],
    ],
    "analyze",
  ],
  [
    "a reversed window",
    [
      [
        ["window", "u"],
        [1.5, 0],
      ],
    ],
  ],
  [
    "an empty window",
    [
      [
        ["window", "u"],
        [1, 1],
      ],
    ],
  ],
  [
    "a window past the bounds",
    [
      [
        ["window", "u"],
        [-1, 3],
      ],
    ],
  ],
  [
    "a window of ±1e308 with bounds to match",
    [
      [["states", 0, "min"], -1e308],
      [["states", 0, "max"], 1e308],
      [
        ["window", "u"],
        [-1e308, 1e308],
      ],
    ],
    "analyze",
  ],
  ["min above max", [[["states", 0, "min"], 3]]],
  [
    "min equal to max",
    [
      [["states", 1, "max"], 0],
      [
        ["window", "v"],
        [0, 0],
      ],
    ],
  ],
  ["a start outside the window", [[["scenarios", 0, "initial", "u"], 5]]],
  ["a start on the window corner", [[["scenarios", 0, "initial"], { u: 1.5, v: 1.5 }]], "analyze"],
  ["a start missing a state", [[["scenarios", 0, "initial"], { u: 0.2 }]]],
  ["a start naming an unknown state", [[["scenarios", 0, "initial"], { u: 0.2, v: 0.3, w: 1 }]]],
  ["a negative horizon", [[["scenarios", 0, "horizon"], -20]]],
  ["a zero horizon", [[["scenarios", 0, "horizon"], 0]]],
  ["a horizon of 1e-300", [[["scenarios", 0, "horizon"], 1e-300]], "analyze"],
  ["a horizon of 1e300", [[["scenarios", 0, "horizon"], 1e300]], "analyze"],
  ["a horizon of 1e12", [[["scenarios", 0, "horizon"], 1e12]], "analyze"],
  [
    "a tiny window (1e-12 wide)",
    [
      [
        ["window", "u"],
        [0.5, 0.5 + 1e-12],
      ],
      [["scenarios", 0, "initial", "u"], 0.5],
    ],
    "analyze",
  ],
  [
    "bounds 1e-300 wide",
    [
      [["states", 0, "max"], 1e-300],
      [
        ["window", "u"],
        [0, 1e-300],
      ],
      [["scenarios", 0, "initial", "u"], 0],
    ],
    "analyze",
  ],
  ["coarse above resolution", [[["analysis", "basins"], { resolution: 8, coarse: 16 }]]],
  ["resolution not a power of two of coarse", [[["analysis", "basins"], { resolution: 24, coarse: 8 }]]],
  ["a fractional resolution", [[["analysis", "basins"], { resolution: 16.5, coarse: 8 }]]],
  ["keel version 2", [[["keel"], 2]]],
  ['keel version "1"', [[["keel"], "1"]]],
  ["a parameter study of an unknown name", [[["analysis", "parameters"], ["zz"]]]],
  ["a study of a parameter without range", [[["analysis", "parameters"], ["a"]]]],
  ["a study of r, analysed", [[["analysis", "parameters"], ["r"]]], "analyze"],
  ["a parameter pair of one name twice", [[["analysis", "parameterPairs"], [["r", "r"]]]]],
  ["a claimed count of 1e308", [[["claims", 0, "count"], 1e308]]],
  ["a claimed count of -1", [[["claims", 0, "count"], -1]]],
  ["a parameter of 1e308 in the equations", [[["parameters", 1, "value"], 1e308]], "analyze"],
  ["a parameter of 5e-324 in the equations", [[["parameters", 1, "value"], 5e-324]], "analyze"],
  [
    "growth of -1e308",
    [
      [["parameters", 0, "value"], -1e308],
      [
        ["parameters", 0, "range"],
        [-1e308, 0],
      ],
    ],
    "analyze",
  ],
];

function contradictions(): FuzzCase[] {
  return CONTRADICTIONS.map(([name, edits, command]) => {
    const spec = baseSpec() as JsonObject;
    for (const [path, value] of edits) setAt(spec, path, value);
    return specCase(C, name, JSON.stringify(spec, null, 2), command ?? "check");
  });
}

export function mutatedValueCases(seed: number): FuzzCase[] {
  return [...leafMutations(seed), ...contradictions()];
}

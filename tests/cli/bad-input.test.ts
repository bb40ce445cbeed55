/**
 * Malformed specs through the built CLI, as a user meets them. Each case breaks the valid base
 * spec (tests/fixtures/bad/base-spec.json) in one place, or in one place per equation, so every
 * reported issue is one we planted.
 *
 * The contract (README.md, "Usage"): exit 2; one message per fault that locates it, by
 * JSON path, or by equation name plus a caret under the column; no stack trace; nothing written.
 * Both `keel analyze SPEC --out DIR` and `keel check SPEC` are run on every case.
 * Expected columns are counted by hand from the literal text, 1-based (common practice for
 * compiler diagnostics), never computed by the test.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import {
  listEntries,
  listFiles,
  makeWorkDir,
  removeWorkDirs,
  runKeel,
  STACK_FRAME,
  type CliResult,
} from "../fixtures/cli.js";
import type { JsonSpec } from "../fixtures/examples.js";

type SpecObject = JsonSpec;

const BASE_TEXT = readFileSync(join(import.meta.dirname, "../fixtures/bad/base-spec.json"), "utf8");
const baseSpec = (): SpecObject => JSON.parse(BASE_TEXT) as SpecObject;
const specWith = (change: (spec: SpecObject) => void): string => {
  const spec = baseSpec();
  change(spec);
  return JSON.stringify(spec, null, 2);
};
const withEquations = (x: string, y?: string) =>
  specWith((s) => {
    s.equations.x = x;
    if (y !== undefined) s.equations.y = y;
  });
const withParameterNames = (...names: string[]) =>
  specWith((s) => names.forEach((name, i) => (s.parameters[i].name = name)));
/** Text edits for what JSON.stringify cannot write: an own "__proto__" key, a number that overflows. */
const baseTextWith = (from: string, to: string): string => {
  const text = JSON.stringify(baseSpec(), null, 2);
  if (!text.includes(from)) throw new Error(`fixture text lacks ${from}`);
  return text.replace(from, to);
};

interface Fault {
  /** JSON path printed after "at ". */
  path: string;
  message: RegExp;
  /** The source line shown under the message, and where its caret must sit. */
  caret?: { line: string; column: number; length?: number };
}

interface BadSpec {
  name: string;
  text: string;
  faults: Fault[];
  /** Follow-on issues are reported too, so the number of issues is not the number of faults. */
  cascades?: boolean;
}

const eq = (state: "x" | "y", message: RegExp, line: string, column: number, length = 1): Fault => ({
  path: `equations.${state}`,
  message,
  caret: { line, column, length },
});
const unexpected = (ch: string) =>
  new RegExp(`unexpected character '${ch.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}'`);
const implicit = /write '\*' for multiplication/;
const unknownName = (name: string) => new RegExp(`unknown name '${name}'`);

// ---------------------------------------------------------------------------------------------
// The file is not JSON, or not a JSON object
// ---------------------------------------------------------------------------------------------
const fileFaults: BadSpec[] = [
  {
    name: "a doubled comma",
    text: '{\n  "keel": 1,\n  "id": "x",,\n}\n',
    faults: [
      {
        path: "(top level)",
        message: /not valid JSON \(line 3, column 13\): expected a key in double quotes, found ','/,
        caret: { line: '  "id": "x",,', column: 13 },
      },
    ],
  },
  {
    // V8's own message for this fault carries no position; keel still names line and column
    name: "an unquoted value",
    text: '{\n  "keel": 1,\n  "id": bad-input\n}\n',
    faults: [
      {
        path: "(top level)",
        message: /not valid JSON \(line 3, column 9\): expected a value, found 'b'/,
        caret: { line: '  "id": bad-input', column: 9 },
      },
    ],
  },
  {
    name: "single-quoted keys",
    text: "{ 'keel': 1 }",
    faults: [
      {
        path: "(top level)",
        message: /not valid JSON \(line 1, column 3\): .*double quotes/,
        caret: { line: "{ 'keel': 1 }", column: 3 },
      },
    ],
  },
  {
    name: "a file cut short",
    text: '{\n  "keel": 1,\n  "id": "a"',
    faults: [
      {
        path: "(top level)",
        message: /not valid JSON \(line 3, column 12\): the file ends where ',' or '}' is expected/,
        caret: { line: '  "id": "a"', column: 12 },
      },
    ],
  },
  {
    name: "an empty file",
    text: "",
    faults: [
      {
        path: "(top level)",
        message: /not valid JSON \(line 1, column 1\): the file ends where a value is expected/,
        caret: { line: "", column: 1 },
      },
    ],
  },
  {
    name: "a top-level array",
    text: "[]",
    faults: [{ path: "(top level)", message: /expected object, received array/ }],
  },
];

// ---------------------------------------------------------------------------------------------
// Shape: keys, types, names, structure (spec/schema.ts and spec/validate.ts)
// ---------------------------------------------------------------------------------------------
const shapeFaults: BadSpec[] = [
  {
    name: "missing keel, id, time, states and equations",
    text: specWith((s) => ["keel", "id", "time", "states", "equations"].forEach((k) => delete s[k])),
    faults: ["keel", "id", "time", "states", "equations"].map((key) => ({
      path: key,
      message: new RegExp(`the required key '${key}' is missing`),
    })),
  },
  {
    name: "a parameter value as a string and a state min as null",
    text: specWith((s) => {
      s.parameters[2].value = "0.5";
      s.states[0].min = null;
    }),
    faults: [
      { path: "parameters[2].value", message: /expected number, received string/ },
      { path: "states[0].min", message: /expected number, received null/ },
    ],
  },
  {
    name: "an id that is not a slug, and format version 2",
    text: specWith((s) => {
      s.id = "Bad Input!";
      s.keel = 2;
    }),
    faults: [
      { path: "id", message: /an id is a slug/ },
      { path: "keel", message: /expected 1/ },
    ],
  },
  {
    name: "misspelt keys at the top level and inside a state",
    text: specWith((s) => {
      s.paramters = s.parameters;
      delete s.parameters;
      s.states[0].lable = s.states[0].label;
      delete s.states[0].label;
    }),
    faults: [
      { path: "paramters", message: /unknown key 'paramters'; did you mean 'parameters'\?/ },
      { path: "states[0].lable", message: /unknown key 'lable'; did you mean 'label'\?/ },
    ],
  },
  {
    name: "a parameter value that overflows to Infinity, and a zero horizon",
    text: baseTextWith('"value": 1,', '"value": 1e999,').replace('"horizon": 20', '"horizon": 0'),
    faults: [
      {
        path: "parameters[0].value",
        message: /expected a finite number; this one is beyond double precision/,
      },
      { path: "scenarios[0].horizon", message: /the horizon must be positive/ },
    ],
  },
  {
    name: "two states named x",
    text: specWith((s) => (s.states[1].name = "x")),
    faults: [{ path: "states[1].name", message: /the name 'x' is already used at states\[0\]\.name/ }],
    cascades: true, // y's equation, window and initial value now belong to no state
  },
  {
    name: "a duplicate parameter and a parameter named like a state",
    text: withParameterNames("r", "y", "a", "r"),
    faults: [
      { path: "parameters[3].name", message: /the name 'r' is already used at parameters\[0\]\.name/ },
      { path: "parameters[1].name", message: /the name 'y' is already used at states\[1\]\.name/ },
    ],
  },
  {
    name: "invalid identifiers 2x, a-b and _x",
    text: withParameterNames("2x", "a-b", "_x"),
    faults: ["2x", "a-b", "_x"].map((name, i) => ({
      path: `parameters[${i}].name`,
      message: new RegExp(`'${name}' is not a valid name`),
    })),
  },
  {
    name: "reserved names e, pi, constructor and this",
    text: withParameterNames("e", "pi", "constructor", "this"),
    faults: ["e", "pi", "constructor", "this"].map((name, i) => ({
      path: `parameters[${i}].name`,
      message: new RegExp(`'${name}' is reserved`),
    })),
  },
  {
    name: "reserved names t, exp and __proto__",
    text: withParameterNames("t", "exp", "__proto__"),
    faults: [
      { path: "parameters[0].name", message: /'t' is reserved for time/ },
      { path: "parameters[1].name", message: /'exp' is reserved/ },
      // the identifier rule (a letter first) already excludes it
      { path: "parameters[2].name", message: /'__proto__' is not a valid name/ },
    ],
  },
  {
    name: "three states",
    text: specWith((s) => {
      s.states.push({ name: "z", min: 0, max: 1 });
      s.equations.z = "-z";
      s.window.z = [0, 1];
      s.scenarios[0].initial.z = 0.5;
    }),
    faults: [{ path: "states", message: /exactly 2 states are needed, found 3/ }],
  },
  {
    name: "no equation for y and one for an unknown state z",
    text: specWith((s) => {
      delete s.equations.y;
      s.equations.z = "x - y";
    }),
    faults: [
      { path: "equations", message: /state 'y' has no equation: add equations\.y/ },
      { path: "equations.z", message: /'z' is not a declared state/ },
    ],
  },
  {
    name: "a window with lo = hi and a window beyond the state's bounds",
    text: specWith((s) => {
      s.window.x = [2, 2]; // the scenario starts at x = 2, so only the window itself is at fault
      s.window.y = [0, 12];
    }),
    faults: [
      { path: "window.x", message: /the interval \[2, 2\] must have lo < hi/ },
      { path: "window.y", message: /the window \[0, 12\] for 'y' lies outside the state's bounds \[0, 10\]/ },
    ],
  },
  {
    name: "a scenario starting outside the window and one missing a state",
    text: specWith((s) => {
      s.scenarios[0].initial.x = 9;
      s.scenarios.push({ name: "second", initial: { x: 1 }, horizon: 5 });
    }),
    faults: [
      { path: "scenarios[0].initial.x", message: /initial x = 9 lies outside the window \[0, 8\]/ },
      { path: "scenarios[1].initial", message: /the initial state gives no value for 'y'/ },
    ],
  },
  {
    name: "a range that excludes its value",
    text: specWith((s) => (s.parameters[0].range = [2, 3])),
    faults: [{ path: "parameters[0].range", message: /the range \[2, 3\] does not contain the value 1/ }],
  },
];

// ---------------------------------------------------------------------------------------------
// Equations and conditions outside the grammar (model/lexer.ts, model/expressions.ts)
// ---------------------------------------------------------------------------------------------
const expressionFaults: BadSpec[] = [
  {
    name: "an unknown name, and time in an autonomous model",
    text: withEquations("r*x*(1 - x/Q)", "x*t"),
    faults: [eq("x", unknownName("Q"), "r*x*(1 - x/Q)", 12), eq("y", /time may not appear/, "x*t", 3)],
  },
  {
    name: "forbidden functions gamma and eval",
    text: withEquations("r*gamma(x)", "x + eval(y)"),
    faults: [
      eq("x", /'gamma' is not an accepted function; accepted: exp, /, "r*gamma(x)", 3, 5),
      eq("y", /'eval' is not an accepted function/, "x + eval(y)", 5, 4),
    ],
  },
  {
    name: "a function used as a value and a parameter called as a function",
    text: withEquations("x*exp", "r(x)"),
    faults: [
      eq("x", /'exp' is a function/, "x*exp", 3, 3),
      eq("y", /'r' is a name, not a function/, "r(x)", 1),
    ],
  },
  {
    name: "operators x! and x % 2",
    text: withEquations("x!", "x % 2"),
    faults: [eq("x", unexpected("!"), "x!", 2), eq("y", unexpected("%"), "x % 2", 3)],
  },
  {
    name: "operators x == y and a ? b : c",
    text: withEquations("x == y", "x ? y : r"),
    faults: [eq("x", unexpected("="), "x == y", 3), eq("y", unexpected("?"), "x ? y : r", 3)],
  },
  {
    name: "a matrix [1,2] and a prime x'",
    text: withEquations("x*[1,2]", "x'"),
    faults: [eq("x", unexpected("["), "x*[1,2]", 3), eq("y", unexpected("'"), "x'", 2)],
  },
  {
    name: "a statement separator x; y and a property access x.y",
    text: withEquations("x; y", "x.y"),
    faults: [eq("x", unexpected(";"), "x; y", 2), eq("y", unexpected("."), "x.y", 2)],
  },
  {
    name: "implicit multiplication 2x and 2 x",
    text: withEquations("2x", "2 x"),
    faults: [eq("x", implicit, "2x", 2), eq("y", implicit, "2 x", 3)],
  },
  {
    name: "implicit multiplication (x)(y), and a number beyond double precision",
    text: withEquations("(x)(y)", "x*1e999"),
    faults: [eq("x", implicit, "(x)(y)", 4), eq("y", /the number 1e999 is too large/, "x*1e999", 3, 5)],
  },
  {
    name: "wrong arity pow(x) and min(x)",
    text: withEquations("pow(x)", "min(x)"),
    faults: [
      eq("x", /pow\(\) takes 2 arguments, given 1/, "pow(x)", 1, 3),
      eq("y", /min\(\) takes at least 2 arguments, given 1/, "min(x)", 1, 3),
    ],
  },
  {
    // the second case puts the faulty call after a correct one of the same name
    name: "wrong arity exp(x, y), alone and after a correct exp(x)",
    text: withEquations("exp(x, y)", "exp(x) + exp(x, y)"),
    faults: [
      eq("x", /exp\(\) takes 1 argument, given 2/, "exp(x, y)", 1, 3),
      eq("y", /exp\(\) takes 1 argument, given 2/, "exp(x) + exp(x, y)", 10, 3),
    ],
  },
  {
    // an expression that stops early is marked just past its last character
    name: "a trailing operator and an unclosed parenthesis",
    text: withEquations("x +", "(x"),
    faults: [
      eq("x", /the expression ends after '\+'/, "x +", 4),
      eq("y", /this '\(' is never closed/, "(x", 1),
    ],
  },
  {
    name: "an unmatched ')' and an empty argument",
    text: withEquations("x)", "min(x,)"),
    faults: [
      eq("x", /this '\)' has no matching '\('/, "x)", 2),
      eq("y", /cannot read the expression: Value expected/, "min(x,)", 7),
    ],
  },
  {
    // a line break is shown as a space, so the caret still stands under its column
    name: "an empty equation and a line break inside one",
    text: withEquations("", "x\n+ y"),
    faults: [
      eq("x", /the expression is empty/, "", 1),
      eq("y", /unexpected character "\\n" \(U\+000A\)/, "x + y", 2),
    ],
  },
  {
    name: "conditions with no comparison and with two",
    text: specWith((s) => {
      s.assumptions[0].condition = "a*K + m";
      s.assumptions.push({ text: "Chained comparison (invented).", condition: "m < a*K < 2" });
    }),
    faults: [
      {
        path: "assumptions[0].condition",
        message: /a condition must compare two expressions/,
        caret: { line: "a*K + m", column: 1 },
      },
      {
        path: "assumptions[1].condition",
        message: /a condition must compare two expressions/,
        caret: { line: "m < a*K < 2", column: 9 },
      },
    ],
  },
  {
    name: "a state in a condition",
    text: specWith((s) => (s.assumptions[0].condition = "a*x > m")),
    faults: [
      {
        path: "assumptions[0].condition",
        message: /'x' is a state; a condition relates parameters only/,
        caret: { line: "a*x > m", column: 3 },
      },
    ],
  },
];

// ---------------------------------------------------------------------------------------------
// Injection attempts. Had any payload run, the process would have ended with another code
// (process.exit(0) or exit(7)) or left a file "pwned" in the working directory: both are
// asserted absent for every case, beside the located message.
// ---------------------------------------------------------------------------------------------
const injections: BadSpec[] = [
  {
    name: "process.exit(0) and require('fs') writing a file",
    text: withEquations("process.exit(0)", "require('fs').writeFileSync('pwned', '')"),
    faults: [
      eq("x", unexpected("."), "process.exit(0)", 8),
      eq("y", unexpected("'"), "require('fs').writeFileSync('pwned', '')", 9),
    ],
  },
  {
    name: "Function('...')() and a template string",
    text: withEquations("Function('process.exit(7)')()", "`${process.exit(0)}`"),
    faults: [
      eq("x", unexpected("'"), "Function('process.exit(7)')()", 10),
      eq("y", unexpected("`"), "`${process.exit(0)}`", 1),
    ],
  },
  {
    name: "constructor.constructor(...) and this.process",
    text: withEquations("constructor.constructor('process.exit(0)')()", "this.process.exit(0)"),
    faults: [
      eq("x", unexpected("."), "constructor.constructor('process.exit(0)')()", 12),
      eq("y", unexpected("."), "this.process.exit(0)", 5),
    ],
  },
  {
    name: "the names constructor and __proto__",
    text: withEquations("x*constructor", "x + __proto__"),
    faults: [
      eq("x", unknownName("constructor"), "x*constructor", 3, 11),
      eq("y", unknownName("__proto__"), "x + __proto__", 5, 9),
    ],
  },
  {
    name: "this, and a string",
    text: withEquations("this", '"process.exit(0)"'),
    faults: [eq("x", unknownName("this"), "this", 1, 4), eq("y", unexpected('"'), '"process.exit(0)"', 1)],
  },
  {
    name: "process.exit(0) in an assumption's condition",
    text: specWith((s) => (s.assumptions[0].condition = "process.exit(0) < 1")),
    faults: [
      {
        path: "assumptions[0].condition",
        message: unexpected("."),
        caret: { line: "process.exit(0) < 1", column: 8 },
      },
    ],
  },
  {
    // JSON.parse keeps "__proto__" as an own key; copied into a record it would vanish silently
    name: "__proto__ keys in equations and window",
    text: baseTextWith('"equations": {', '"equations": {\n    "__proto__": "process.exit(0)",').replace(
      '"window": {',
      '"window": {\n    "__proto__": [0, 1],',
    ),
    faults: [
      { path: "equations.__proto__", message: /the key '__proto__' is not accepted/ },
      { path: "window.__proto__", message: /the key '__proto__' is not accepted/ },
    ],
  },
];

// ---------------------------------------------------------------------------------------------

interface IssueBlock {
  head: string;
  source?: string;
  caret?: string;
}

/** stderr split into issues: the "error ... at PATH: message" line, then the source and caret lines. */
function issueBlocks(stderr: string): IssueBlock[] {
  const blocks: IssueBlock[] = [];
  for (const line of stderr.split("\n")) {
    if (line.startsWith("error ")) blocks.push({ head: line });
    else if (blocks.length && line.startsWith("    ")) {
      const block = blocks[blocks.length - 1];
      if (block.source === undefined) block.source = line.slice(4);
      else if (block.caret === undefined) block.caret = line.slice(4);
    }
  }
  return blocks;
}

function expectRejected(run: CliResult, bad: BadSpec): void {
  const shown = `\n--- stderr ---\n${run.stderr}`;
  expect(run.signal, shown).toBeNull();
  expect(run.status, shown).toBe(2);
  expect(run.stdout).toBe("");
  expect(run.stderr).not.toMatch(STACK_FRAME);
  expect(run.stderr).not.toMatch(/internal error/);
  const summary = /^(\d+) errors? in the spec; nothing was written\.$/m.exec(run.stderr);
  expect(summary, shown).not.toBeNull();
  const blocks = issueBlocks(run.stderr);
  expect(blocks.length, shown).toBe(Number(summary![1]));
  if (!bad.cascades) expect(blocks.length, shown).toBe(bad.faults.length);
  for (const fault of bad.faults) {
    const prefix = `error spec.json: at ${fault.path}: `;
    const block = blocks.find(
      (b) => b.head.startsWith(prefix) && fault.message.test(b.head.slice(prefix.length)),
    );
    expect(block, `no issue at ${fault.path} matching ${fault.message}${shown}`).toBeDefined();
    if (!fault.caret) continue;
    expect(block!.source, shown).toBe(fault.caret.line);
    const caret = /^( *)(\^+)$/.exec(block!.caret ?? "");
    expect(caret, `no caret line under ${fault.path}${shown}`).not.toBeNull();
    expect({ column: caret![1].length + 1, length: caret![2].length }, shown).toEqual({
      column: fault.caret.column,
      length: fault.caret.length ?? 1,
    });
  }
}

function checkBadSpec(bad: BadSpec): void {
  const dir = makeWorkDir();
  const out = join(dir, "o");
  const analyzed = runKeel(["analyze", "spec.json", "--out", out], {
    cwd: dir,
    files: { "spec.json": bad.text },
  });
  expectRejected(analyzed, bad);
  expect(listEntries(dir), "analyze wrote something").toEqual(["spec.json"]);

  const checked = runKeel(["check", "spec.json"], { cwd: dir });
  expectRejected(checked, bad);
  expect(checked.stderr, "check and analyze report the same issues").toBe(analyzed.stderr);
  expect(listEntries(dir), "check wrote something").toEqual(["spec.json"]);
  expect(readFileSync(join(dir, "spec.json"), "utf8")).toBe(bad.text);
}

const paths = (bad: BadSpec) => bad.faults.map((f) => f.path).join(", ");

afterAll(removeWorkDirs);

describe("keel check and analyze on the valid base (the control every case below departs from)", () => {
  it("check(base) exits 0 with 'spec OK'; analyze(base) writes o/results.json", () => {
    const dir = makeWorkDir();
    const checked = runKeel(["check", "spec.json"], { cwd: dir, files: { "spec.json": BASE_TEXT } });
    expect(checked.status, checked.stderr).toBe(0);
    expect(checked.stdout).toMatch(/^spec OK$/m);
    const analyzed = runKeel(["analyze", "spec.json", "--out", "o"], { cwd: dir });
    expect(analyzed.status, analyzed.stderr).toBe(0);
    expect(listFiles(dir)).toEqual(["o/results.json", "spec.json"]);
  });
});

describe.each([
  ["files that are not a JSON object", fileFaults],
  ["shape faults", shapeFaults],
  ["expressions outside the grammar", expressionFaults],
  ["injection attempts", injections],
] as const)("keel analyze/check reject %s", (_group, cases) => {
  for (const bad of cases) {
    it(`analyze/check(${bad.name}) exit 2, locate ${paths(bad)}, write nothing`, () => checkBadSpec(bad));
  }
});

describe("keel check on text fields that look like code", () => {
  it("check(title and purpose holding payloads) exits 0, prints the title verbatim, runs nothing", () => {
    const title = "`${process.exit(3)}` require('fs').writeFileSync('pwned', '')";
    const text = specWith((s) => {
      s.title = title;
      s.purpose = "Function('process.exit(7)')()";
      s.cautions = ["constructor.constructor('process.exit(0)')()"];
    });
    const run = runKeel(["check", "spec.json"], { files: { "spec.json": text } });
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toContain(title);
    expect(listEntries(run.cwd)).toEqual(["spec.json"]);
  });
});

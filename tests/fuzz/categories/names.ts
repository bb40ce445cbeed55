/**
 * names: state, parameter, scenario and claim names that are prototype properties, words
 * reserved by JavaScript or the expression language, Unicode letters and look-alikes (Unicode
 * Technical Standard #39), or that collide; scenario names also name figure files.
 */
import {
  baseSpec,
  BASE_NAMES,
  specCase,
  specText,
  type BaseNames,
  type CommandName,
  type FuzzCase,
} from "../base.js";
import { setAt } from "../mutate.js";

const C = "names";

const PROTOTYPE = [
  "constructor",
  "__proto__",
  "prototype",
  "toString",
  "hasOwnProperty",
  "valueOf",
  "isPrototypeOf",
  "__defineSetter__",
];
const RESERVED = [
  "if",
  "for",
  "return",
  "class",
  "this",
  "new",
  "delete",
  "eval",
  "Function",
  "process",
  "require",
  "import",
  "await",
  "arguments",
  "undefined",
  "NaN",
  "Infinity",
  "null",
  "true",
];
const EXPRESSION_WORDS = [
  "e",
  "pi",
  "i",
  "E",
  "PI",
  "tau",
  "phi",
  "sqrt",
  "exp",
  "end",
  "mod",
  "to",
  "in",
  "and",
  "not",
  "x",
  "t",
  "time",
  "Math",
];
const UNICODE = [
  "\u03b1",
  "\u03a9",
  "\u00f1",
  "\u0430",
  "\u00b5",
  "\u2126",
  "\u{1D465}",
  "u\u0301",
  "\u{1F41F}",
  "\u4e2d",
  "u\u200b",
  "\u0660",
  "\u05d0",
  "_u",
  "u_1",
  "U",
  "uu",
  "u1",
  "ℓ",
];
const SHAPES = ["", " ", "u ", "1u", "u-1", "u.v", "a b", "$u", "u$", "x".repeat(200), "\u202eu"];

const slots: (keyof BaseNames)[] = ["u", "r", "a"];

/** The base spec with one base name replaced everywhere it appears. */
function renamed(slot: keyof BaseNames, to: string): string {
  return specText(baseSpec({ ...BASE_NAMES, [slot]: to }));
}

function renames(): FuzzCase[] {
  const all = [...PROTOTYPE, ...RESERVED, ...EXPRESSION_WORDS, ...UNICODE, ...SHAPES];
  return all.map((name, k) => {
    const slot = slots[k % slots.length];
    const command: CommandName = k % 4 === 3 ? "analyze" : "check";
    return specCase(
      C,
      `${k} ${slot} named ${JSON.stringify(name)} (${command})`,
      renamed(slot, name),
      command,
    );
  });
}

const COLLISIONS: [string, Partial<BaseNames>][] = [
  ["two states named alike", { v: "u" }],
  ["a state and a parameter named alike", { r: "u" }],
  ["two parameters named alike", { b: "a" }],
  ["names that differ only in case", { v: "U" }],
  ["a state named like the id", { u: "fuzz" }],
];

function collisions(): FuzzCase[] {
  return COLLISIONS.map(([name, names]) =>
    specCase(C, name, specText(baseSpec({ ...BASE_NAMES, ...names }))),
  );
}

/** Scenario names become figure file names: path separators, dot names, devices, length. */
const SCENARIO_NAMES = [
  "constructor",
  "__proto__",
  "../../etc/passwd",
  "..",
  ".",
  "/",
  "a/b",
  "a\\b",
  "con",
  "NUL",
  "aux.txt",
  "x".repeat(300),
  "\u{1F41F}\u{1F41F}",
  "\u202etxt.exe",
  "name\u0000nul",
  "start",
  "Start",
  "START ",
  "timeseries-start",
  "portrait",
];

function scenarioNames(): FuzzCase[] {
  return SCENARIO_NAMES.map((name, k) => {
    const spec = baseSpec();
    setAt(spec, ["scenarios", 0, "name"], name);
    // a second scenario with a near name tests the figure-name collision rule
    setAt(spec, ["scenarios", 1], { name: `${name}!`, initial: { u: 1, v: 1 }, horizon: 5 });
    const command: CommandName = k % 2 ? "check" : "build";
    return specCase(
      C,
      `scenario named ${JSON.stringify(name.slice(0, 30))} (${command})`,
      specText(spec),
      command,
    );
  });
}

const CLAIM_IDS = ["__proto__", "constructor", "../x", "a".repeat(5000), "c1", "-x", "\u03b1"];

function claimIds(): FuzzCase[] {
  return CLAIM_IDS.map((id) => {
    const spec = baseSpec();
    setAt(spec, ["claims", 0, "id"], id);
    if (id === "c1") setAt(spec, ["claims", 1], { id: "c1", kind: "equilibrium-count", count: 3 });
    return specCase(C, `claim id ${JSON.stringify(id.slice(0, 30))}`, specText(spec));
  });
}

export function nameCases(): FuzzCase[] {
  return [...renames(), ...collisions(), ...scenarioNames(), ...claimIds()];
}

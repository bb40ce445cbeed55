/**
 * hostile-equations: terms no state makes finite, overflow on differentiation, roots outside
 * their domain, sizes and depths past the caps (README "Limits": 1 000 tokens, 32 levels of
 * parentheses), names and syntax outside the whitelist, and text shaped like code injection.
 * A seeded grammar adds random expressions over the base names and extreme numbers.
 */
import fc from "fast-check";
import {
  baseEquations,
  baseSpec,
  BASE_NAMES,
  specCase,
  specText,
  type CommandName,
  type FuzzCase,
} from "../base.js";
import { draw, setAt } from "../mutate.js";

const C = "hostile-equations";
const BASE_U = baseEquations(BASE_NAMES).u;

/** Expressions that may well be accepted: run further than check. */
const PLAUSIBLE = [
  "u^(1/3)",
  "sqrt(u)",
  "abs(u - 0.5)",
  "min(u, v)",
  "max(u, v) - u",
  "tan(u)",
  "exp(10*u) - 1",
  "log(1 + u)",
  "u^0.5 - v",
  "pow(u, 2) - v",
  "tanh(1e6*(u - 0.5))",
  "u*sin(1/(u + 1e-9))",
  "1e-300*u",
  "u - 1e308*0",
  "u^1e-308",
  "exp(-1e308*u)",
  "((((((((((((((((((((((((((((((((u))))))))))))))))))))))))))))))))",
  `${Array.from({ length: 13 }, (_, k) => `${k + 1}*u`).join(" + ")} - 91*u`,
  "u/(1 + u)",
  "v/(u + v + 1)",
  "u*(1 - u)*(u - 0.5)",
  "-u",
  "0",
  "1",
  "1e-12",
  "2^-1074*u",
];

const REFUSED_OR_NOT = [
  "u/0",
  "1/(u - u)",
  "0/0",
  "u/(v - v)",
  "1/u",
  "1/(u - 0.75)",
  "1e308*u*u",
  "1e308*u*u*u",
  "-1e308*u*u",
  "(-u)^(1/3)",
  "sqrt(-u - 1)",
  "sqrt(u - 1)",
  "log(u)",
  "log(-u)",
  "log(0)",
  "log(u - 0.75)",
  "u^1e308",
  "u^-1e308",
  "(-8)^0.5",
  "u^u",
  "0^0",
  "0^(-1)",
  "tan(u*1e6)",
  "exp(u*1000)",
  "exp(exp(exp(10*u)))",
  "1e999*u",
  "u^(1/0)",
  "sqrt(u)^-1",
  "abs(u)/u",
  "max(u)",
  "min()",
  "pow(u)",
  "pow(u, 2, 3)",
  "sin()",
  "sqrt(u, v)",
  "exp",
  "u^",
  "*u",
  "u**2",
  "u^^2",
  "u--v",
  "u+-+-v",
  "((u)",
  "(u))",
  ")(",
  "",
  " ",
];

const UNKNOWN = [
  "foo(u)",
  "cbrt(u)",
  "erf(u)",
  "gamma(u)",
  "factorial(u)",
  "u!",
  "derivative(u, u)",
  'evaluate("1")',
  "import({})",
  'createUnit("x")',
  "eval(u)",
  'Function("u")',
  "u.constructor",
  "u[0]",
  "[u, v]",
  "{a: 1}",
  "u ? v : 1",
  "u == v",
  "u < v",
  "u and v",
  "not u",
  "u mod 2",
  "u % 2",
  "u to cm",
  "5 cm",
  "u'",
  "t*u",
  "x",
  '"str"',
  "u; v",
  "u = 1",
  "f(x) = x",
  "@u",
  "#u",
  "u\nv",
  "u\u0000",
  "u\u202e",
  "u\u200b",
  "\u1d64",
  "u\u00b2",
  "2u",
  "1e",
  "0x10*u",
  "0b11*u",
  "1_000*u",
  "Infinity*u",
  "NaN*u",
  "e*u",
  "pi*u",
  "i*u",
  "E*u",
  "true*u",
  "null",
  "undefined",
  "end",
  "u.^2",
  "u'*v",
  "u & v",
  "u | v",
  "u xor v",
  "u << 2",
  "u >> 2",
  "u ?? 1",
  "u in v",
  "|u|",
  "u\u2212v",
  "u\u00d7v",
  "\u221au",
];

const INJECTION = [
  "process.exit(1)",
  'require("fs")',
  'constructor.constructor("return process")()',
  "__proto__",
  "u); process.exit(0); (",
  "`${process.exit()}`",
  "u//comment",
  "u/*c*/",
  "u<!--",
  "</script><script>alert(1)</script>",
  "$(rm -rf /)",
  "; rm -rf /",
  "' OR 1=1 --",
  "u\\u0029",
  "this",
  "globalThis",
  "u + import.meta",
  "new Date()",
  "cos(u) /* */ + v",
  "u\r\n+v",
  "{{u}}",
  "${u}",
];

function cap(n: number, make: (k: number) => string): string {
  return Array.from({ length: n }, (_, k) => make(k)).join("");
}

const SIZES: [string, string][] = [
  ["a 100k-term sum", cap(100_000, (k) => (k ? "+u" : "u"))],
  ["a sum of 999 tokens", cap(500, (k) => (k ? "+u" : "u"))],
  ["a sum of 1 001 tokens", cap(501, (k) => (k ? "+u" : "u"))],
  ["20k factors", cap(20_000, (k) => (k ? "*u" : "u"))],
  ["20k nested parentheses", "(".repeat(20_000) + "u" + ")".repeat(20_000)],
  ["33 nested parentheses", "(".repeat(33) + "u" + ")".repeat(33)],
  ["33 nested function calls", "sin(".repeat(33) + "u" + ")".repeat(33)],
  ["1k unary minus signs", "-".repeat(1000) + "u"],
  ["a power tower of 400", cap(400, (k) => (k ? "^u" : "u"))],
  ["a 19 000-digit number", `${"9".repeat(19_000)}*u`],
];

type Placement = "u equation" | "v equation" | "beside the u equation" | "assumption condition";

function place(expr: string, where: Placement): string {
  const spec = baseSpec();
  if (where === "u equation") setAt(spec, ["equations", "u"], expr);
  else if (where === "v equation") setAt(spec, ["equations", "v"], expr);
  else if (where === "beside the u equation") setAt(spec, ["equations", "u"], `${BASE_U} + (${expr})`);
  else setAt(spec, ["assumptions", 0, "condition"], `${expr} < 1`);
  return specText(spec);
}

const PLACEMENTS: Placement[] = ["u equation", "v equation", "beside the u equation", "assumption condition"];
const short = (s: string) => JSON.stringify(s.length > 40 ? `${s.slice(0, 40)}…(${s.length})` : s);

function listed(list: string[], tag: string, commands: CommandName[]): FuzzCase[] {
  return list.map((expr, k) => {
    const where = PLACEMENTS[k % PLACEMENTS.length];
    const command = commands[k % commands.length];
    return specCase(C, `${tag} ${k} ${short(expr)} in ${where} (${command})`, place(expr, where), command);
  });
}

/** Random expressions from a small grammar: whitelisted and unknown calls, extreme numbers. */
function randomExpressions(seed: number): FuzzCase[] {
  const atom = fc.constantFrom(
    "u",
    "v",
    "r",
    "a",
    "b",
    "0",
    "1",
    "0.5",
    "1e308",
    "1e-308",
    "5e-324",
    "-1",
    "2",
  );
  const { expr } = fc.letrec<{ expr: string }>((tie) => ({
    expr: fc.oneof(
      { depthSize: "small", withCrossShrink: true },
      atom,
      fc
        .tuple(tie("expr"), fc.constantFrom("+", "-", "*", "/", "^"), tie("expr"))
        .map(([x, op, y]) => `(${x} ${op} ${y})`),
      fc
        .tuple(fc.constantFrom("exp", "log", "sqrt", "abs", "sin", "cos", "tan", "tanh", "-"), tie("expr"))
        .map(([f, x]) => `${f}(${x})`),
      fc
        .tuple(fc.constantFrom("min", "max", "pow"), tie("expr"), tie("expr"))
        .map(([f, x, y]) => `${f}(${x}, ${y})`),
    ),
  }));
  const pick = fc.tuple(
    expr,
    fc.constantFrom<Placement>(...PLACEMENTS),
    fc.constantFrom<CommandName>("check", "analyze"),
  );
  return draw(pick, seed, 60).map(([e, where, command], k) =>
    specCase(C, `random ${k} ${short(e)} in ${where} (${command})`, place(e, where), command),
  );
}

export function hostileEquationCases(seed: number): FuzzCase[] {
  return [
    ...listed(PLAUSIBLE, "plausible", ["analyze", "build", "analyze"]),
    ...listed(REFUSED_OR_NOT, "domain", ["check", "check", "analyze"]),
    ...listed(UNKNOWN, "syntax", ["check"]),
    ...listed(INJECTION, "injection", ["check", "check", "analyze"]),
    ...SIZES.map(([name, expr]) => specCase(C, `${name} (check)`, place(expr, "u equation"), "check")),
    ...randomExpressions(seed),
  ];
}

/** Functions an equation may call, with their accepted number of arguments. */
export const ALLOWED_FUNCTIONS = {
  exp: [1, 1],
  log: [1, 1],
  sqrt: [1, 1],
  abs: [1, 1],
  min: [2, Infinity],
  max: [2, Infinity],
  sin: [1, 1],
  cos: [1, 1],
  tan: [1, 1],
  tanh: [1, 1],
  pow: [2, 2],
} as const satisfies Record<string, readonly [number, number]>;

export type AllowedFunction = keyof typeof ALLOWED_FUNCTIONS;

export function isAllowedFunction(name: string): name is AllowedFunction {
  return Object.prototype.hasOwnProperty.call(ALLOWED_FUNCTIONS, name);
}

export const IDENTIFIER = /^[A-Za-z][A-Za-z0-9_]*$/;

/**
 * Names a state or parameter may not take: JavaScript keywords and object internals (the
 * compiler emits JS), the expression parser's keywords and constants, and function names.
 */
const RESERVED = new Set<string>([
  // JavaScript reserved words and literals
  "break",
  "case",
  "catch",
  "class",
  "const",
  "continue",
  "debugger",
  "default",
  "delete",
  "do",
  "else",
  "enum",
  "export",
  "extends",
  "false",
  "finally",
  "for",
  "function",
  "if",
  "import",
  "in",
  "instanceof",
  "new",
  "null",
  "return",
  "super",
  "switch",
  "this",
  "throw",
  "true",
  "try",
  "typeof",
  "var",
  "void",
  "while",
  "with",
  "yield",
  "let",
  "static",
  "implements",
  "interface",
  "package",
  "private",
  "protected",
  "public",
  "await",
  "async",
  "arguments",
  "eval",
  "undefined",
  "NaN",
  "Infinity",
  "globalThis",
  "window",
  "process",
  "require",
  "module",
  // object internals
  "constructor",
  "prototype",
  "toString",
  "valueOf",
  "hasOwnProperty",
  // expression-parser keywords and constants
  "mod",
  "to",
  "and",
  "or",
  "not",
  "xor",
  "end",
  // `i` (mathjs's imaginary unit) and `E` are free: user names become internal symbols straight
  // after parsing, so the parser's constants never meet them, and trades use both (an infected
  // or infective class i, an exposed class E); e and pi stay reserved, as a reader takes them for constants
  "e",
  "pi",
  "PI",
  "tau",
  "phi",
  "LN2",
  "LN10",
  "LOG2E",
  "LOG10E",
  "SQRT1_2",
  "SQRT2",
  "version",
  // time: models are autonomous, so 't' is kept free to give a clear message
  "t",
  // functions accepted in equations, and those derivatives may introduce
  "exp",
  "log",
  "sqrt",
  "abs",
  "min",
  "max",
  "sin",
  "cos",
  "tan",
  "tanh",
  "pow",
  "sech",
  "sec",
  "sign",
  "cosh",
  "sinh",
  "ln",
  "log10",
]);

export function isReservedName(name: string): boolean {
  return RESERVED.has(name);
}

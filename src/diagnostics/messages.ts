export type ConstantFaultReason = "overflow" | "not-real" | "divide-by-zero";
const CONSTANT_FAULT_WORDS: Record<ConstantFaultReason, string> = {
  overflow: "is beyond double precision (about 1.8e308)",
  "not-real": "is not a real number",
  "divide-by-zero": "divides by zero",
};

/** Every user-facing message, as a function, so wording lives in one place. */
export const messages = {
  timeLimitReached: (seconds: number, last: { stage: string; done: number; total: number } | null) =>
    `the analysis passed its time limit of ${seconds} s` +
    (last
      ? ` in the stage "${last.stage}" (${last.done} of ${last.total} done)`
      : " before its first stage") +
    "; nothing was written. Raise the limit with --time-limit SECONDS (or KEEL_TIME_LIMIT; 0 for none), " +
    "or ask for less work in the spec's analysis block (basins.resolution, parameters, parameterPairs)",
  timeLimitInvalid: () => "expected a number of seconds of at least 0 (0 for no limit)",
  jsonSyntax: (detail: string, line: number, column: number) =>
    `the file is not valid JSON (line ${line}, column ${column}): ${detail}`,
  // JSON faults found by spec/json-locate.ts (the engine's own messages omit the position of some)
  jsonEndOfFile: (expected: string) => `the file ends where ${expected} is expected`,
  jsonExpected: (expected: string, found: string) => `expected ${expected}, found ${found}`,
  jsonSingleQuotes: () => `strings and keys take double quotes (") in JSON, not single quotes`,
  jsonUnterminatedString: () => `this string is never closed with a double quote`,
  jsonControlInString: () => `a line break or control character inside a string must be escaped (\\n, \\t)`,
  jsonBadEscape: () => `invalid escape sequence in a string`,
  jsonBadNumber: () => `invalid number (JSON numbers have no leading zeros, '+' sign, or bare '.')`,
  jsonTrailing: () => `unexpected text after the end of the top-level value`,
  fileUnreadable: (file: string, reason: string) => `cannot read ${file}: ${reason}`,
  emptyOutputFolder: () =>
    `--out needs a folder name; an empty one is refused (it would mean the current folder)`,
  moreIssues: (count: number) => `… and ${count} more error${count === 1 ? "" : "s"} not shown`,
  // limits on the spec's text (spec/limits.ts) and its encoding (cli/io.ts)
  fileTooLarge: (limit: number) =>
    `the file is larger than ${limit} bytes, the most a spec may hold (SPEC_MAX_BYTES)`,
  textTooLarge: (length: number, limit: number) =>
    `the spec is ${length} characters long, more than the ${limit} a spec may hold (SPEC_MAX_BYTES)`,
  stringTooLong: (length: number, limit: number) =>
    `this string is ${length} characters long; at most ${limit} are accepted (SPEC_MAX_STRING)`,
  nestingTooDeep: (limit: number) =>
    `objects and arrays are nested more than ${limit} deep here; a spec needs at most 6 (SPEC_MAX_DEPTH)`,
  arrayTooLong: (limit: number) => `this array has more than ${limit} entries (SPEC_MAX_ARRAY)`,
  duplicateKey: (key: string, line1: number, column1: number, line2: number, column2: number) =>
    `the key '${key}' appears twice in one object (line ${line1}, column ${column1} and line ${line2}, column ${column2}); JSON readers disagree on which one holds, so keep one`,
  notUtf8: (byte: number, line: number) =>
    `the file is not valid UTF-8: byte ${byte} (line ${line}) does not begin or continue a character; save the file as UTF-8`,
  wrongEncoding: (encoding: string) =>
    `the file is ${encoding}; keel reads UTF-8 only: save the file as UTF-8`,
  fileIsFolder: () => `it is a folder, not a file`,
  outputUnwritable: (path: string, reason: string) => `cannot write ${path}: ${reason}`,
  pdfNotPrinted: (reason: string) =>
    `${reason}; everything else was written, without dossier.pdf (set KEEL_CHROMIUM to another browser, or give --no-pdf)`,
  outputLocked: (dir: string, pid: number, lock: string) =>
    Number.isNaN(pid)
      ? `another keel run is writing ${dir}; try again when it ends (or remove ${lock} if none is running)`
      : `another keel run (process ${pid}) is writing ${dir}; try again when it ends (or remove ${lock} if that process is not keel)`,
  outputNotKeels: (dir: string) =>
    `${dir} holds files that are not an earlier build of this spec; choose another --out, empty it, or give --force to write keel's files into it beside the others`,
  missingKey: (key: string, expected: string) =>
    `the required key '${key}' is missing (expected ${expected})`,
  unknownKey: (key: string, suggestion: string | null) =>
    `unknown key '${key}'${suggestion ? `; did you mean '${suggestion}'?` : ""}`,
  numberOverflows: () => `expected a finite number; this one is beyond double precision (about 1.8e308)`,
  forbiddenKey: (key: string) =>
    `the key '${key}' is not accepted anywhere in a spec (JavaScript reserves it for objects); a state or parameter needs another name`,
  duplicateName: (name: string, first: string) => `the name '${name}' is already used at ${first}`,
  invalidIdentifier: (name: string) =>
    `'${name}' is not a valid name: use a letter followed by letters, digits or '_'`,
  timeNameReserved: () =>
    `'t' is reserved for time, which may not appear in an autonomous model; choose another name`,
  reservedName: (name: string) =>
    `'${name}' is reserved (a keyword, constant or function name); choose another name`,
  missingEquation: (state: string) => `state '${state}' has no equation: add equations.${state}`,
  equationForUnknownState: (key: string) => `'${key}' is not a declared state, so it cannot have an equation`,
  windowUnknownState: (key: string) => `'${key}' is not a declared state`,
  windowMissingState: (state: string) => `the window gives no interval for state '${state}'`,
  intervalOrder: (lo: number, hi: number) => `the interval [${lo}, ${hi}] must have lo < hi`,
  windowOutsideBounds: (state: string, lo: number, hi: number, min: number, max: number) =>
    `the window [${lo}, ${hi}] for '${state}' lies outside the state's bounds [${min}, ${max}]`,
  initialMissing: (state: string) => `the initial state gives no value for '${state}'`,
  initialUnknown: (key: string) => `'${key}' is not a declared state`,
  initialOutsideWindow: (state: string, value: number, lo: number, hi: number) =>
    `initial ${state} = ${value} lies outside the window [${lo}, ${hi}]`,
  rangeExcludesValue: (value: number, lo: number, hi: number) =>
    `the range [${lo}, ${hi}] does not contain the value ${value}`,
  basinGrid: (resolution: number, coarse: number) =>
    `the basin resolution ${resolution} must be the coarse size ${coarse} times a power of two (e.g. 1024 and 64)`,
  unknownParameter: (name: string) => `'${name}' is not a declared parameter`,
  parameterWithoutRange: (name: string) =>
    `parameter '${name}' has no range, so its thresholds cannot be searched: add parameters[].range`,
  pairRepeats: (name: string) => `a parameter pair needs two different parameters, got '${name}' twice`,
  pointMissing: (state: string) => `the point gives no value for state '${state}'`,
  unknownAttractor: (given: string, allowed: string[]) =>
    `'${given}' is not an attractor keel can name; use one of: ${allowed.map((a) => `'${a}'`).join(", ")}`,
  unknownScenario: (name: string) => `'${name}' is not the name of a scenario in the spec`,
  claimNearWithCycle: () =>
    `'near' applies to an equilibrium; a claim that a scenario reaches a cycle takes no point`,
  planarOnly: (n: number) => `keel analyses planar models: exactly 2 states are needed, found ${n}`,
  // expression errors
  unexpectedCharacter: (ch: string) =>
    `unexpected character ${/^[\x20-\x7e]$/.test(ch) ? `'${ch}'` : `${JSON.stringify(ch)} (U+${ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, "0")})`}`,
  numberNotFinite: (text: string) => `the number ${text} is too large for double precision`,
  expressionTooLong: (tokens: number, limit: number) =>
    `this expression has ${tokens} tokens (numbers, names, operators); at most ${limit} are accepted (EXPRESSION_MAX_TOKENS): the limit is passed here`,
  expressionTooDeep: (limit: number) =>
    `parentheses are nested more than ${limit} deep here (EXPRESSION_MAX_NESTING)`,
  constantTermFault: (term: string, reason: ConstantFaultReason) =>
    `the term ${term} ${CONSTANT_FAULT_WORDS[reason]} whatever the state, so this rate is nowhere a finite number`,
  derivativeTermFault: (variable: string, term: string, reason: ConstantFaultReason) =>
    `the derivative with respect to ${variable} holds the term ${term}, which ${CONSTANT_FAULT_WORDS[reason]}${reason === "overflow" ? ": a coefficient this large cannot be analysed; rescale the model" : reason === "not-real" ? " (a fractional power of a negative number has no real value: write the root of a positive quantity, e.g. -(u^(1/3)) for the real cube root of -u)" : ""}`,
  nowhereFinite: (points: number, at: string, value: string) =>
    `this rate is not a finite real number anywhere in the window (checked at ${points} points; at ${at} it is ${value})`,
  unclosedParenthesis: () => `this '(' is never closed: a ')' is missing`,
  unmatchedParenthesis: () => `this ')' has no matching '('`,
  endsEarly: (last: string) => `the expression ends after '${last}': a value is missing`,
  unknownName: (name: string, kinds: string) => `unknown name '${name}': declare it as ${kinds}`,
  timeNotAllowed: () => `'t' is not a declared name: equations must be autonomous (time may not appear)`,
  functionNotAllowed: (name: string, allowed: readonly string[]) =>
    `'${name}' is not an accepted function; accepted: ${allowed.join(", ")}`,
  nameIsNotFunction: (name: string) => `'${name}' is a name, not a function; it cannot be called`,
  functionNeedsCall: (name: string) => `'${name}' is a function: call it with arguments, e.g. ${name}(x)`,
  wrongArity: (name: string, expected: string, got: number) => `${name}() takes ${expected}, given ${got}`,
  implicitMultiplication: () =>
    `a number, name or ')' is followed directly by a number, name or '(': write '*' for multiplication`,
  syntax: (detail: string) => `cannot read the expression: ${detail}`,
  emptyExpression: () => `the expression is empty`,
  stateInCondition: (name: string) => `'${name}' is a state; a condition relates parameters only`,
  conditionNeedsComparison: () =>
    `a condition must compare two expressions with one of < <= > >=, e.g. 'K2 < r1/a12'`,
  // CLI
  usage: (detail: string) => `usage error: ${detail}`,
  resultsSchemaMissing: (path: string, reason: string) =>
    `keel's installation lacks its results schema: cannot read ${path} (${reason})`,
  internal: (detail: string) => `internal error (please report it with the spec that caused it): ${detail}`,
} as const;

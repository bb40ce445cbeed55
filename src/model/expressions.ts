import {
  isConstantNode,
  isFunctionNode,
  isOperatorNode,
  isParenthesisNode,
  isSymbolNode,
  parse,
  type FunctionNode,
  type MathNode,
} from "mathjs";
import type { SpecIssue } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import { ALLOWED_FUNCTIONS, isAllowedFunction } from "../spec/names.js";
import { lexExpression, type Token } from "./lexer.js";

/** How the expression's names map to the internal symbols the compiler and differentiator use. */
export interface NameTable {
  /** user name → internal symbol (S0, S1 for states; P0, P1, ... for parameters) */
  internal: Map<string, string>;
  /** internal symbol → user name */
  user: Map<string, string>;
  states: Set<string>;
  parameters: Set<string>;
}

export function buildNameTable(states: string[], parameters: string[]): NameTable {
  const internal = new Map<string, string>();
  const user = new Map<string, string>();
  states.forEach((n, i) => {
    internal.set(n, `S${i}`);
    user.set(`S${i}`, n);
  });
  parameters.forEach((n, i) => {
    internal.set(n, `P${i}`);
    user.set(`P${i}`, n);
  });
  return { internal, user, states: new Set(states), parameters: new Set(parameters) };
}

export type ExpressionResult = { ok: true; node: MathNode } | { ok: false; issue: SpecIssue };

const OPERATORS = new Set(["add", "subtract", "multiply", "divide", "pow", "unaryMinus", "unaryPlus"]);

interface CheckContext {
  text: string;
  path: (string | number)[];
  names: NameTable;
  /** Conditions relate parameters only. */
  allowStates: boolean;
}

function fail(
  ctx: CheckContext,
  code: string,
  message: string,
  column: number,
  length = 1,
): ExpressionResult {
  return { ok: false, issue: { code, path: ctx.path, message, source: { text: ctx.text, column, length } } };
}

/**
 * Tokens of one expression: a rate law of ecology or kinetics runs to a few dozen; the parser and
 * every walker of the tree after it recurse once per operator of a chain, so the size is held far
 * below what a call stack allows.
 */
export const EXPRESSION_MAX_TOKENS = 1000;
/** Parentheses (and calls) open at once: each costs the parser several nested calls. */
export const EXPRESSION_MAX_NESTING = 32;

/** An expression too long or too deeply nested to parse safely, with the caret at the token that passes the limit. */
function checkSize(ctx: CheckContext, tokens: Token[]): ExpressionResult | null {
  if (tokens.length > EXPRESSION_MAX_TOKENS) {
    const tok = tokens[EXPRESSION_MAX_TOKENS];
    return fail(
      ctx,
      "limit_expression",
      messages.expressionTooLong(tokens.length, EXPRESSION_MAX_TOKENS),
      tok.column,
      tok.text.length,
    );
  }
  let depth = 0;
  for (const tok of tokens) {
    if (tok.kind === "lparen" && ++depth > EXPRESSION_MAX_NESTING)
      return fail(ctx, "limit_expression", messages.expressionTooDeep(EXPRESSION_MAX_NESTING), tok.column);
    if (tok.kind === "rparen") depth--;
  }
  return null;
}

/**
 * Faults the expression parser reports without a usable column: unbalanced parentheses and an
 * expression that stops after an operator. Found here, from the tokens, so the caret is exact.
 */
function checkStructure(ctx: CheckContext, tokens: Token[]): ExpressionResult | null {
  const open: Token[] = [];
  for (const tok of tokens) {
    if (tok.kind === "lparen") open.push(tok);
    else if (tok.kind === "rparen" && !open.pop())
      return fail(ctx, "unmatched_parenthesis", messages.unmatchedParenthesis(), tok.column);
  }
  if (open.length)
    return fail(ctx, "unclosed_parenthesis", messages.unclosedParenthesis(), open[open.length - 1].column);
  const last = tokens[tokens.length - 1];
  if (last.kind === "op" || last.kind === "comma" || last.kind === "compare")
    return fail(ctx, "ends_early", messages.endsEarly(last.text), ctx.text.trimEnd().length + 1);
  return null;
}

function checkTokens(ctx: CheckContext, tokens: Token[]): ExpressionResult | null {
  if (tokens.length === 0) return fail(ctx, "empty_expression", messages.emptyExpression(), 1);
  for (let k = 0; k < tokens.length; k++) {
    const tok = tokens[k];
    const next = tokens[k + 1];
    if (tok.kind === "number" && !Number.isFinite(Number(tok.text)))
      return fail(ctx, "number_not_finite", messages.numberNotFinite(tok.text), tok.column, tok.text.length);
    const endsOperand =
      tok.kind === "number" || tok.kind === "rparen" || (tok.kind === "name" && next?.kind !== "lparen");
    if (tok.kind === "name") {
      const isCall = next?.kind === "lparen";
      const declared = ctx.names.internal.has(tok.text);
      if (isCall && declared)
        return fail(ctx, "not_a_function", messages.nameIsNotFunction(tok.text), tok.column, tok.text.length);
      if (isCall && !isAllowedFunction(tok.text))
        return fail(
          ctx,
          "function_not_allowed",
          messages.functionNotAllowed(tok.text, Object.keys(ALLOWED_FUNCTIONS)),
          tok.column,
          tok.text.length,
        );
      if (!isCall && isAllowedFunction(tok.text) && !declared)
        return fail(
          ctx,
          "function_needs_call",
          messages.functionNeedsCall(tok.text),
          tok.column,
          tok.text.length,
        );
      if (!isCall && !declared) {
        const message =
          tok.text === "t"
            ? messages.timeNotAllowed()
            : messages.unknownName(tok.text, ctx.allowStates ? "a state or a parameter" : "a parameter");
        return fail(ctx, "unknown_name", message, tok.column, tok.text.length);
      }
      if (!isCall && !ctx.allowStates && ctx.names.states.has(tok.text))
        return fail(
          ctx,
          "state_in_condition",
          messages.stateInCondition(tok.text),
          tok.column,
          tok.text.length,
        );
    }
    if (endsOperand && next && (next.kind === "number" || next.kind === "name" || next.kind === "lparen"))
      return fail(
        ctx,
        "implicit_multiplication",
        messages.implicitMultiplication(),
        next.column,
        next.text.length,
      );
  }
  return null;
}

/** Defence in depth: the parsed tree may hold only the node kinds the grammar allows. */
function checkTree(ctx: CheckContext, root: MathNode, tokens: Token[]): ExpressionResult | null {
  let problem: ExpressionResult | null = null;
  // the tree keeps no positions, but a pre-order walk meets calls in the order their names appear
  const callNames = tokens.filter((tok, k) => tok.kind === "name" && tokens[k + 1]?.kind === "lparen");
  let callsSeen = 0;
  root.traverse((node) => {
    if (problem) return;
    if (isConstantNode(node)) {
      // mathjs types the value as a number, but a parsed literal may be a string or boolean
      const value: unknown = node.value;
      if (typeof value !== "number" || !Number.isFinite(value))
        problem = fail(ctx, "syntax", messages.syntax("only finite numbers are accepted"), 1);
      return;
    }
    // names were checked token by token; function names appear here as call targets
    if (isSymbolNode(node) || isParenthesisNode(node)) return;
    if (isOperatorNode(node)) {
      if (!OPERATORS.has(node.fn) || node.implicit)
        problem = fail(
          ctx,
          "operator_not_allowed",
          messages.syntax(`the operator '${node.op}' is not accepted`),
          1,
        );
      return;
    }
    if (isFunctionNode(node)) {
      problem = checkCall(ctx, node, callNames[callsSeen++]?.column ?? 1);
      return;
    }
    problem = fail(ctx, "syntax", messages.syntax(`this construct is not accepted (${node.type})`), 1);
  });
  return problem;
}

/** What a parsed call is made on: mathjs types it as a SymbolNode, but any node may stand there, named or not. */
type CallTarget = MathNode & { name?: string };

/** A call must name an allowed function and pass it an accepted number of arguments. */
function checkCall(ctx: CheckContext, node: FunctionNode, col: number): ExpressionResult | null {
  const target: CallTarget = node.fn;
  const name = target?.name;
  if (!name || !isAllowedFunction(name))
    return fail(
      ctx,
      "function_not_allowed",
      messages.functionNotAllowed(String(name), Object.keys(ALLOWED_FUNCTIONS)),
      col,
    );
  const [lo, hi] = ALLOWED_FUNCTIONS[name];
  const count = node.args.length;
  if (count < lo || count > hi) {
    const expected = lo === hi ? `${lo} argument${lo === 1 ? "" : "s"}` : `at least ${lo} arguments`;
    return fail(ctx, "wrong_arity", messages.wrongArity(name, expected, count), col, name.length);
  }
  return null;
}

/** Rewrites user names to internal symbols, so no user text reaches the simplifier or compiler. */
function toInternal(root: MathNode, names: NameTable): MathNode {
  return root.transform((node: MathNode) => {
    if (isSymbolNode(node) && names.internal.has(node.name)) {
      const copy = node.clone();
      copy.name = names.internal.get(node.name)!;
      return copy;
    }
    return node;
  });
}

/**
 * The text the expression parser reads: each `**` token becomes `^` and a space, so the parser
 * sees its own power operator and every column (for its error carets) stays where it was.
 */
function parserText(text: string, tokens: Token[]): string {
  let out = text;
  for (const tok of tokens)
    if (tok.text === "**") out = out.slice(0, tok.column - 1) + "^ " + out.slice(tok.column + 1);
  return out;
}

/** Parses one expression of the whitelisted grammar into an internal-symbol tree. */
export function parseExpression(
  text: string,
  path: (string | number)[],
  names: NameTable,
  options: { allowStates?: boolean } = {},
): ExpressionResult {
  const ctx: CheckContext = { text, path, names, allowStates: options.allowStates ?? true };
  const lexed = lexExpression(text, false);
  if (!lexed.ok)
    return fail(ctx, "unexpected_character", messages.unexpectedCharacter(lexed.char), lexed.column);
  const tokenProblem =
    checkSize(ctx, lexed.tokens) ?? checkTokens(ctx, lexed.tokens) ?? checkStructure(ctx, lexed.tokens);
  if (tokenProblem) return tokenProblem;
  let root: MathNode;
  try {
    root = parse(parserText(text, lexed.tokens));
  } catch (err) {
    const e = err as Error & { char?: number };
    const detail = e.message.replace(/\s*\(char \d+\)\s*$/, "");
    return fail(
      ctx,
      "syntax",
      messages.syntax(detail),
      typeof e.char === "number" ? Math.max(1, Math.min(e.char, text.length)) : 1,
    );
  }
  const treeProblem = checkTree(ctx, root, lexed.tokens);
  if (treeProblem) return treeProblem;
  return { ok: true, node: toInternal(root, names) };
}

export type Comparison = "<" | "<=" | ">" | ">=";

export type ConditionResult =
  { ok: true; lhs: MathNode; rhs: MathNode; op: Comparison } | { ok: false; issue: SpecIssue };

/** Parses an inequality `lhs OP rhs` between parameter expressions. */
export function parseCondition(text: string, path: (string | number)[], names: NameTable): ConditionResult {
  const lexed = lexExpression(text, true);
  const ctx: CheckContext = { text, path, names, allowStates: false };
  if (!lexed.ok)
    return fail(
      ctx,
      "unexpected_character",
      messages.unexpectedCharacter(lexed.char),
      lexed.column,
    ) as ConditionResult;
  const comparisons = lexed.tokens.filter((t) => t.kind === "compare");
  if (comparisons.length !== 1) {
    const col = comparisons[1]?.column ?? 1;
    return fail(ctx, "condition_form", messages.conditionNeedsComparison(), col) as ConditionResult;
  }
  const cmp = comparisons[0];
  const at = cmp.column - 1;
  const left = parseExpression(text.slice(0, at), path, names, { allowStates: false });
  if (!left.ok) {
    left.issue.source = { ...left.issue.source!, text };
    return left;
  }
  const right = parseExpression(
    " ".repeat(at + cmp.text.length) + text.slice(at + cmp.text.length),
    path,
    names,
    { allowStates: false },
  );
  if (!right.ok) {
    right.issue.source = { ...right.issue.source!, text };
    return right;
  }
  return { ok: true, lhs: left.node, rhs: right.node, op: cmp.text as Comparison };
}

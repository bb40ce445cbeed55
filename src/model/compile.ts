import type { MathNode } from "mathjs";
import type { Parsed, SpecIssue } from "../diagnostics/issue.js";
import type { NormalizedSpec } from "../spec/types.js";
import { buildNameTable, parseCondition, parseExpression } from "./expressions.js";
import { differentiate } from "./derivatives.js";
import { emitBody, emitExpression, type CodegenOptions } from "./codegen.js";
import { instantiate, instantiateParametric, instantiateRhs } from "./instantiate.js";
import { findSingularFactors } from "./factors.js";
import { findEquationFaults, findJacobianFaults } from "./constant-faults.js";
import { expressionToTex, expressionToText, nameToTex } from "./tex.js";
import type { CompiledCondition, CompiledExpression, GeneratedSource, Model } from "./types.js";

export { instantiateParametric, instantiateRhs };

const COMPARISON_TEX = { "<": "<", "<=": "\\le", ">": ">", ">=": "\\ge" } as const;

function body(nodes: MathNode[], options: CodegenOptions): string {
  return emitBody(nodes, 2, options);
}

type ParsedCondition = { index: number; text: string; result: ReturnType<typeof parseCondition> };
type NameTable = ReturnType<typeof buildNameTable>;
type Describe = (node: MathNode) => CompiledExpression;

/** The conditions of assumptions and of condition-decides claims, parsed; their issues go to `issues`. */
function parseConditions(
  spec: NormalizedSpec,
  names: NameTable,
  issues: SpecIssue[],
): { assumptions: ParsedCondition[]; claims: ParsedCondition[] } {
  const assumptions: ParsedCondition[] = [];
  spec.assumptions.forEach((a, index) => {
    if (a.condition === null) return;
    const result = parseCondition(a.condition, ["assumptions", index, "condition"], names);
    if (!result.ok) issues.push(result.issue);
    assumptions.push({ index, text: a.condition, result });
  });
  const claims: ParsedCondition[] = [];
  spec.claims.forEach((c, index) => {
    if (c.kind !== "condition-decides") return;
    const result = parseCondition(c.condition, ["claims", index, "condition"], names);
    if (!result.ok) issues.push(result.issue);
    claims.push({ index, text: c.condition, result });
  });
  return { assumptions, claims };
}

function compileCondition(describe: Describe, { index, text, result }: ParsedCondition): CompiledCondition {
  if (!result.ok) throw new Error("unreachable: condition issues returned above");
  const lhs = describe(result.lhs);
  const rhs = describe(result.rhs);
  const evalSide = instantiate<(p: ArrayLike<number>) => number>(
    ["p"],
    `return ${emitExpression(result.lhs, {})};`,
  );
  const evalOther = instantiate<(p: ArrayLike<number>) => number>(
    ["p"],
    `return ${emitExpression(result.rhs, {})};`,
  );
  const op = result.op;
  return {
    assumption: index,
    text,
    lhs,
    rhs,
    op,
    tex: `${lhs.tex} ${COMPARISON_TEX[op]} ${rhs.tex}`,
    evaluate: (p) => {
      const l = evalSide(p);
      const r = evalOther(p);
      const holds = op === "<" ? l < r : op === "<=" ? l <= r : op === ">" ? l > r : l >= r;
      return { lhs: l, rhs: r, holds };
    },
  };
}

/** Spec → Model: parse, whitelist, differentiate, generate code, typeset. Collects every issue. */
export function compileModel(spec: NormalizedSpec): Parsed<Model> {
  const stateNames = spec.states.map((s) => s.name);
  const parameterNames = spec.parameters.map((p) => p.name);
  const names = buildNameTable(stateNames, parameterNames);
  const issues: SpecIssue[] = [];
  const trees: MathNode[] = [];
  for (const state of stateNames) {
    const parsed = parseExpression(spec.equations[state], ["equations", state], names);
    if (parsed.ok) trees.push(parsed.node);
    else issues.push(parsed.issue);
  }
  const parsedConditions = parseConditions(spec, names, issues);
  if (issues.length) return { ok: false, issues };

  const describe: Describe = (node) => ({
    node,
    text: expressionToText(node, names.user),
    tex: expressionToTex(node, names.user),
  });
  const textOf = (node: MathNode) => expressionToText(node, names.user);
  const parameterValues = Float64Array.from(spec.parameters.map((p) => p.value));
  const bound: CodegenOptions = { parameterValues: Array.from(parameterValues) };
  const rhsSource = body(trees, bound);
  const rhs = instantiateRhs(rhsSource);
  issues.push(...findEquationFaults(trees, stateNames, spec.window, rhs, textOf));
  if (issues.length) return { ok: false, issues };
  const equations = trees.map(describe);
  const jacobianNodes = trees.map((tree) => stateNames.map((_, j) => differentiate(tree, `S${j}`)));
  issues.push(...findJacobianFaults(jacobianNodes, stateNames, textOf));
  if (issues.length) return { ok: false, issues };
  const jacobian = jacobianNodes.map((row) => row.map(describe));

  const source: GeneratedSource = {
    rhs: rhsSource,
    jacobian: body(jacobianNodes.flat(), bound),
    rhsParametric: body(trees, {}),
    jacobianParametric: body(jacobianNodes.flat(), {}),
  };

  return {
    ok: true,
    value: {
      spec,
      dimension: stateNames.length,
      stateNames,
      parameterNames,
      parameterValues,
      equations,
      jacobian,
      assumptionConditions: parsedConditions.assumptions.map((c) => compileCondition(describe, c)),
      claimConditions: parsedConditions.claims.map((c) => compileCondition(describe, c)),
      rhs,
      jacobianAt: instantiateRhs(source.jacobian),
      rhsParametric: instantiateParametric(source.rhsParametric),
      jacobianParametric: instantiateParametric(source.jacobianParametric),
      singularFactors: findSingularFactors(trees, describe),
      source,
    },
  };
}

export { nameToTex };

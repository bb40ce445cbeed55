import {
  isConstantNode,
  isFunctionNode,
  isOperatorNode,
  isParenthesisNode,
  isSymbolNode,
  type FunctionNode,
  type MathNode,
  type OperatorNode,
  type OperatorNodeFn,
  type OperatorNodeOp,
} from "mathjs";

/**
 * JavaScript source from a whitelisted (internal-symbol) tree. Only node kinds produced by the
 * checked parser or by differentiation reach here; anything else is a bug and throws.
 * States read from locals s0, s1; parameters are either literals (bound) or p[j] (parametric).
 */
const FUNCTIONS: Record<string, string> = {
  exp: "Math.exp",
  log: "Math.log",
  sqrt: "Math.sqrt",
  abs: "Math.abs",
  min: "Math.min",
  max: "Math.max",
  sin: "Math.sin",
  cos: "Math.cos",
  tan: "Math.tan",
  tanh: "Math.tanh",
  cosh: "Math.cosh",
  sinh: "Math.sinh",
  sign: "Math.sign",
  pow: "Math.pow",
};

export interface CodegenOptions {
  /** Parameter values to inline as literals; when absent, parameters read p[j]. */
  parameterValues?: readonly number[];
  /** Denominators (as emitted) whose reciprocal is held in a local: division becomes multiplication. */
  reciprocals?: ReadonlyMap<string, string>;
}

export function literal(v: number): string {
  // a non-finite constant can come only from folding in a derived closed form (0/0 in a root of
  // an invasion condition, say), which then evaluates to NaN and matches nothing; the model's own
  // equations and Jacobian are refused with one at compile time (compile.ts)
  if (Number.isNaN(v)) return "NaN";
  if (!Number.isFinite(v)) return v > 0 ? "Infinity" : "(-Infinity)";
  if (Object.is(v, -0)) return "(-0)";
  const s = String(v);
  return v < 0 ? `(${s})` : s;
}

/** Integer powers up to this order become multiplications: V8's Math.pow costs several multiplies. */
const MAX_UNROLLED_POWER = 4;

export function emitExpression(node: MathNode, options: CodegenOptions = {}): string {
  const emit = (m: MathNode): string => {
    if (isConstantNode(m)) return literal(m.value);
    if (isSymbolNode(m)) return emitSymbol(m.name, options);
    if (isParenthesisNode(m)) return emit(m.content);
    if (isOperatorNode(m)) return emitOperator(m, options, emit);
    if (isFunctionNode(m)) return emitFunction(m, emit);
    throw new Error(`unexpected node ${m.type}`);
  };
  return emit(node);
}

function emitSymbol(name: string, options: CodegenOptions): string {
  const match = /^([SP])(\d+)$/.exec(name);
  if (!match) throw new Error(`unexpected symbol ${name}`);
  const index = Number(match[2]);
  if (match[1] === "S") return `s${index}`;
  return options.parameterValues ? literal(options.parameterValues[index]) : `p[${index}]`;
}

function emitOperator(
  node: OperatorNode<OperatorNodeOp, OperatorNodeFn>,
  options: CodegenOptions,
  emit: (m: MathNode) => string,
): string {
  // before the arguments are emitted: emitPow emits them itself, and emitting them here as well
  // would double the work at every level of a power tower (u^u^…^u, 2^depth)
  if (node.fn === "pow") return emitPow(node.args[0], node.args[1], emit);
  const args = node.args.map(emit);
  switch (node.fn) {
    case "add":
      return `(${args.join(" + ")})`;
    case "subtract":
      return `(${args[0]} - ${args[1]})`;
    case "multiply":
      return `(${args.join(" * ")})`;
    case "divide": {
      // keys are the denominators as emitted without reciprocals
      const local = options.reciprocals?.get(
        options.reciprocals.size
          ? emitExpression(node.args[1], { parameterValues: options.parameterValues })
          : "",
      );
      return local ? `(${args[0]} * ${local})` : `(${args[0]} / ${args[1]})`;
    }
    case "unaryMinus":
      return `(-${args[0]})`;
    case "unaryPlus":
      return args[0];
  }
  throw new Error(`unexpected operator ${node.fn}`);
}

function emitFunction(node: FunctionNode, emit: (m: MathNode) => string): string {
  const name = node.fn.name;
  // as in emitOperator: emitPow emits the arguments itself, once
  if (name === "pow") return emitPow(node.args[0], node.args[1], emit);
  const args = node.args.map(emit);
  if (name === "sech") return `(1 / Math.cosh(${args[0]}))`;
  if (name === "sec") return `(1 / Math.cos(${args[0]}))`;
  if (name === "csc") return `(1 / Math.sin(${args[0]}))`;
  if (name === "ifle") return `(${args[0]} <= ${args[1]} ? ${args[2]} : ${args[3]})`;
  const fn = FUNCTIONS[name];
  if (!fn) throw new Error(`unexpected function ${name}`);
  return `${fn}(${args.join(", ")})`;
}

function constantValue(node: MathNode): number | null {
  if (isConstantNode(node)) return node.value;
  if (isParenthesisNode(node)) return constantValue(node.content);
  if (isOperatorNode(node) && node.fn === "unaryMinus") {
    const v = constantValue(node.args[0]);
    return v === null ? null : -v;
  }
  return null;
}

function emitPow(base: MathNode, exponent: MathNode, emit: (m: MathNode) => string): string {
  const k = constantValue(exponent);
  const b = emit(base);
  if (k !== null && Number.isInteger(k) && Math.abs(k) <= MAX_UNROLLED_POWER && k !== 0) {
    const product = Math.abs(k) === 1 ? b : `pw${Math.abs(k)}(${b})`;
    return k < 0 ? `(1 / ${product})` : product;
  }
  if (k === 0.5) return `Math.sqrt(${b})`;
  return `Math.pow(${b}, ${emit(exponent)})`;
}

/** Helpers the generated code may call; small enough for V8 to inline. */
export const PRELUDE = [
  "const pw2 = (v) => v * v;",
  "const pw3 = (v) => v * v * v;",
  "const pw4 = (v) => { const q = v * v; return q * q; };",
].join("\n");

/**
 * A function body writing out[k] = nodes[k]. A denominator that occurs in two or more divisions
 * is divided once into a local reciprocal (differentiated quotients repeat their denominators,
 * and a division costs several multiplications); this changes results by rounding only.
 */
export function emitBody(nodes: MathNode[], dimension: number, options: CodegenOptions): string {
  const plain: CodegenOptions = { parameterValues: options.parameterValues };
  const counts = new Map<string, number>();
  for (const node of nodes) {
    node.traverse((m) => {
      if (isOperatorNode(m) && m.fn === "divide") {
        const den = emitExpression(m.args[1], plain);
        // a literal denominator is folded by the engine already
        if (!/^\(?-?[\d.]+(e[+-]?\d+)?\)?$/.test(den)) counts.set(den, (counts.get(den) ?? 0) + 1);
      }
    });
  }
  const reciprocals = new Map<string, string>();
  const locals: string[] = [];
  for (const [den, n] of counts) {
    if (n < 2) continue;
    const name = `r${reciprocals.size}`;
    locals.push(`const ${name} = 1 / ${den};`);
    reciprocals.set(den, name);
  }
  const reads = `const ${Array.from({ length: dimension }, (_, k) => `s${k} = y[${k}]`).join(", ")};`;
  const writes = nodes.map((node, k) => `out[${k}] = ${emitExpression(node, { ...options, reciprocals })};`);
  return [reads, ...locals, ...writes].join("\n");
}

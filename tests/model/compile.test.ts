import { describe, expect, it } from "vitest";
import { compileModel } from "../../src/model/compile.js";
import { buildModel, buildSpec, jacobianAt, rhsAt, type ModelFixture } from "../fixtures/models.js";

/** Hand-evaluated values at small exact points; only a few roundings separate them. */
const EXACT_TOL = 1e-14;

const unit: Record<string, [number, number]> = { x: [-5, 5], y: [-5, 5] };

// Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4: the competition model and its
// Jacobian J = [[3 − 2x − 2y, −2x], [−y, 2 − x − 2y]], derived by hand.
const competition: ModelFixture = {
  equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
  window: { x: [0, 4], y: [0, 4] },
};
const handRhs = (x: number, y: number) => [x * (3 - x - 2 * y), y * (2 - x - y)];
const handJacobian = (x: number, y: number) => [
  [3 - 2 * x - 2 * y, -2 * x],
  [-y, 2 - x - 2 * y],
];

describe("compileModel", () => {
  it("compileModel(competition) describes the model in state and parameter order", () => {
    const model = buildModel({ ...competition, parameters: { unused: 1.5, other: -2 } });
    expect(model.dimension).toBe(2);
    expect(model.stateNames).toEqual(["x", "y"]);
    expect(model.parameterNames).toEqual(["unused", "other"]);
    expect(Array.from(model.parameterValues)).toEqual([1.5, -2]);
    expect(model.parameterValues).toBeInstanceOf(Float64Array);
    expect(model.equations).toHaveLength(2);
    expect(model.jacobian.map((row) => row.length)).toEqual([2, 2]);
  });

  it("compileModel(competition).rhs and .jacobianAt match the hand-derived forms", () => {
    const model = buildModel(competition);
    for (const [x, y] of [
      [0, 0],
      [1, 1],
      [3, 0],
      [0, 2],
      [0.25, 3.5],
      [2.5, 1.75],
    ]) {
      rhsAt(model, [x, y]).forEach((v, i) =>
        expect(Math.abs(v - handRhs(x, y)[i])).toBeLessThanOrEqual(EXACT_TOL),
      );
      jacobianAt(model, [x, y])
        .flat()
        .forEach((v, k) => expect(Math.abs(v - handJacobian(x, y).flat()[k])).toBeLessThanOrEqual(EXACT_TOL));
    }
  });

  it("compileModel keeps the user's names in text and TeX but not in generated code", () => {
    // DEVELOPERS.md: user names are replaced by internal symbols straight after parsing
    const model = buildModel({
      equations: { prey: "growth*prey*(1 - prey/capacity) - prey*hunter", hunter: "prey*hunter - hunter" },
      window: { prey: [0, 2], hunter: [0, 2] },
      parameters: { growth: 1, capacity: 2 },
    });
    expect(model.equations[0].text).toContain("prey");
    expect(model.equations[0].text).toContain("capacity");
    expect(model.jacobian[0][1].text).toContain("prey");
    for (const source of Object.values(model.source)) {
      for (const name of ["prey", "hunter", "growth", "capacity"]) expect(source).not.toContain(name);
    }
  });

  it("compileModel binds nominal parameter values into rhs and reads p in rhsParametric", () => {
    const fixture: ModelFixture = {
      equations: { x: "r*x - a*x*y", y: "-m*y + a*x*y" },
      window: unit,
      parameters: { r: 2, a: 0.5, m: 3 },
    };
    const model = buildModel(fixture);
    // x' = 2·1 − 0.5·1·2 = 1, y' = −3·2 + 0.5·1·2 = −5 at (1, 2)
    expect(rhsAt(model, [1, 2])).toEqual([1, -5]);
    const out = new Float64Array(2);
    model.rhsParametric([1, 2], [1, 0.25, 1], out);
    // x' = 1 − 0.25·2 = 0.5, y' = −2 + 0.25·2 = −1.5
    expect(Array.from(out)).toEqual([0.5, -1.5]);
    const other = buildModel({ ...fixture, parameters: { r: 1, a: 0.25, m: 1 } });
    expect(rhsAt(other, [1, 2])).toEqual([0.5, -1.5]);
  });

  it("compileModel reports an unaccepted function as an issue instead of throwing", () => {
    const spec = buildSpec({ equations: { x: "foo(x)", y: "-y" }, window: unit });
    const result = compileModel(spec);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.issues).toHaveLength(1);
    expect(result.issues[0]).toMatchObject({
      code: "function_not_allowed",
      path: ["equations", "x"],
      source: { column: 1, length: 3 },
    });
  });

  it("compileModel collects an issue from every faulty equation", () => {
    const spec = buildSpec({ equations: { x: "x + q", y: "2y" }, window: unit });
    const result = compileModel(spec);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.issues.map((i) => i.path)).toEqual([
      ["equations", "x"],
      ["equations", "y"],
    ]);
  });

  it("compileModel evaluates an assumption's condition at given parameter values", () => {
    const spec = buildSpec({
      equations: { x: "r1*x", y: "-y" },
      window: unit,
      parameters: { r1: 0.5, a12: 0.1, K2: 4 },
    });
    const model = compileModel({ ...spec, assumptions: [{ text: "coexistence", condition: "K2 < r1/a12" }] });
    if (!model.ok) throw new Error("did not compile");
    const [condition] = model.value.assumptionConditions;
    expect(condition.op).toBe("<");
    expect(condition.evaluate(model.value.parameterValues)).toEqual({ lhs: 4, rhs: 5, holds: true });
    expect(condition.evaluate([0.5, 0.2, 4])).toEqual({ lhs: 4, rhs: 2.5, holds: false });
  });
});

describe("compileModel derivative rules (standard derivative table, common practice)", () => {
  // one state carries the function under test; y' = −y keeps the model planar
  const derivativeAt = (expression: string, x: number) => {
    const model = buildModel({ equations: { x: expression, y: "-y" }, window: unit });
    return jacobianAt(model, [x, 0])[0][0];
  };
  /** Derivative of the argument that min or max selects (points chosen with no ties). */
  const selected = (pick: (...v: number[]) => number, values: number[], derivatives: number[]) =>
    derivatives[values.indexOf(pick(...values))];
  const cases: { f: string; df: (x: number) => number; at: number[] }[] = [
    { f: "exp(2*x)", df: (x) => 2 * Math.exp(2 * x), at: [-1, 0, 0.5] },
    { f: "log(x)", df: (x) => 1 / x, at: [0.5, 2, 4] },
    { f: "sqrt(x)", df: (x) => 0.5 / Math.sqrt(x), at: [0.25, 1, 4] },
    { f: "sin(x)", df: Math.cos, at: [-1, 0, 2] },
    { f: "cos(x)", df: (x) => -Math.sin(x), at: [-1, 0, 2] },
    { f: "tan(x)", df: (x) => 1 + Math.tan(x) ** 2, at: [-1, 0, 1] },
    { f: "tanh(x)", df: (x) => 1 - Math.tanh(x) ** 2, at: [-1, 0, 2] },
    { f: "x^3", df: (x) => 3 * x * x, at: [-2, 0, 1.5] },
    { f: "pow(x, 2.5)", df: (x) => 2.5 * x ** 1.5, at: [0.5, 1, 3] },
    { f: "2^x", df: (x) => Math.LN2 * 2 ** x, at: [-1, 0, 3] },
    { f: "x^x", df: (x) => x ** x * (Math.log(x) + 1), at: [0.5, 1, 2] },
    // keel's rules for the non-smooth functions: d|u| = sign(u) du, and 0 at the kink
    { f: "abs(x - 1)", df: (x) => Math.sign(x - 1), at: [0, 1, 2] },
    // min/max take the derivative of the selected argument; at a tie, the first argument's
    { f: "min(x, 1)", df: (x) => (x <= 1 ? 1 : 0), at: [0, 1, 2] },
    { f: "max(x, 1)", df: (x) => (x <= 1 ? 0 : 1), at: [0, 2] },
    {
      f: "min(3*x, 1, -x)",
      df: (x) => selected(Math.min, [3 * x, 1, -x], [3, 0, -1]),
      at: [-2, -0.25, 0.5, 2],
    },
    {
      f: "max(x^2, 2*x, 1)",
      df: (x) => selected(Math.max, [x * x, 2 * x, 1], [2 * x, 2, 0]),
      at: [-2, 0.25, 1, 3],
    },
  ];
  for (const c of cases) {
    it(`compileModel differentiates ${c.f}`, () => {
      for (const x of c.at) {
        const want = c.df(x);
        expect(Math.abs(derivativeAt(c.f, x) - want), `at x = ${x}`).toBeLessThanOrEqual(
          EXACT_TOL * Math.max(1, Math.abs(want)),
        );
      }
    });
  }

  it("compileModel differentiates pow with a variable exponent in both states", () => {
    // ∂(x^y)/∂x = y x^(y−1), ∂(x^y)/∂y = x^y log x
    const model = buildModel({ equations: { x: "x^y", y: "pow(y, x)" }, window: unit });
    const [x, y] = [1.5, 2.5];
    const J = jacobianAt(model, [x, y]);
    const want = [
      [y * x ** (y - 1), x ** y * Math.log(x)],
      [y ** x * Math.log(y), x * y ** (x - 1)],
    ];
    J.flat().forEach((v, k) =>
      expect(Math.abs(v - want.flat()[k])).toBeLessThanOrEqual(
        EXACT_TOL * Math.max(1, Math.abs(want.flat()[k])),
      ),
    );
  });

  it("compileModel respects operator precedence: -x^2, 2^3^x and x/y/2", () => {
    // mathematical convention (common practice): unary minus binds looser than ^, ^ is right-associative
    const model = buildModel({ equations: { x: "-x^2 + 2^3^x", y: "x/y/2" }, window: unit });
    const [x, y] = [0.5, 4];
    const f = rhsAt(model, [x, y]);
    expect(Math.abs(f[0] - (-(x ** 2) + 2 ** (3 ** x)))).toBeLessThanOrEqual(EXACT_TOL);
    expect(f[1]).toBe(x / y / 2);
  });
});

describe("compileModel: trade names i and E, and ** as a power", () => {
  const iE: Record<string, [number, number]> = { i: [-5, 5], E: [-5, 5] };
  it("compileModel accepts states named S and I, and i and E (no complex numbers are involved)", () => {
    // an SIR-type pair: S' = −b S I, I' = b S I − g I (Kermack–McKendrick form, common practice)
    const sir = buildModel({
      equations: { S: "-b*S*I", I: "b*S*I - g*I" },
      window: { S: [0, 1], I: [0, 1] },
      parameters: { b: 0.5, g: 0.1 },
    });
    const [S, I] = [0.75, 0.125];
    expect(rhsAt(sir, [S, I])).toEqual([-0.5 * S * I, 0.5 * S * I - 0.1 * I]);
    // a state literally named i, beside an exposed class E
    const model = buildModel({ equations: { i: "-i^2 + E*i", E: "0.5*E^2 - i^3" }, window: iE });
    const [x, y] = [0.75, -1.5];
    expect(rhsAt(model, [x, y])).toEqual([-(x * x) + y * x, 0.5 * y * y - x * x * x]);
    // J = [[−2i + E, i], [−3i², E]], derived by hand
    expect(jacobianAt(model, [x, y])).toEqual([
      [-2 * x + y, x],
      [-3 * x * x, y],
    ]);
    expect(model.equations[0].text).toBe("-i ^ 2 + E * i");
  });

  it("compileModel reads ** as ^: the same numbers and the same Jacobian", () => {
    const starred = buildModel({ equations: { i: "-i**2 + E*i", E: "0.5*E**2 - i**3" }, window: iE });
    const caret = buildModel({ equations: { i: "-i^2 + E*i", E: "0.5*E^2 - i^3" }, window: iE });
    for (const p of [
      [0.75, -1.5],
      [-2, 0.25],
      [3, 4],
    ]) {
      expect(rhsAt(starred, p)).toEqual(rhsAt(caret, p));
      expect(jacobianAt(starred, p)).toEqual(jacobianAt(caret, p));
    }
    expect(starred.equations.map((e) => e.text)).toEqual(caret.equations.map((e) => e.text));
  });

  it("compileModel gives ** the precedence of ^: -x**2 = -(x²), 2**3**x = 2^(3^x), x**-1 = 1/x", () => {
    // the power binds tighter than a unary minus on its left and groups from the right (Python
    // Language Reference, section 6.5 "The power operator"; from memory)
    const model = buildModel({ equations: { x: "-x**2 + 2**3**x", y: "x**-1 + y ** 2" }, window: unit });
    const [x, y] = [0.5, 4];
    const f = rhsAt(model, [x, y]);
    expect(Math.abs(f[0] - (-(x ** 2) + 2 ** (3 ** x)))).toBeLessThanOrEqual(EXACT_TOL);
    expect(Math.abs(f[1] - (1 / x + y * y))).toBeLessThanOrEqual(EXACT_TOL);
  });

  // columns counted by hand from the literal text, 1-based
  const carets: { text: string; code: string; column: number; length?: number }[] = [
    { text: "x ** * 2", code: "syntax", column: 6 }, // the lone * after the power
    { text: "x *** 2", code: "syntax", column: 5 }, // ** then *, so the third * has no left operand
    { text: "x**", code: "ends_early", column: 4 },
    { text: "x**y**", code: "ends_early", column: 7 },
    { text: "2 x**2", code: "implicit_multiplication", column: 3 },
  ];
  for (const c of carets) {
    it(`compileModel puts the caret of '${c.text}' at column ${c.column}`, () => {
      const result = compileModel(buildSpec({ equations: { x: c.text, y: "-y" }, window: unit }));
      expect(result.ok).toBe(false);
      if (result.ok) return;
      expect(result.issues).toHaveLength(1);
      expect(result.issues[0]).toMatchObject({
        code: c.code,
        path: ["equations", "x"],
        source: { column: c.column },
      });
    });
  }
});

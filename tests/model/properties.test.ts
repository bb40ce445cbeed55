import fc from "fast-check";
import { compile } from "mathjs";
import { describe, expect, it } from "vitest";
import type { Model } from "../../src/model/types.js";
import { buildModel, jacobianAt, rhsAt, type ModelFixture } from "../fixtures/models.js";

/**
 * keel's generated code against mathjs evaluating the equation text as written. Both are IEEE
 * double evaluations of one expression and differ only in how powers are formed (x·x·x against
 * Math.pow), a few ulps; 1e-12 relative to max(1, |f|) leaves a wide margin.
 */
const EVALUATE_REL_TOL = 1e-12;
/**
 * Central differences with step h = ε^(1/3)·max(1, |x|) ≈ 6e-6 err by about h²|f'''|/6 + ε|f|/h
 * (Nocedal and Wright, Numerical Optimization, 2nd ed., section 8.1; from memory): below 1e-8
 * for these functions on the chosen domains. 1e-6 relative to max(1, |∂f|, |f|) leaves margin.
 */
const FINITE_DIFFERENCE_REL_TOL = 1e-6;
const FD_STEP = Math.cbrt(Number.EPSILON);
const SEED = 8675309;
const RUNS = 200;

interface PropertyCase {
  name: string;
  fixture: ModelFixture;
  /** Boxes where every function is defined and smooth, with margin for the difference step. */
  domains: { x: [number, number]; y: [number, number] }[];
}

const wide: Record<string, [number, number]> = { x: [-10, 10], y: [-10, 10] };

const CASES: PropertyCase[] = [
  {
    name: "exp, log, sqrt, sin, cos, tan, tanh",
    fixture: {
      equations: {
        x: "a*exp(-x/2)*y - log(1 + x^2) + sqrt(y + 3) - tan(x/4)",
        y: "b*sin(x)*cos(y) + tanh(y - x) - c*x*y^2",
      },
      window: wide,
      parameters: { a: 1.3, b: -0.7, c: 0.25 },
    },
    // tan(x/4) is smooth for |x| < 2π; sqrt(y + 3) needs y > −3
    domains: [{ x: [-3, 3], y: [-2.5, 3] }],
  },
  {
    name: "pow and ^ with constant and state exponents",
    fixture: {
      equations: {
        x: "pow(x, 2.5) - k*x^3*y + y^-2 + 2^x",
        y: "x^y - pow(y, 0.5)*x^(1/3) - (x - y)^4 + -x^2",
      },
      window: wide,
      parameters: { k: 0.4 },
    },
    // positive bases throughout, so every real power is defined
    domains: [{ x: [0.5, 3], y: [0.5, 2] }],
  },
  {
    name: "abs, min and max, on every branch",
    fixture: {
      equations: {
        x: "abs(x - y) + min(x, 2*y, 1) - max(x^2, y)",
        y: "min(x, y)*max(x, -y) - abs(y) + q*x",
      },
      window: wide,
      parameters: { q: 0.5 },
    },
    // each box keeps a margin of at least 0.1 from every kink and selects a different branch mix
    domains: [
      { x: [1.5, 2], y: [0.1, 0.4] },
      { x: [-2, -1.5], y: [0.1, 0.4] },
      { x: [0.2, 0.5], y: [-2, -1] },
      { x: [0.2, 0.4], y: [0.5, 0.9] },
    ],
  },
  {
    name: "rational terms (competition with saturating response)",
    fixture: {
      equations: {
        x: "r*x*(1 - x/K) - c*x*y/(h + x)",
        y: "y*(eff*c*x/(h + x) - m) - +y/(1 + y)",
      },
      window: { x: [0, 100], y: [0, 100] },
      parameters: { r: 0.9, K: 50, c: 1.2, h: 8, eff: 0.4, m: 0.2 },
    },
    domains: [{ x: [0, 60], y: [0, 40] }],
  },
];

type Evaluator = (scope: Record<string, number>) => number;

/**
 * mathjs compiles the original text; its evaluator and function library are independent of keel's
 * code generator and of keel's derivative rules (which build on mathjs's `derivative`, so that is
 * not used as a reference here: the Jacobian is checked against differences of this evaluation).
 */
function mathjsEvaluators(model: Model) {
  const rhs: Evaluator[] = model.stateNames.map((s) => {
    const code = compile(model.spec.equations[s]);
    return (scope) => code.evaluate({ ...scope }) as number;
  });
  return { rhs };
}

function scopeOf(model: Model, point: number[]): Record<string, number> {
  const scope: Record<string, number> = {};
  model.parameterNames.forEach((n, i) => (scope[n] = model.parameterValues[i]));
  model.stateNames.forEach((n, i) => (scope[n] = point[i]));
  return scope;
}

const pointIn = (domains: PropertyCase["domains"]) =>
  fc.oneof(
    ...domains.map((d) =>
      fc.tuple(
        fc.double({ min: d.x[0], max: d.x[1], noNaN: true }),
        fc.double({ min: d.y[0], max: d.y[1], noNaN: true }),
      ),
    ),
  );

function expectClose(actual: number, expected: number, relTol: number, scale: number, what: string) {
  expect(Number.isFinite(actual), `${what} is finite`).toBe(true);
  expect(Math.abs(actual - expected), `${what}: ${actual} vs ${expected}`).toBeLessThanOrEqual(
    relTol * Math.max(1, scale),
  );
}

for (const c of CASES) {
  describe(`compiled model: ${c.name}`, () => {
    const model = buildModel(c.fixture);
    const reference = mathjsEvaluators(model);

    it("model.rhs equals mathjs evaluation of the equation text", () => {
      fc.assert(
        fc.property(pointIn(c.domains), ([x, y]) => {
          const f = rhsAt(model, [x, y]);
          const scope = scopeOf(model, [x, y]);
          reference.rhs.forEach((g, i) => {
            const want = g(scope);
            expectClose(f[i], want, EVALUATE_REL_TOL, Math.abs(want), `f${i}(${x}, ${y})`);
          });
        }),
        { seed: SEED, numRuns: RUNS },
      );
    });

    it("model.jacobianAt agrees with central finite differences of mathjs's evaluation of the text", () => {
      const evaluateAt = (point: number[]) => reference.rhs.map((g) => g(scopeOf(model, point)));
      fc.assert(
        fc.property(pointIn(c.domains), ([x, y]) => {
          const point = [x, y];
          const J = jacobianAt(model, point);
          const f = evaluateAt(point);
          for (let j = 0; j < 2; j++) {
            const h = FD_STEP * Math.max(1, Math.abs(point[j]));
            const plus = point.slice();
            const minus = point.slice();
            plus[j] += h;
            minus[j] -= h;
            const fp = evaluateAt(plus);
            const fm = evaluateAt(minus);
            for (let i = 0; i < 2; i++) {
              const fd = (fp[i] - fm[i]) / (plus[j] - minus[j]);
              const scale = Math.max(Math.abs(J[i][j]), Math.abs(f[i]));
              expectClose(J[i][j], fd, FINITE_DIFFERENCE_REL_TOL, scale, `∂f${i}/∂x${j} at (${x}, ${y})`);
            }
          }
        }),
        { seed: SEED + 2, numRuns: RUNS },
      );
    });

    it("model.rhsParametric and jacobianParametric at parameterValues equal rhs and jacobianAt exactly", () => {
      fc.assert(
        fc.property(pointIn(c.domains), ([x, y]) => {
          const f = new Float64Array(2);
          const J = new Float64Array(4);
          model.rhsParametric([x, y], model.parameterValues, f);
          model.jacobianParametric([x, y], model.parameterValues, J);
          expect(Array.from(f)).toEqual(rhsAt(model, [x, y]));
          expect([Array.from(J.subarray(0, 2)), Array.from(J.subarray(2, 4))]).toEqual(
            jacobianAt(model, [x, y]),
          );
        }),
        { seed: SEED + 3, numRuns: RUNS },
      );
    });
  });
}

describe("compiled model with other parameter values", () => {
  // common practice: the parametric form must be the bound form for any parameter vector
  const base = CASES[3].fixture;
  const model = buildModel(base);
  it("model.rhsParametric(y, p) equals rhs of the model compiled with values p", () => {
    const positive = fc.double({ min: 0.05, max: 5, noNaN: true });
    fc.assert(
      fc.property(
        fc.array(positive, { minLength: 6, maxLength: 6 }),
        pointIn(CASES[3].domains),
        (values, point) => {
          const parameters = Object.fromEntries(model.parameterNames.map((n, i) => [n, values[i]]));
          const bound = buildModel({ ...base, parameters });
          const f = new Float64Array(2);
          model.rhsParametric(point, values, f);
          expect(Array.from(f)).toEqual(rhsAt(bound, point));
        },
      ),
      { seed: SEED + 4, numRuns: 12 },
    );
  });
});

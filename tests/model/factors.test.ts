import { describe, expect, it } from "vitest";
import { buildModel } from "../fixtures/models.js";

const unit: Record<string, [number, number]> = { x: [-5, 5], y: [-5, 5] };

/** The factors as (role, expression, numerator, exponent), read off each formula by hand. */
const factorsOf = (x: string, y = "-y") =>
  buildModel({ equations: { x, y }, window: unit }).singularFactors.map((f) => [
    f.role,
    f.expression.text,
    f.numerator?.text ?? null,
    f.exponent,
  ]);

describe("compileModel(...).singularFactors", () => {
  it("splits a denominator into the factors whose zeros are its zeros: x/(x y)² has x and y", () => {
    expect(factorsOf("x/(x*y)^2")).toEqual([
      ["denominator", "x", "x", null],
      ["denominator", "y", "x", null],
    ]);
  });

  it("reads negative integer powers as denominators and fractional ones as power bases; x³ is smooth", () => {
    expect(factorsOf("y^-1 + x^0.5 + pow(y, -1.5) + x^3")).toEqual([
      ["denominator", "y", "1", null],
      ["power-base", "x", null, 0.5],
      ["power-base", "y", null, -1.5],
    ]);
  });

  it("reads log and sqrt arguments, abs and min/max ties as kinks, and tan's cos as a denominator", () => {
    expect(factorsOf("log(x + 1) + sqrt(y)", "abs(x - 1) + min(x, y) + tan(y)")).toEqual([
      ["log-argument", "x + 1", null, null],
      ["root-argument", "y", null, null],
      ["kink", "x - 1", null, null],
      ["kink", "x - y", null, null],
      ["denominator", "cos(y)", "sin(y)", null],
    ]);
  });

  it("ignores denominators of parameters only, and lists one factor per expression with its equations", () => {
    const model = buildModel({
      equations: { x: "x/K - x*y/(x + y)", y: "y*x/(x + y)" },
      window: unit,
      parameters: { K: 2 },
    });
    expect(model.singularFactors.map((f) => [f.expression.text, f.numerator?.text, f.equations])).toEqual([
      ["x + y", "x * y", [0]],
      ["x + y", "y * x", [1]],
    ]);
  });

  it("evaluates g, its gradient and the numerator: x + y gives [x + y, 1, 1, x y]", () => {
    const model = buildModel({ equations: { x: "x*y/(x + y)", y: "-y" }, window: unit });
    const out = new Float64Array(4);
    model.singularFactors[0].evaluate([0.5, 2], model.parameterValues, out);
    expect(Array.from(out)).toEqual([2.5, 1, 1, 1]);
  });
});

import type { Model } from "../model/types.js";
import type { AssumptionResult } from "./types.js";

/** Each assumption, with its machine-checkable condition evaluated at the nominal values. */
export function evaluateAssumptions(model: Model): AssumptionResult[] {
  return model.spec.assumptions.map((a, index) => {
    const condition = model.conditions.find((c) => c.assumption === index);
    if (!condition) return { index, text: a.text, condition: null, tex: null, lhs: null, rhs: null, holds: null };
    const { lhs, rhs, holds } = condition.evaluate(model.parameterValues);
    const finite = Number.isFinite(lhs) && Number.isFinite(rhs);
    return {
      index,
      text: a.text,
      condition: condition.text,
      tex: condition.tex,
      lhs: Number.isFinite(lhs) ? lhs : null,
      rhs: Number.isFinite(rhs) ? rhs : null,
      holds: finite ? holds : null,
    };
  });
}

import type { Model } from "../../model/types.js";
import type { AssumptionResult } from "../types.js";
import { bisect } from "../numeric/roots.js";
import {
  ASSUMPTION_MATCH_TOL,
  FLIP_BISECTION_MAX_ITERATIONS,
  FLIP_SAMPLES,
  ZERO_VALUE_TOL,
} from "../constants.js";

/** Each assumption, with its machine-checkable condition evaluated at the nominal values. */
export function evaluateAssumptions(model: Model): AssumptionResult[] {
  return model.spec.assumptions.map((a, index) => {
    const condition = model.assumptionConditions.find((c) => c.assumption === index);
    if (!condition)
      return {
        index,
        text: a.text,
        condition: null,
        tex: null,
        lhs: null,
        rhs: null,
        holds: null,
        flips: [],
      };
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
      flips: [],
    };
  });
}

export interface AssumptionFlip {
  parameter: string;
  /** Where the condition changes truth, the other parameters at their nominal values. */
  value: number;
  nearestThreshold: { value: number; kind: string; decisive: boolean } | null;
  /** |threshold − flip| / |flip|, or, for a flip at zero (within ZERO_VALUE_TOL of the range), over the range's width. */
  relativeDifference: number | null;
  /** The condition flips where a located threshold lies (to ASSUMPTION_MATCH_TOL). */
  coincides: boolean;
}

/** Where each machine-checkable assumption flips across each studied range, beside the located thresholds. */
export function findAssumptionFlips(
  model: Model,
  studies: {
    parameter: string;
    range: [number, number];
    thresholds: { value: number; kind: string; decisive: boolean }[];
  }[],
): AssumptionFlip[][] {
  return model.spec.assumptions.map((_, index) => {
    const condition = model.assumptionConditions.find((c) => c.assumption === index);
    if (!condition) return [];
    const flips: AssumptionFlip[] = [];
    for (const study of studies) {
      const j = model.parameterNames.indexOf(study.parameter);
      const p = Float64Array.from(model.parameterValues);
      const g = (v: number) => {
        p[j] = v;
        const r = condition.evaluate(p);
        return r.lhs - r.rhs;
      };
      const [lo, hi] = study.range;
      const zero = ZERO_VALUE_TOL * (hi - lo);
      let prevV = lo,
        prevG = g(lo);
      for (let k = 1; k <= FLIP_SAMPLES; k++) {
        const v = lo + ((hi - lo) * k) / FLIP_SAMPLES;
        const gv = g(v);
        if (Number.isFinite(prevG) && Number.isFinite(gv) && prevG * gv < 0) {
          let ga = prevG;
          const bracket = bisect(
            prevV,
            v,
            (m) => {
              const gm = g(m);
              if (!(gm * ga > 0)) return "lower";
              ga = gm;
              return "upper";
            },
            FLIP_BISECTION_MAX_ITERATIONS,
          );
          const value = 0.5 * (bracket.lo + bracket.hi);
          const nearest =
            [...study.thresholds].sort((x, y) => Math.abs(x.value - value) - Math.abs(y.value - value))[0] ??
            null;
          const relativeDifference = nearest
            ? Math.abs(nearest.value - value) / (Math.abs(value) > zero ? Math.abs(value) : hi - lo)
            : null;
          flips.push({
            parameter: study.parameter,
            value,
            nearestThreshold: nearest
              ? { value: nearest.value, kind: nearest.kind, decisive: nearest.decisive }
              : null,
            relativeDifference,
            coincides: relativeDifference !== null && relativeDifference <= ASSUMPTION_MATCH_TOL,
          });
        }
        // a sample exactly on the flip (g = 0) is stepped over: the sign change is seen from the next sample
        if (gv !== 0) {
          prevV = v;
          prevG = gv;
        }
      }
    }
    return flips;
  });
}

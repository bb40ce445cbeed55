/**
 * Bracketing root finder: bisection of [lo, hi], the caller's `side` deciding at each midpoint
 * which half keeps the sign change. Every call site keeps its own verdict rule (sign of a value,
 * a predicate turning true, a projection that may fail), so the iterates are exactly those of
 * plain bisection: midpoint 0.5 (lo + hi), at most maxSteps halvings, and a stop as soon as the
 * midpoint equals an end (the bracket is two adjacent doubles).
 */

/** "lower": the change lies in [lo, m]; "upper": in [m, hi]; "root": m is it; "stop": keep [lo, hi] as it is. */
export type BisectionSide = "lower" | "upper" | "root" | "stop";

export interface Bracket {
  lo: number;
  hi: number;
}

export function bisect(
  lo: number,
  hi: number,
  side: (m: number) => BisectionSide,
  maxSteps: number,
): Bracket {
  let a = lo,
    b = hi;
  for (let step = 0; step < maxSteps; step++) {
    const m = 0.5 * (a + b);
    if (m === a || m === b) break;
    const verdict = side(m);
    if (verdict === "root") return { lo: m, hi: m };
    if (verdict === "stop") break;
    if (verdict === "lower") b = m;
    else a = m;
  }
  return { lo: a, hi: b };
}

/** Bisection for the first point of [lo, hi] where `pred` holds (false at lo, true at hi): the bracket's upper end is on the true side. */
export function bisectPredicate(
  lo: number,
  hi: number,
  pred: (m: number) => boolean,
  maxSteps: number,
): Bracket {
  return bisect(lo, hi, (m) => (pred(m) ? "lower" : "upper"), maxSteps);
}

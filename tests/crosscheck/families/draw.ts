/** What a model family draws from, what it returns, and the helpers every family uses. */

export interface Draw {
  /** Uniform in [0, 1). */
  u: () => number;
  range: (lo: number, hi: number) => number;
  /** Log-uniform in [lo, hi]. */
  log: (lo: number, hi: number) => number;
  /** Integer in [lo, hi]. */
  int: (lo: number, hi: number) => number;
  pick: <T>(list: readonly T[]) => T;
}

export interface ParameterDraft {
  name: string;
  value: number;
  range: [number, number];
}

export interface FamilyModel {
  title: string;
  variant: string;
  states: { name: string; min: number; max: number }[];
  parameters: ParameterDraft[];
  equations: Record<string, string>;
  window: Record<string, [number, number]>;
  scenarios: { initial: Record<string, number>; horizon: number }[];
  /** The parameters whose breaks are searched (analysis.parameters): one or two, to keep each model cheap. */
  studied: string[];
}

/** A family: a seeded draw (and the model's index within the family) to one model. */
export type Family = (d: Draw, k: number) => FamilyModel;

/** Four significant digits: readable specs, and the value the model really has. */
export const sig = (v: number, digits = 4): number => (v === 0 ? 0 : Number(v.toPrecision(digits)));

/** A parameter at `value` with range [value·(1 − below), value·(1 + above)] (for a positive value), rounded. */
export function param(name: string, value: number, below = 0.25, above = below): ParameterDraft {
  const v = sig(value);
  const a = sig(v - Math.abs(v) * below),
    b = sig(v + Math.abs(v) * above);
  return { name, value: v, range: [Math.min(a, v), Math.max(b, v)] };
}

/** A parameter with an explicit range (kept as given: zero, or an exact bound, must stay exact). */
export function exact(name: string, value: number, range: [number, number]): ParameterDraft {
  return { name, value, range };
}

/** One to three scenario starts, each drawn by `start`. */
export function scenarios(
  d: Draw,
  horizon: number,
  start: () => Record<string, number>,
): FamilyModel["scenarios"] {
  const n = d.int(1, 3);
  return Array.from({ length: n }, () => {
    const s = start();
    return {
      initial: Object.fromEntries(Object.entries(s).map(([k, v]) => [k, sig(v)])),
      horizon: sig(horizon, 3),
    };
  });
}

/** The studied parameters: the first always, a second one from `more` for about a quarter of the models. */
export function studied(d: Draw, first: string, more: string[]): string[] {
  return more.length && d.u() < 1 / 4 ? [first, d.pick(more)] : [first];
}

/** max of g over [lo, hi], sampled (windows are fitted to nullcline heights with it). */
export function maxOver(g: (x: number) => number, lo: number, hi: number, samples = 400): number {
  let best = -Infinity;
  for (let i = 0; i <= samples; i++) best = Math.max(best, g(lo + ((hi - lo) * i) / samples));
  return best;
}

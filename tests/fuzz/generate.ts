/**
 * The fuzz corpus: every category's cases, in a fixed order, from one seed. The same seed gives
 * the same cases, byte for byte (fast-check's sampler with a fixed seed), so a failure found once
 * is found again by name.
 */
import type { FuzzCase } from "./base.js";
import { codePointName, replaceIn, UNPRINTABLE_IN_NAME } from "./chars.js";
import { encodingCases } from "./categories/encoding.js";
import { hostileEquationCases } from "./categories/equations.js";
import { mutatedKeyCases } from "./categories/keys.js";
import { hostileLabelCases } from "./categories/labels.js";
import { nameCases } from "./categories/names.js";
import { pathCases } from "./categories/paths.js";
import { sizeCasesAll } from "./categories/sizes.js";
import { jsonStructureCases } from "./categories/structure.js";
import { mutatedValueCases } from "./categories/values.js";

export const DEFAULT_SEED = 20261205;

export const CATEGORIES = [
  "json-structure",
  "encoding",
  "sizes",
  "mutated-keys",
  "mutated-values",
  "hostile-equations",
  "names",
  "hostile-labels",
  "paths",
] as const;

/** A case name with controls, bidirectional and zero-width characters written out, so reports print safely. */
const visibleName = (name: string): string =>
  replaceIn(name, UNPRINTABLE_IN_NAME, (ch) => `<${codePointName(ch)}>`);

/** Every case, numbered within its category so names are unique ("names/012 …"). */
export function generateCases(seed = DEFAULT_SEED): FuzzCase[] {
  const all = [
    ...jsonStructureCases(seed),
    ...encodingCases(seed + 10),
    ...sizeCasesAll(),
    ...mutatedKeyCases(seed + 20),
    ...mutatedValueCases(seed + 30),
    ...hostileEquationCases(seed + 40),
    ...nameCases(),
    ...hostileLabelCases(),
    ...pathCases(),
  ];
  const counts = new Map<string, number>();
  return all.map((c) => {
    const k = counts.get(c.category) ?? 0;
    counts.set(c.category, k + 1);
    return { ...c, name: `${c.category}/${String(k).padStart(3, "0")} ${visibleName(c.name)}` };
  });
}

/**
 * A seeded slice for `npm test`: `perCategory` cases from each category, spread evenly through it
 * (the same ones every run), leaving out the cases that take longest (builds to PDF, the browser).
 */
export function sliceCases(cases: FuzzCase[], perCategory: number): FuzzCase[] {
  return CATEGORIES.flatMap((category) => {
    const pool = cases.filter((c) => c.category === category && !c.browser && !c.args?.includes("--pdf"));
    const step = pool.length / Math.min(perCategory, pool.length);
    return Array.from({ length: Math.min(perCategory, pool.length) }, (_, k) => pool[Math.floor(k * step)]);
  });
}

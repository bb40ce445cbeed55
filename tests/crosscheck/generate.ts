/**
 * The crosscheck corpus: seeded, generated keel specs of planar models across families
 * (tests/crosscheck/families/), each with every parameter ranged, a window fitted to the model and
 * one to three scenarios. Model `xc-<family>-<k>` draws from its own generator, seeded from the
 * corpus seed, the family and k, so `--only FAMILY` or `--count N` give the same models the full
 * corpus holds. Every value is invented.
 */
import { seededUniform } from "../fixtures/random.js";
import { POPULATION_FAMILIES } from "./families/populations.js";
import { FORM_FAMILIES } from "./families/forms.js";
import type { Draw, Family, FamilyModel } from "./families/draw.js";

export const DEFAULT_SEED = 20240617;
/** 20 models for each of the 12 families. */
export const DEFAULT_COUNT = 240;

export const FAMILIES: Record<string, Family> = { ...POPULATION_FAMILIES, ...FORM_FAMILIES };
export const FAMILY_NAMES = Object.keys(FAMILIES);

/** Basin maps are not compared: the smallest grid keel accepts keeps each model cheap. */
const CHEAP_BASINS = { resolution: 16, coarse: 8 };

/** FNV-1a (common practice), so each model's seed depends on the corpus seed, its family and its index. */
function hash32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h;
}

export function makeDraw(seed: number): Draw {
  const u = seededUniform(seed);
  const draw: Draw = {
    u,
    range: (lo, hi) => lo + (hi - lo) * u(),
    log: (lo, hi) => Math.exp(Math.log(lo) + (Math.log(hi) - Math.log(lo)) * u()),
    int: (lo, hi) => lo + Math.floor((hi - lo + 1) * u()),
    pick: (list) => list[Math.floor(list.length * u())],
  };
  return draw;
}

export interface GeneratedSpec {
  id: string;
  family: string;
  /** The model's own variant within the family (e.g. "brusselator"). */
  variant: string;
  spec: Record<string, unknown>;
}

function buildSpec(family: string, k: number, m: FamilyModel): GeneratedSpec {
  const id = `xc-${family}-${k}`;
  const spec = {
    keel: 1,
    id,
    title: `Crosscheck model ${id}: ${m.title} (generated, invented values)`,
    purpose:
      "Generated for keel's differential crosscheck against an independent reference; every value is invented.",
    time: { unit: "time" },
    states: m.states,
    parameters: m.parameters.map((p) => ({ ...p, source: "generated (invented)" })),
    equations: m.equations,
    window: m.window,
    scenarios: m.scenarios.map((s, i) => ({ name: `s${i + 1}`, initial: s.initial, horizon: s.horizon })),
    analysis: { basins: CHEAP_BASINS, parameters: m.studied },
  };
  return { id, family, variant: m.variant, spec };
}

export interface CorpusOptions {
  seed?: number;
  count?: number;
  only?: string;
}

/** The corpus: models dealt round the families in turn (model n is family n mod F, index ⌊n / F⌋). */
export function generateCorpus(options: CorpusOptions = {}): GeneratedSpec[] {
  const seed = options.seed ?? DEFAULT_SEED;
  const count = options.count ?? DEFAULT_COUNT;
  const names = options.only ? [options.only] : FAMILY_NAMES;
  for (const n of names) if (!FAMILIES[n]) throw new Error(`unknown family ${n}: ${FAMILY_NAMES.join(", ")}`);
  const out: GeneratedSpec[] = [];
  for (let n = 0; n < count; n++) {
    const family = names[n % names.length];
    const k = Math.floor(n / names.length) + 1;
    const draw = makeDraw(hash32(`${seed}:${family}:${k}`));
    out.push(buildSpec(family, k, FAMILIES[family](draw, k)));
  }
  return out;
}

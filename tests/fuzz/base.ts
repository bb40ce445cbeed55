/**
 * The fuzz suite's valid starting point and case shape. The base model is invented for the suite:
 * two stocks competing for one resource, small basin grids and a short horizon, so a valid case
 * runs `analyze` or `build --no-pdf` in a few seconds. Every case breaks or stretches it.
 */

/** One fuzz case: files written into a fresh working folder, then `keel ...args` run there. */
export interface FuzzCase {
  category: string;
  /** Unique within the corpus: category, index and a short description. */
  name: string;
  /** Relative path → content; a path ending in "/" makes an empty folder. */
  files: Record<string, string | Uint8Array>;
  /** Default: ["check", "spec.json"]. */
  args?: string[];
  /** An exit code the case must give when it is certain (a file that is no JSON exits 2). */
  expect?: 0 | 2;
  /** The built HTML is opened in Chromium, watching for requests, dialogs and scripts. */
  browser?: boolean;
}

/** The names the base model uses, so a case can rename any of them consistently. */
export interface BaseNames {
  u: string;
  v: string;
  r: string;
  a: string;
  b: string;
}

export const BASE_NAMES: BaseNames = { u: "u", v: "v", r: "r", a: "a", b: "b" };

export type Json = null | boolean | number | string | Json[] | { [key: string]: Json };
export type JsonObject = { [key: string]: Json };

/** The base equations, written with the given names. */
export function baseEquations(n: BaseNames): { u: string; v: string } {
  return {
    u: `${n.r}*${n.u}*(1 - ${n.u} - ${n.a}*${n.v})`,
    v: `${n.v}*(1 - ${n.v} - ${n.b}*${n.u})`,
  };
}

/** A fresh copy of the valid base spec (invented values), with its names as given. */
export function baseSpec(n: BaseNames = BASE_NAMES): JsonObject {
  const eq = baseEquations(n);
  return {
    keel: 1,
    id: "fuzz-base",
    title: "Two invented stocks competing (the fuzz suite's base model)",
    authors: ["keel fuzz suite"],
    organisation: "none (invented)",
    purpose: "A valid model every fuzz case breaks or stretches; all values are invented.",
    time: { unit: "day" },
    states: [
      { name: n.u, label: "stock u (invented)", unit: "1", min: 0, max: 2 },
      { name: n.v, label: "stock v (invented)", unit: "1", min: 0, max: 2 },
    ],
    parameters: [
      { name: n.r, value: 1, unit: "1/day", label: "growth of u", source: "invented", range: [0.5, 1.5] },
      { name: n.a, value: 0.5, unit: "1", label: "effect of v on u", source: "invented" },
      { name: n.b, value: 0.5, unit: "1", label: "effect of u on v", source: "invented" },
    ],
    equations: { [n.u]: eq.u, [n.v]: eq.v },
    window: { [n.u]: [0, 1.5], [n.v]: [0, 1.5] },
    scenarios: [{ name: "start", label: "a low start", initial: { [n.u]: 0.2, [n.v]: 0.3 }, horizon: 20 }],
    assumptions: [{ text: "Competition is weak on both sides.", condition: `${n.a} < 1` }],
    claims: [{ id: "c1", kind: "equilibrium-count", text: "four equilibria", count: 4 }],
    cautions: ["Invented values: this model describes nothing real."],
    analysis: { basins: { resolution: 16, coarse: 8 }, parameters: [] },
  };
}

export const SPEC = "spec.json";
export const OUT = "dossier";

/** The usual commands a case runs, each on spec.json, writing into OUT where it writes. */
export const COMMANDS = {
  check: ["check", SPEC],
  analyze: ["analyze", SPEC, "--out", OUT],
  build: ["build", SPEC, "--no-pdf", "--out", OUT],
  buildPdf: ["build", SPEC, "--pdf", "--out", OUT],
} as const;

export type CommandName = keyof typeof COMMANDS;

export const specText = (spec: Json): string => JSON.stringify(spec, null, 2);

/** A case holding one spec file. */
export function specCase(
  category: string,
  name: string,
  text: string | Uint8Array,
  command: CommandName = "check",
  extra: Partial<FuzzCase> = {},
): FuzzCase {
  return { category, name, files: { [SPEC]: text }, args: [...COMMANDS[command]], ...extra };
}

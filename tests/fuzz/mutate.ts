/**
 * Edits of a spec object for the generators: paths into it, setting and removing a value (as an
 * own property, so "__proto__" and "constructor" become keys rather than prototype changes),
 * numbers JSON.stringify cannot write, and the seeded draws every category takes its choices from.
 */
import fc from "fast-check";
import type { Json, JsonObject } from "./base.js";

export type JsonPath = (string | number)[];

/** `n` values of `arb`, the same on every run for the same seed (fast-check's own PRNG). */
export function draw<T>(arb: fc.Arbitrary<T>, seed: number, n: number): T[] {
  return fc.sample(arb, { seed, numRuns: n });
}

const isObject = (x: Json | undefined): x is JsonObject =>
  typeof x === "object" && x !== null && !Array.isArray(x);

/** Every path to a value below `root`, containers included, depth first in key order. */
export function allPaths(root: Json, prefix: JsonPath = []): JsonPath[] {
  const children: [string | number, Json][] = Array.isArray(root)
    ? root.map((v, i) => [i, v])
    : isObject(root)
      ? Object.entries(root)
      : [];
  return children.flatMap(([k, v]) => [[...prefix, k], ...allPaths(v, [...prefix, k])]);
}

/** Paths whose value is a number, a string or a boolean. */
export function leafPaths(root: Json): JsonPath[] {
  return allPaths(root).filter((p) => {
    const v = getAt(root, p);
    return v !== null && typeof v !== "object";
  });
}

/** Paths of object keys (the last step is a key of an object). */
export function keyPaths(root: Json): JsonPath[] {
  return allPaths(root).filter((p) => typeof p[p.length - 1] === "string");
}

export function getAt(root: Json, path: JsonPath): Json | undefined {
  let at: Json | undefined = root;
  for (const step of path) {
    if (at === null || typeof at !== "object") return undefined;
    at = (at as Record<string | number, Json>)[step];
  }
  return at;
}

/** Sets an own, enumerable property (never the prototype), creating nothing on the way. */
export function setAt(root: Json, path: JsonPath, value: Json): void {
  const parent = getAt(root, path.slice(0, -1)) as Record<string | number, Json>;
  Object.defineProperty(parent, path[path.length - 1], {
    value,
    enumerable: true,
    writable: true,
    configurable: true,
  });
}

export function deleteAt(root: Json, path: JsonPath): void {
  const parent = getAt(root, path.slice(0, -1));
  const last = path[path.length - 1];
  if (Array.isArray(parent) && typeof last === "number") parent.splice(last, 1);
  else if (isObject(parent)) delete parent[last as string];
}

/** Renames a key in place, keeping the key order of its object. */
export function renameAt(root: Json, path: JsonPath, to: string): void {
  const parent = getAt(root, path.slice(0, -1));
  if (!isObject(parent)) return;
  const entries = Object.entries(parent);
  for (const k of Object.keys(parent)) delete parent[k];
  for (const [k, v] of entries) setAt(parent, [k === path[path.length - 1] ? to : k], v);
}

/**
 * A number as raw JSON text (9007199254740993, 1e999, -0): set a placeholder string, stringify,
 * then swap the quoted placeholder for the text.
 */
export class RawNumbers {
  private readonly raws = new Map<string, string>();

  placeholder(text: string): string {
    const key = `@@raw-${this.raws.size}@@`;
    this.raws.set(key, text);
    return key;
  }

  stringify(spec: Json): string {
    let text = JSON.stringify(spec, null, 2);
    for (const [key, raw] of this.raws) text = text.split(JSON.stringify(key)).join(raw);
    return text;
  }
}

export const pathText = (p: JsonPath): string =>
  p.map((s) => (typeof s === "number" ? `[${s}]` : `.${s}`)).join("");

/**
 * mutated-keys: one key of the base spec deleted, misspelt, re-cased, swapped for a prototype
 * name, or joined by an unknown sibling, at a seeded position.
 */
import fc from "fast-check";
import { baseSpec, specCase, specText, type CommandName, type FuzzCase } from "../base.js";
import { deleteAt, draw, keyPaths, pathText, renameAt, setAt } from "../mutate.js";

const C = "mutated-keys";

const PROTOTYPE_KEYS = [
  "__proto__",
  "constructor",
  "prototype",
  "toString",
  "hasOwnProperty",
  "valueOf",
  "__defineGetter__",
];

type KeyEdit = (key: string) => string | null;

/** Each edit gives the new key name, or null to delete the key. */
const EDITS: Record<string, KeyEdit> = {
  delete: () => null,
  upper: (k) => k.toUpperCase(),
  "first letter upper": (k) => k.charAt(0).toUpperCase() + k.slice(1),
  "letters swapped": (k) => (k.length < 2 ? `${k}${k}` : k[1] + k[0] + k.slice(2)),
  "letter dropped": (k) => k.slice(1),
  "trailing space": (k) => `${k} `,
  "leading space": (k) => ` ${k}`,
  "zero-width joiner": (k) => `${k}\u200d`,
  "Cyrillic a": (k) => k.replace(/a/g, "\u0430"),
  fullwidth: (k) => [...k].map((ch) => String.fromCodePoint(ch.codePointAt(0)! + 0xfee0)).join(""),
  empty: () => "",
  "1k characters": (k) => k.repeat(Math.ceil(1000 / k.length)),
};

export function mutatedKeyCases(seed: number): FuzzCase[] {
  const paths = keyPaths(baseSpec());
  const editNames = Object.keys(EDITS);
  const pick = fc.tuple(
    fc.integer({ min: 0, max: paths.length - 1 }),
    fc.constantFrom(...editNames, "prototype key", "unknown sibling"),
    fc.constantFrom(...PROTOTYPE_KEYS),
    fc.constantFrom<CommandName>("check", "check", "check", "analyze"),
  );
  return draw(pick, seed, 80).map(([p, edit, protoKey, command], k) => {
    const spec = baseSpec();
    const path = paths[p];
    const key = path[path.length - 1] as string;
    let what: string;
    if (edit === "unknown sibling") {
      setAt(spec, [...path.slice(0, -1), protoKey], { injected: true });
      what = `sibling ${protoKey}`;
    } else if (edit === "prototype key") {
      renameAt(spec, path, protoKey);
      what = `renamed to ${protoKey}`;
    } else {
      const to = EDITS[edit](key);
      if (to === null) deleteAt(spec, path);
      else renameAt(spec, path, to);
      what = edit;
    }
    return specCase(C, `${k} ${pathText(path)} ${what} (${command})`, specText(spec), command);
  });
}

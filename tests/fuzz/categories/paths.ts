/**
 * paths: output and spec paths keel must refuse before it writes (README "Output folders"):
 * an empty --out, a file where the folder goes, a folder that is not keel's, a spec that is
 * missing or a folder, and names that are odd but legal.
 */
import { baseSpec, specText, type FuzzCase } from "../base.js";

const C = "paths";

interface PathCase {
  name: string;
  args: string[];
  /** Files beside the spec; a path ending in "/" makes an empty folder. */
  extra?: Record<string, string>;
  expect?: 0 | 2;
  /** Where the spec is written (default spec.json). */
  spec?: string;
}

const PATH_CASES: PathCase[] = [
  { name: 'analyze --out ""', args: ["analyze", "spec.json", "--out", ""], expect: 2 },
  { name: 'build --out ""', args: ["build", "spec.json", "--no-pdf", "--out", ""], expect: 2 },
  {
    name: "analyze --out to a file",
    args: ["analyze", "spec.json", "--out", "taken.txt"],
    extra: { "taken.txt": "mine" },
    expect: 2,
  },
  {
    name: "build --out to a file",
    args: ["build", "spec.json", "--no-pdf", "--out", "taken.txt"],
    extra: { "taken.txt": "mine" },
    expect: 2,
  },
  {
    name: "build --out to the spec itself",
    args: ["build", "spec.json", "--no-pdf", "--out", "spec.json"],
    expect: 2,
  },
  {
    name: "build --out under a file",
    args: ["build", "spec.json", "--no-pdf", "--out", "taken.txt/sub"],
    extra: { "taken.txt": "mine" },
    expect: 2,
  },
  {
    name: "build --out to a folder of the user's",
    args: ["build", "spec.json", "--no-pdf", "--out", "mine"],
    extra: { "mine/notes.txt": "keep" },
    expect: 2,
  },
  {
    name: "build --out to the current folder",
    args: ["build", "spec.json", "--no-pdf", "--out", "."],
    expect: 2,
  },
  {
    name: "build --out with a 300-character name",
    args: ["build", "spec.json", "--no-pdf", "--out", "o".repeat(300)],
    expect: 2,
  },
  {
    name: "build --out to an empty folder",
    args: ["build", "spec.json", "--no-pdf", "--out", "empty"],
    extra: { "empty/": "" },
    expect: 0,
  },
  {
    name: "build --out deep and new",
    args: ["build", "spec.json", "--no-pdf", "--out", "a/b/c/d"],
    expect: 0,
  },
  {
    name: "build --out with spaces and accents",
    args: ["build", "spec.json", "--no-pdf", "--out", "dossier é ü"],
    expect: 0,
  },
  {
    name: "build --out with a trailing slash",
    args: ["build", "spec.json", "--no-pdf", "--out", "dossier/"],
    expect: 0,
  },
  { name: "analyze to the default folder", args: ["analyze", "spec.json"], expect: 0 },
  { name: "check of a missing spec", args: ["check", "missing.json"], expect: 2 },
  { name: "analyze of a missing spec", args: ["analyze", "missing.json", "--out", "dossier"], expect: 2 },
  {
    name: "build of a missing spec",
    args: ["build", "missing.json", "--no-pdf", "--out", "dossier"],
    expect: 2,
  },
  { name: "check of a folder", args: ["check", "folder"], extra: { "folder/": "" }, expect: 2 },
  {
    name: "build of a folder",
    args: ["build", "folder", "--no-pdf", "--out", "dossier"],
    extra: { "folder/": "" },
    expect: 2,
  },
  { name: "check of an empty path", args: ["check", ""], expect: 2 },
  { name: "check with no spec", args: ["check"], expect: 2 },
  { name: "an unknown command", args: ["frobnicate", "spec.json"], expect: 2 },
  { name: "an unknown option", args: ["check", "spec.json", "--frob"], expect: 2 },
  { name: "--jobs 0", args: ["analyze", "spec.json", "--jobs", "0", "--out", "dossier"], expect: 2 },
  { name: "check --jobs 1e9", args: ["check", "spec.json", "--jobs", "1e9"] },
  { name: "analyze --jobs 64", args: ["analyze", "spec.json", "--jobs", "64", "--out", "dossier"] },
  {
    name: "--paper a3",
    args: ["build", "spec.json", "--no-pdf", "--paper", "a3", "--out", "dossier"],
    expect: 2,
  },
  {
    name: "a spec path with spaces and accents",
    args: ["check", "my spec é.json"],
    spec: "my spec é.json",
    expect: 0,
  },
  { name: "a spec path starting with a dash", args: ["check", "--", "-spec.json"], spec: "-spec.json" },
  { name: "a spec without the .json ending", args: ["check", "spec"], spec: "spec", expect: 0 },
];

export function pathCases(): FuzzCase[] {
  return PATH_CASES.map((c) => {
    const files: Record<string, string> = { [c.spec ?? "spec.json"]: specText(baseSpec()), ...c.extra };
    return {
      category: C,
      name: c.name,
      files,
      args: c.args,
      ...(c.expect === undefined ? {} : { expect: c.expect }),
    };
  });
}

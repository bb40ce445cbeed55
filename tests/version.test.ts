import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyze } from "../src/analysis/analyze.js";
import { KEEL_VERSION } from "../src/version.js";
import { buildModel } from "./fixtures/models.js";

// common practice: one version, read from package.json, so a release cannot ship two
const packageJson = JSON.parse(readFileSync(join(import.meta.dirname, "../package.json"), "utf8")) as {
  version: string;
};

describe("KEEL_VERSION", () => {
  it("KEEL_VERSION equals package.json's version", () => {
    expect(KEEL_VERSION).toBe(packageJson.version);
  });

  it("KEEL_VERSION is a semantic version", () => {
    // Semantic Versioning 2.0.0 (semver.org), core form MAJOR.MINOR.PATCH
    expect(KEEL_VERSION).toMatch(/^\d+\.\d+\.\d+(?:-[0-9A-Za-z.-]+)?$/);
  });

  it("analyze(model).keel records KEEL_VERSION", () => {
    const model = buildModel({ equations: { x: "-x", y: "-y" }, window: { x: [-1, 1], y: [-1, 1] } });
    expect(analyze(model).keel).toBe(packageJson.version);
  });
});

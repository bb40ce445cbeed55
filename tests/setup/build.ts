/**
 * vitest globalSetup: builds dist/ once, so the CLI suites run the same JavaScript users run.
 * A type error fails the run here, before any suite starts.
 */
import { spawnSync } from "node:child_process";
import { dirname, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../..");

export default function buildOnce(): void {
  const build = spawnSync("npx", ["tsc", "-p", "tsconfig.json"], { cwd: PROJECT_ROOT, encoding: "utf8" });
  if (build.error) throw build.error;
  if (build.status !== 0)
    throw new Error(
      `npx tsc -p tsconfig.json failed (exit ${build.status}):\n${build.stdout}${build.stderr}`,
    );
}

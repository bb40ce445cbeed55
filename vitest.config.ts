import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    // the CLI suites run dist/cli/main.js: build it once, before any suite starts
    globalSetup: ["tests/setup/build.ts"],
    testTimeout: 60_000,
    hookTimeout: 120_000,
    pool: "forks",
    // vitest's default is one worker fewer than the cores: a single worker on the 2-core CI machine
    maxWorkers: 2,
    // a worker's test files share one module graph: mathjs and the pipeline load once per worker,
    // not once per file; no test patches a module, and the two that set an environment variable
    // restore it (a run of every file in one worker this way passes)
    isolate: false,
  },
});

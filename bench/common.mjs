/** Shared by the benchmarks (not itself a benchmark: run.mjs runs only *.bench.mjs). */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { analyze, prepareModel } from "../dist/index.js";
import { planBasins } from "../dist/analysis/basins/index.js";
import { flowTimeScale } from "../dist/analysis/flow/trajectories.js";
import { windowOf } from "../dist/analysis/numeric/window.js";

export const specPath = (name) => fileURLToPath(new URL(`../specs/${name}.json`, import.meta.url));

/**
 * The competition model of Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §6.4 (rabbits vs
 * sheep), from memory, written as a keel spec so the benchmarks compile it like any other.
 */
export const COMPETITION_SPEC = {
  keel: 1,
  id: "bench-competition",
  title: "Competition model x' = x(3 - x - 2y), y' = y(2 - x - y)",
  time: { unit: "time" },
  states: [
    { name: "x", min: 0, max: 3 },
    { name: "y", min: 0, max: 3 },
  ],
  equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
};

export function prepare(name, specText) {
  const prepared = prepareModel(specText);
  if (!prepared.ok) throw new Error(`${name}: ${JSON.stringify(prepared.issues)}`);
  return prepared.value.model;
}

/**
 * The model's basin plan, exactly as analyze() makes it (the plan does not depend on the map's
 * resolution), for an example spec by name or for the spec text given.
 */
export function planFor(name, specText = readFileSync(specPath(name), "utf8")) {
  const spec = JSON.parse(specText);
  spec.analysis = { basins: { resolution: 64, coarse: 64 } };
  const model = prepare(name, JSON.stringify(spec));
  const results = analyze(model);
  const box = windowOf(model);
  const horizon = results.settings.basins.horizon;
  const timeScale = flowTimeScale(results.equilibria);
  const plan = planBasins(
    model,
    results.equilibria,
    results.cycles,
    box,
    horizon,
    timeScale,
    results.basins,
    [],
  );
  if (plan.targets.slowSinks.length || plan.targets.cycles.length)
    throw new Error(`${name}: the reference implements capture ellipses only`);
  return { model, results, plan, settings: { horizon, initialStep: Math.min(horizon, timeScale) * 1e-3 } };
}

/** The cell centres of an n x n grid over the box, row by row from the lowest second state. */
export function gridStarts(box, n) {
  const starts = new Float64Array(2 * n * n);
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      starts[2 * (j * n + i)] = box.lo[0] + ((i + 0.5) / n) * box.width[0];
      starts[2 * (j * n + i) + 1] = box.lo[1] + ((j + 0.5) / n) * box.width[1];
    }
  return starts;
}

export const median = (values) => [...values].sort((a, b) => a - b)[(values.length - 1) >> 1];
export const seconds = (start) => Number(process.hrtime.bigint() - start) / 1e9;

export function timeOnce(fn) {
  const start = process.hrtime.bigint();
  fn();
  return seconds(start);
}

/** Shared by the benchmarks (not itself a benchmark: run.mjs runs only *.bench.mjs). */
import { fileURLToPath } from "node:url";

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

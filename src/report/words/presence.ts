import type { NormalizedState } from "../../spec/types.js";

/**
 * What the words for an equilibrium's presence pattern need of the states. An equilibrium keeps
 * a state "present" when it lies off that state's lower bound (analysis/parameters/outcomes.ts).
 */
export interface StateTerms {
  /** State names, in state order. */
  names: string[];
  /** The spec declares every state a population: "coexistence", "N only", "all absent". */
  populations: boolean;
  /** Every lower bound is 0: a present state is "positive", and none present is the origin. */
  zeroBounded: boolean;
}

/** The terms for the spec's states. */
export function stateTerms(
  states: readonly Pick<NormalizedState, "name" | "min" | "population">[],
): StateTerms {
  return {
    names: states.map((s) => s.name),
    populations: states.length > 0 && states.every((s) => s.population),
    zeroBounded: states.every((s) => s.min === 0),
  };
}

/**
 * How an equilibrium sits against the lower bounds, as a clause after "a saddle":
 * "with all states positive", "with only N positive", "at the origin"; for populations
 * "with coexistence", "with N only", "with all absent".
 */
export function presenceClause(present: string[], states: StateTerms): string {
  if (states.populations) return `with ${populationWords(present, states)}`;
  const all = present.length === states.names.length;
  if (states.zeroBounded) {
    if (all) return "with all states positive";
    if (present.length === 0) return "at the origin";
    return `with only ${present.join(" and ")} positive`;
  }
  if (all) return "with no state at its lower bound";
  if (present.length === 0) return "with every state at its lower bound";
  return `with only ${present.join(" and ")} above ${present.length === 1 ? "its lower bound" : "their lower bounds"}`;
}

/**
 * An equilibrium named by its presence pattern: "coexistence", "S only", "all absent" when the
 * states are populations; otherwise "the equilibrium with only N positive", "the origin".
 */
export function presenceWords(present: string[], states: StateTerms): string {
  if (states.populations) return populationWords(present, states);
  if (states.zeroBounded && present.length === 0) return "the origin";
  return `the equilibrium ${presenceClause(present, states)}`;
}

function populationWords(present: string[], states: StateTerms): string {
  if (present.length === states.names.length) return "coexistence";
  if (present.length === 0) return "all absent";
  return `${present.join(" and ")} only`;
}

/** Headings and lead-in of the invasion table: for populations "invade", otherwise growth off an invariant axis. */
export function invasionTerms(states: StateTerms) {
  if (states.populations)
    return {
      heading: "Invasion conditions",
      intro:
        "Where a population is absent, its growth rate when rare (the eigenvalue across its axis) decides whether it can invade; these rates follow symbolically from the Jacobian.",
      absent: "Absent",
      resident: "Resident",
      rate: "Invasion rate",
    };
  return {
    heading: "Growth off an invariant axis",
    intro:
      "Where a state sits at zero on an axis its equation keeps it on, its growth rate when small (the eigenvalue across the axis) decides whether it grows away from the axis; these rates follow symbolically from the Jacobian.",
    absent: "At zero",
    resident: "Other state",
    rate: "Growth rate",
  };
}

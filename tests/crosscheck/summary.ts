/**
 * What the crosscheck compares, in two shapes: keel's Results boiled down (KeelSummary), and the
 * reference's answer as tests/reference/crosscheck.py prints it (ReferenceModel).
 */
import type { Results } from "../../src/analysis/types.js";

export type Point = [number, number];

export interface KeelSummary {
  id: string;
  ok: true;
  seconds: number;
  states: string[];
  window: [number, number][];
  equilibria: { id: string; point: Point; type: string; stable: boolean | null }[];
  scenarios: {
    name: string;
    kind: string;
    /** equilibrium: the target's point; cycle: the target's id. */
    target: Point | string | null;
    /** left-window / blow-up: the state whose edge was crossed. */
    state: string | null;
    reason: string | null;
  }[];
  cycles: { id: string; period: number; stability: string; point: Point }[];
  studies: {
    parameter: string;
    range: [number, number];
    breaks: { value: number; kind: string; threshold: string | null }[];
    limits: { value: number; bracket: [number, number]; cause: string }[];
  }[];
}

export interface KeelCrash {
  id: string;
  ok: false;
  seconds: number;
  error: string;
}

export type KeelOutcome = KeelSummary | KeelCrash;

const pointOf = (states: string[], p: Record<string, number>): Point => [p[states[0]], p[states[1]]];

/** keel's Results reduced to what the reference can be compared with. */
export function summarizeResults(results: Results, seconds: number): KeelSummary {
  const states = results.model.states;
  const byId = new Map(results.equilibria.map((e) => [e.id, e]));
  return {
    id: results.spec.id,
    ok: true,
    seconds,
    states,
    window: states.map((s) => results.model.window[s]),
    equilibria: results.equilibria.map((e) => ({
      id: e.id,
      point: pointOf(states, e.point),
      type: e.type,
      stable: e.stable,
    })),
    scenarios: results.scenarios.map((s) => {
      const f = s.fate;
      const target =
        f.kind === "equilibrium"
          ? pointOf(states, byId.get(f.target)!.point)
          : f.kind === "cycle"
            ? f.target
            : null;
      const state =
        f.kind === "left-window" ? f.edge.state : f.kind === "blow-up" ? (s.exit?.edge.state ?? null) : null;
      return { name: s.name, kind: f.kind, target, state, reason: f.kind === "undecided" ? f.reason : null };
    }),
    cycles: results.cycles.map((c) => ({
      id: c.id,
      period: c.period,
      stability: c.stability,
      point: pointOf(states, c.section.point),
    })),
    studies: results.conditions.studies.map((st) => {
      const ends = st.intervals.slice(1).map((iv) => iv.from);
      return {
        parameter: st.parameter,
        range: st.range,
        breaks: ends.flatMap((e): KeelSummary["studies"][number]["breaks"] =>
          e.kind === "threshold"
            ? [{ value: e.value, kind: e.kind, threshold: e.threshold }]
            : e.kind === "sampled-break"
              ? [{ value: e.value, kind: e.kind, threshold: null }]
              : [],
        ),
        limits: ends.flatMap((e): KeelSummary["studies"][number]["limits"] =>
          e.kind === "decision-limit" ? [{ value: e.value, bracket: e.bracket, cause: e.cause }] : [],
        ),
      };
    }),
  };
}

export interface ReferenceFate {
  kind: "equilibrium" | "cycle" | "left-window" | "blow-up" | "undecided";
  point?: Point;
  state?: string;
  period?: number;
  stability?: string | null;
  reason?: string;
  approach?: string;
}

export interface ReferenceEquilibrium {
  point: Point;
  type: string;
  stable: boolean | null;
  borderline: boolean;
  inside: boolean;
  nearEdge: boolean;
}

export interface ReferenceBreak {
  value: number;
  bracket: [number, number];
  resolved: boolean;
  cause: string;
}

export interface ReferenceModel {
  id: string;
  ok: boolean;
  error?: string;
  states: string[];
  window: [number, number][];
  /** The span of the window and the feasible region: where equilibria are searched and "inside" refers to. */
  region?: [number, number][];
  equilibria: ReferenceEquilibrium[];
  scenarios: { name: string; fate: ReferenceFate; feasibleFate: ReferenceFate }[];
  cycles: { id: string; found: boolean; period?: number; stability?: string | null }[];
  studies: {
    parameter: string;
    range: [number, number];
    breaks: ReferenceBreak[];
    undecided: [number, number][];
    budgetSpent: boolean;
  }[];
  seconds: number;
}

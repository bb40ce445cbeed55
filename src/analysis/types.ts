import type { Diagnostic } from "../diagnostics/issue.js";
import type { EquilibriumResult } from "./equilibria.js";
import type { PortraitTrajectory, ScenarioResult } from "./trajectories.js";
import type { CycleResult } from "./cycles.js";
import type { SeparatrixResult } from "./manifolds.js";
import type { BasinResult } from "./basins/index.js";
import type { NullclineResult } from "./nullclines.js";
import type { RegionResult } from "./regions.js";
import type { DirectionFieldResult } from "./field.js";
import type { ParameterStudyResult, ThresholdResult } from "./thresholds.js";
import type { InvasionConditionResult } from "./conditions.js";
import type { OutcomeMapResult } from "./maps.js";

export type { EquilibriumResult } from "./equilibria.js";
export type { PortraitTrajectory, ScenarioResult } from "./trajectories.js";
export type { CycleResult } from "./cycles.js";
export type { SeparatrixResult, ManifoldEnd } from "./manifolds.js";
export type { BasinResult } from "./basins/index.js";
export type { NullclineResult, NullclinePiece } from "./nullclines.js";
export type { RegionResult } from "./regions.js";
export type { DirectionFieldResult } from "./field.js";
export type { ParameterStudyResult, ThresholdResult, OutcomeIntervalResult, MarginResult } from "./thresholds.js";
export type { InvasionConditionResult } from "./conditions.js";
export type { ClaimResult } from "./claims.js";
export type { OutcomeMapResult } from "./maps.js";
export type { Fate, TrajectoryPath } from "./flow.js";
export type { StabilityResult, EquilibriumType, Complex } from "./stability.js";

export interface AssumptionResult {
  index: number;
  text: string;
  condition: string | null;
  tex: string | null;
  /** At the nominal parameter values: lhs and rhs of the condition, and whether it holds. */
  lhs: number | null;
  rhs: number | null;
  holds: boolean | null;
  /** Where the condition changes truth across each studied parameter range, and the located threshold nearest to it. */
  flips: import("./assumptions.js").AssumptionFlip[];
}

/** Everything keel computes from one spec; serialised as results.json. */
export interface Results {
  keel: string;
  spec: { id: string; sha256: string };
  model: {
    states: string[];
    parameters: Record<string, number>;
    window: Record<string, [number, number]>;
    equations: { state: string; text: string; tex: string }[];
    jacobian: { text: string; tex: string }[][];
  };
  equilibria: EquilibriumResult[];
  nullclines: NullclineResult[];
  regions: RegionResult[];
  field: DirectionFieldResult;
  scenarios: ScenarioResult[];
  cycles: CycleResult[];
  separatrices: SeparatrixResult[];
  trajectories: PortraitTrajectory[];
  basins: BasinResult;
  /** Every located threshold of every studied parameter (the flat list; details under conditions). */
  thresholds: ThresholdResult[];
  claims: import("./claims.js").ClaimResult[];
  conditions: {
    invasion: InvasionConditionResult[];
    studies: ParameterStudyResult[];
    maps: OutcomeMapResult[];
  };
  assumptions: AssumptionResult[];
  diagnostics: Diagnostic[];
  /** Settings every pass used, so the dossier's methods section and `verify` can restate them. */
  settings: Record<string, unknown>;
}

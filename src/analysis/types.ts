import type { Diagnostic } from "../diagnostics/issue.js";
import type { RESULTS_FORMAT } from "../version.js";
import type { EquilibriumResult } from "./phase/equilibria.js";
import type { EquilibriumSetResult } from "./phase/equilibrium-sets.js";
import type { SingularityResult } from "./phase/singularities.js";
import type { PortraitTrajectory, ScenarioResult } from "./flow/trajectories.js";
import type { CycleResult } from "./flow/cycles.js";
import type { SeparatrixResult } from "./flow/manifolds.js";
import type { BasinResult } from "./basins/index.js";
import type { NullclineResult } from "./phase/nullclines.js";
import type { RegionResult } from "./phase/regions.js";
import type { DirectionFieldResult } from "./phase/field.js";
import type { ParameterStudyResult, ThresholdResult } from "./parameters/study.js";
import type { InvasionConditionResult } from "./parameters/invasion.js";
import type { OutcomeMapResult } from "./parameters/maps.js";

export type { EquilibriumResult } from "./phase/equilibria.js";
export type { EquilibriumSetResult } from "./phase/equilibrium-sets.js";
export type {
  SingularityResult,
  SingularityReason,
  SingularFactorEvidence,
  SingularRay,
} from "./phase/singularities.js";
export type { PortraitTrajectory, ScenarioResult } from "./flow/trajectories.js";
export type { CycleResult } from "./flow/cycles.js";
export type { SeparatrixResult, SeparatrixFate } from "./flow/manifolds.js";
export type { BasinResult } from "./basins/index.js";
export type { NullclineResult, NullclinePiece } from "./phase/nullclines.js";
export type { RegionResult } from "./phase/regions.js";
export type { DirectionFieldResult } from "./phase/field.js";
export type {
  ParameterStudyResult,
  ThresholdResult,
  OutcomeIntervalResult,
  MarginResult,
  BreakResult,
  IntervalEndResult,
} from "./parameters/study.js";
export type {
  OutcomeResult,
  AttractorResult,
  EquilibriumAttractor,
  OutcomeFateResult,
} from "./parameters/outcomes.js";
export type { InvasionConditionResult } from "./parameters/invasion.js";
export type { ClaimResult, ClaimEvidence, ClaimReference } from "./checks/claims.js";
export type { OutcomeMapResult } from "./parameters/maps.js";
export type { Fate, TrajectoryPath } from "./flow/follow.js";
export type { StabilityResult, EquilibriumType, Complex } from "./phase/stability.js";

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
  flips: import("./checks/assumptions.js").AssumptionFlip[];
}

/** Everything keel computes from one spec; serialised as results.json. */
export interface Results {
  /** The keel version that computed these results. */
  keel: string;
  /** Version of the results.json format (RESULTS_FORMAT in src/version.ts). */
  format: typeof RESULTS_FORMAT;
  spec: { id: string; sha256: string };
  model: {
    states: string[];
    parameters: Record<string, number>;
    window: Record<string, [number, number]>;
    equations: { state: string; text: string; tex: string }[];
    jacobian: { text: string; tex: string }[][];
  };
  equilibria: EquilibriumResult[];
  /** Curves and regions where the field vanishes, each one object (not among the equilibria). */
  equilibriumSets: EquilibriumSetResult[];
  /** Where the field or its Jacobian is not defined or not continuous: points and lines, with evidence, never a type. */
  singularities: SingularityResult[];
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
  claims: import("./checks/claims.js").ClaimResult[];
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

/**
 * The methods section, written from the named constants of analysis/ and the settings the run
 * recorded in results.json, so the prose cannot drift from the code.
 */
import {
  CAPTURE_SAFETY,
  CLASSIFY_BORDERLINE_TOL,
  CLASSIFY_REL_TOL,
  CLASSIFY_ROUNDING_TOL,
  CONDITION_MARGIN_TOL,
  DEDUP_REL_TOL,
  DEFAULT_CLAIM_CONDITION_SAMPLES,
  DEFAULT_CLAIM_NEAR,
  LOCATE_TOL,
  MANIFOLD_OFFSET,
  MAP_COARSE,
  MAP_RESOLUTION,
  OUTCOME_SAMPLES,
  ROOT_RESIDUAL_TOL,
  FEASIBLE_GRID_FRACTION,
  SINGULAR_ARRIVAL_DISTANCE,
  SHOOT_RELATIVE_TOL,
  SHOOT_RESIDUAL_TOL,
  SHOOT_ACCEPT_TOL,
  CYCLE_MIN_EXTENT,
  CYCLE_SCAN_RATIO,
  MULTIPLIER_AGREEMENT_TOL,
  FATE_HORIZON_DOUBLINGS,
  SWITCH_LOCATE_TOL,
  THRESHOLD_SIDE_OFFSET,
  ZERO_VALUE_TOL,
  SYMBOLIC_MATCH_TOL,
} from "../../analysis/constants.js";
import { formatNumber } from "../format.js";

/** "64 × 64", kept on one line. */
export const gridSize = (n: number) => `${n}\u00a0×\u00a0${n}`;
const percent = (fraction: number) => `${formatNumber(100 * fraction)}%`;

interface RecordedSettings {
  equilibria?: { gridSize?: number; edgeSamples?: number };
  trajectories?: { integrator?: string; relativeTolerance?: number; absoluteToleranceOfWindow?: number };
  basins?: {
    resolution?: number;
    coarse?: number;
    integrator?: string;
    relativeTolerance?: number;
    absoluteToleranceOfWindow?: number;
    horizon?: number;
  };
}

function equilibriumMethod(s: RecordedSettings): string {
  const grid =
    s.equilibria?.gridSize !== undefined
      ? `a ${gridSize(s.equilibria.gridSize)} grid and its cell centres`
      : "a grid and its cell centres";
  const edges =
    s.equilibria?.edgeSamples !== undefined ? `, sampled at ${s.equilibria.edgeSamples} points per edge` : "";
  return (
    `Equilibria: damped Newton from a deterministic multistart set (${grid}, window edges and axes, roots of each component along each edge${edges}); ` +
    `a root is accepted when every residual is below ${formatNumber(ROOT_RESIDUAL_TOL)} of that component's scale over the window; ` +
    `roots closer than ${formatNumber(DEDUP_REL_TOL)} of the window are merged. ` +
    `Where the feasible region (the states' bounds) reaches beyond the window, it is searched as well, on a grid ${formatNumber(FEASIBLE_GRID_FRACTION)} as fine, from starts beyond the window.`
  );
}

function classificationMethod(): string {
  return (
    `Classification: trace and determinant are called zero within ${formatNumber(CLASSIFY_REL_TOL)} relative to scales a change of units leaves unchanged ` +
    "(the spectral radius, and the sizes of the terms that cancel); such cases are reported as non-hyperbolic or center, which the linearisation does not decide. " +
    "Node, focus, degenerate node and star are read with each state measured in its window width (J̃ = S⁻¹JS, λ half the trace): " +
    `node against focus follows the sign of the discriminant, called zero within ${formatNumber(CLASSIFY_ROUNDING_TOL)} of 4‖J̃ − λI‖‖J̃‖, ` +
    `and a repeated eigenvalue is a star when ‖J̃ − λI‖ is within ${formatNumber(CLASSIFY_ROUNDING_TOL)} of |λ|, else a degenerate node. ` +
    `A call resting on discriminant/trace² or on ‖J̃ − λI‖/|λ| within ${formatNumber(CLASSIFY_BORDERLINE_TOL)} of zero is reported as borderline, with its value, ` +
    "and a claim of either type it lies between is undecided."
  );
}

function trajectoryMethod(s: RecordedSettings): string {
  const t = s.trajectories ?? {};
  const tolerances = [
    t.relativeTolerance !== undefined ? `relative tolerance ${formatNumber(t.relativeTolerance)}` : "",
    t.absoluteToleranceOfWindow !== undefined
      ? `absolute tolerance ${formatNumber(t.absoluteToleranceOfWindow)} of each state's window width`
      : "",
  ]
    .filter((x) => x)
    .join(", ");
  return (
    `Trajectories: ${t.integrator ?? "adaptive integration"}${tolerances ? `; ${tolerances}` : ""}. ` +
    "A trajectory counts as converged once it enters a neighbourhood of a stable equilibrium on which the linearisation's quadratic Lyapunov function " +
    `was checked by sampling to decrease (only ${percent(CAPTURE_SAFETY)} of the checked level is used, as sampling is not a proof). ` +
    "Trajectories are followed inside the feasible region (the states' bounds), out of the window and back where they go so; " +
    "leaving that region, also between two integration steps (read from each step's cubic Hermite interpolant), is the fate 'leaves the feasible region'. " +
    `A trajectory that passes within ${formatNumber(SINGULAR_ARRIVAL_DISTANCE)} of the window of a singular point (where the field is not defined) stops there, its fate undecided: the equations do not say what follows.`
  );
}

function cycleMethod(): string {
  return (
    "Periodic orbits: the return map of a ray section from each focus or centre is sampled at radii growing by a factor " +
    `${formatNumber(CYCLE_SCAN_RATIO)} and every sign change of its displacement is solved for (at every parameter point an outcome is decided at, too); ` +
    "recurrence through such a section seen along a trajectory is solved by shooting (secant iteration on the return map); " +
    `returns are integrated at relative tolerance ${formatNumber(SHOOT_RELATIVE_TOL)}, until the return misses its start by less than ${formatNumber(SHOOT_RESIDUAL_TOL)} of the window. ` +
    "The Floquet multiplier is exp of the integral of the Jacobian's trace over one period. An orbit is accepted only when its return closes to " +
    `${formatNumber(SHOOT_ACCEPT_TOL)}, it lies farther than ${formatNumber(CYCLE_MIN_EXTENT)} of the window from its equilibrium, and its multiplier agrees with the return map's slope to ${formatNumber(MULTIPLIER_AGREEMENT_TOL)}; ` +
    "otherwise the trajectory is followed on. Once solved, a stable cycle's section is probed for the radii whose returns close in on it (a trajectory crossing there goes to it), " +
    "and a neutral cycle's for the radii whose return map is the identity (its family of closed orbits). " +
    `A trajectory undecided at its horizon is followed on, each stretch twice the last, up to ${FATE_HORIZON_DOUBLINGS} times.`
  );
}

function separatrixMethod(): string {
  return `Separatrices: each saddle's manifolds integrated from points ${formatNumber(MANIFOLD_OFFSET)} of the window along its eigenvectors (stable manifolds backward in time).`;
}

/** The basin pass's method, from the settings it recorded (none when it did not run). */
function basinMethod(s: RecordedSettings, timeUnit: string): string[] {
  const b = s.basins;
  if (!b || b.resolution === undefined || b.coarse === undefined) return [];
  return [
    `Basins: a first pass over ${gridSize(b.coarse)} cells, then cells subdivided near basin boundaries up to ${gridSize(b.resolution)}; ` +
      `each cell's trajectory integrated${b.integrator ? ` by ${b.integrator}` : ""}` +
      (b.relativeTolerance !== undefined
        ? ` at relative tolerance ${formatNumber(b.relativeTolerance)}`
        : "") +
      (b.absoluteToleranceOfWindow !== undefined
        ? `, absolute tolerance ${formatNumber(b.absoluteToleranceOfWindow)} of the window`
        : "") +
      (b.horizon !== undefined ? `, for at most t = ${formatNumber(b.horizon, 4)} ${timeUnit}` : "") +
      ", by the trajectories' fate rules; a cell whose trajectory crosses a stable cycle's section within the stretch checked to return towards the cycle is that cycle's, " +
      "one that crosses a neutral family's section within the radii checked to close is on that family (no attractor), " +
      `and one that passes within ${formatNumber(SINGULAR_ARRIVAL_DISTANCE)} of the window of a singular point is labelled with that point.`,
  ];
}

function conditionMethods(studied: boolean, mapped: boolean): string[] {
  if (!studied) return [];
  return [
    "Deciding conditions: each ranged parameter varied alone; branches of equilibria followed by pseudo-arclength continuation, and each threshold located " +
      `to ${formatNumber(LOCATE_TOL)} of the range's width. The outcome (the attractors and every scenario's fate) is decided everywhere exactly as at the current values: ` +
      `the same equilibrium search, fate rules, tolerances and horizons. It is evaluated at ${OUTCOME_SAMPLES + 1} evenly spaced values (both ends included), at the current value, ` +
      `${formatNumber(THRESHOLD_SIDE_OFFSET)} of the range on either side of each threshold and midway into the gaps beside it; every change between neighbouring values is bisected ` +
      `on the outcome itself to ${formatNumber(SWITCH_LOCATE_TOL)} of the range, and each break is confirmed by the outcomes evaluated on its two sides. ` +
      "Where a scenario's fate turns undecided (its horizon or step limit reached) the change is a limit of what was decided, never a break, and no margin is taken to it. " +
      `A margin is a percentage of the break's value, or a distance in the parameter's unit where the break lies within ${formatNumber(ZERO_VALUE_TOL)} of the range of zero or of the current value. ` +
      `A threshold matches a symbolic invasion condition when they agree to ${formatNumber(SYMBOLIC_MATCH_TOL)}, relatively.`,
    ...(mapped
      ? [
          `Outcome maps: the attractors at the centre of each of ${gridSize(MAP_RESOLUTION)} cells over the two ranges, by adaptive refinement from a uniform ${gridSize(MAP_COARSE)} grid: ` +
            "a cell is split into four, level by level, only where a neighbouring cell has another outcome or a threshold curve passes; elsewhere it keeps the outcome at its centre. " +
            `An outcome region narrower than 1/${MAP_COARSE} of a range that no threshold curve bounds can be missed.`,
        ]
      : []),
  ];
}

function claimMethods(): string {
  return (
    `Claims: a claimed point is near an equilibrium within ${percent(DEFAULT_CLAIM_NEAR)} of the window in each state unless the claim says otherwise; ` +
    `a condition is tested at ${DEFAULT_CLAIM_CONDITION_SAMPLES} parameter points of a Halton sequence across the ranges unless the claim says otherwise, ` +
    `skipping points where its two sides agree to ${formatNumber(CONDITION_MARGIN_TOL)}, relatively.`
  );
}

/** One paragraph per method, in the order of the analysis. */
export function methodsWords(
  settings: Record<string, unknown>,
  context: { timeUnit: string; studied: boolean; mapped: boolean; claims: boolean },
): string[] {
  const s = settings as RecordedSettings;
  return [
    equilibriumMethod(s),
    classificationMethod(),
    trajectoryMethod(s),
    cycleMethod(),
    separatrixMethod(),
    ...basinMethod(s, context.timeUnit),
    ...conditionMethods(context.studied, context.mapped),
    ...(context.claims ? [claimMethods()] : []),
  ];
}

/**
 * Every default and tolerance of analysis/, each with the reason for its value. Modules import
 * their numbers from here; the dossier's methods section and `settings` in results.json restate
 * them from here. "Scaled" means window-scaled: each state divided by its window width.
 *
 * Sections: equilibria · singularities · classification · nullclines · regions and field · integration ·
 * flow and fates · capture regions · cycles · separatrices · basins · continuation ·
 * invasion · assumptions · parameters & checks (outcomes, studies, maps, claims).
 */
import type { EquilibriumOptions } from "./phase/equilibria.js";
import type { NullclineOptions } from "./phase/nullclines.js";
import type { RegionOptions } from "./phase/regions.js";
import type { DirectionFieldOptions } from "./phase/field.js";
import type { TrajectoryOptions } from "./flow/trajectories.js";
import type { BasinOptions } from "./basins/index.js";
import type { StepOptions } from "./parameters/continuation/branch.js";
import { DEFAULT_BASIN_COARSE, DEFAULT_BASIN_RESOLUTION } from "../spec/defaults.js";

export {
  DEFAULT_BASIN_COARSE,
  DEFAULT_BASIN_RESOLUTION,
  DEFAULT_CLAIM_CONDITION_SAMPLES,
  DEFAULT_CLAIM_NEAR,
} from "../spec/defaults.js";

// ── equilibria ──────────────────────────────────────────────────────────────────────────────

/** Interior multistart grid (16 × 16 plus cell centres) and samples per edge for the 1-D boundary searches. */
export const EQUILIBRIUM_GRID_SIZE = 16;
export const EQUILIBRIUM_EDGE_SAMPLES = 400;
export const DEFAULT_EQUILIBRIUM_OPTIONS: EquilibriumOptions = {
  gridSize: EQUILIBRIUM_GRID_SIZE,
  edgeSamples: EQUILIBRIUM_EDGE_SAMPLES,
};
/** Accept a root when every residual, relative to that component's scale over the window, is below this. */
export const ROOT_RESIDUAL_TOL = 1e-9;
/** Two roots are one when they differ by less than this fraction of the window in every state. */
export const DEDUP_REL_TOL = 1e-6;
/** A root may lie this fraction of the window outside it and still count (then it is clipped). */
export const WINDOW_SLACK = 1e-9;
/**
 * The feasible region beyond the window is searched on a grid this fraction of the window's
 * (per side): it is not drawn, and its equilibria matter as attractors and fates only, so a
 * coarser multistart (plus every root along its edges) keeps the second pass cheap.
 */
export const FEASIBLE_GRID_FRACTION = 0.5;
/** A coordinate this close to a bound (fraction of the window) is put exactly on it, if the residual stays small. */
export const SNAP_REL_TOL = 1e-10;
/** An edge is invariant for a state when its own derivative there stays below this fraction of its scale. */
export const INVARIANT_EDGE_TOL = 1e-13;
/** Newton may wander this far outside the window (fraction of its width) before the start is dropped. */
export const NEWTON_ROAM = 0.5;
/** Damped Newton from a grid start converges in tens of steps; the rest is room near tangencies. */
export const NEWTON_MAX_ITERATIONS = 80;
/** Backtracking halves the step down to this factor (12 halvings) before the start is given up. */
export const NEWTON_MIN_DAMPING = 1 / 4096;
/** Armijo sufficient decrease of the scaled residual per unit damping (common practice: 1e-4). */
export const NEWTON_SUFFICIENT_DECREASE = 1e-4;
/** Below this fraction of ROOT_RESIDUAL_TOL the residual is rounding noise: a step that does not raise it is accepted. */
export const POLISH_RESIDUAL_FRACTION = 1e-3;
/** A Newton step shorter than this (scaled) is a few ulps: the root is at full precision. */
export const NEWTON_STEP_TOL = 1e-15;
/** Converged iterations kept polishing before stopping: the second confirms the first gained nothing. */
export const NEWTON_POLISH_STALLS = 2;
/** Beyond this count we report a suspected continuum of equilibria instead of listing more. */
export const MAX_EQUILIBRIA = 50;
/**
 * Sets of equilibria (phase/equilibrium-sets.ts): a root's Jacobian, scaled by the window and the
 * field's scales, is degenerate when its determinant is within this fraction of its squared norm
 * (rank 1), or its norm is within it of 0 (rank 0). Roots are accepted at ROOT_RESIDUAL_TOL =
 * 1e-9, so a root on a curve of equilibria shows a determinant of that order; an isolated
 * hyperbolic equilibrium shows one of order 1.
 */
export const DEGENERATE_JACOBIAN_TOL = 1e-6;
/** Degenerate roots within this many multistart cells of each other (in each state) belong to one set. */
export const EQUILIBRIUM_SET_LINK_CELLS = 3;
/** A linked group spanning less than this many cells in both states is one degenerate equilibrium found several times. */
export const EQUILIBRIUM_SET_MIN_EXTENT_CELLS = 1;
/** Points of a set kept in results.json (thinned evenly beyond). */
export const EQUILIBRIUM_SET_MAX_POINTS = 50;
/** Bisection of a sign change along an edge: 200 halvings exceed the 2^-1074 range of doubles, so adjacency stops it first. */
export const EDGE_BISECTION_MAX_ITERATIONS = 200;
/** Intervals per side of the grid on which the component scales max |f_i| are sampled (25 × 25 nodes). */
export const COMPONENT_SCALE_INTERVALS = 24;

// ── singularities ───────────────────────────────────────────────────────────────────────────

/**
 * Intervals per side of the grid on which each singular factor (a denominator, a log/sqrt/power
 * argument, a kink) is sampled for its zero set: 1/64 of the window per cell, finer than any
 * feature a dossier figure resolves.
 */
export const SINGULAR_GRID_INTERVALS = 64;
/** A factor counts as zero at a point when below this fraction of its largest value over the grid (rounding level of a grid node). */
export const SINGULAR_ZERO_TOL = 1e-12;
/**
 * An equilibrium-search root within this scaled distance of a factor's zero (|g| / |∇g| in
 * window units) is examined as a singular point. Roots are accepted at ROOT_RESIDUAL_TOL = 1e-9
 * of the field's scale, so a search converging onto a singular point stops about that close to
 * it; a hundred times that leaves margin, and a genuine equilibrium this close to a singular
 * curve has no linearisation the grid or any figure could tell from the singular point's.
 */
export const SINGULAR_ROOT_DISTANCE = 1e-7;
/** Directions of the rays from a singular point (every 22.5°, in window units); those leaving the window are dropped. */
export const SINGULAR_RAY_DIRECTIONS = 16;
/**
 * The two scaled radii at which the field and the Jacobian are read along each ray. Their ratio,
 * 1000, separates the cases cleanly: a 0/0 field of degree 1 shrinks by 1000, a pole grows by
 * 1000 or more, a square-root Jacobian grows by √1000 ≈ 32, a smooth one changes by ~1e-3.
 */
export const SINGULAR_RAY_RADII = [1e-3, 1e-6] as const;
/** Growth (or shrinking) by more than this factor between the two radii means unbounded (or tending to zero). */
export const SINGULAR_GROWTH = 10;
/**
 * Jacobians read along different rays at the small radius agree when they differ by less than
 * this fraction of their size (window-scaled): a smooth Jacobian varies by ~1e-6 over the radius.
 */
export const SINGULAR_JACOBIAN_SPREAD_TOL = 1e-3;
/** Scaled offset to either side of a line, where kinks are confirmed by a jump of the Jacobian. */
export const SINGULAR_SIDE_OFFSET = 1e-6;
/** At most this many points are listed along a singular line (evenly thinned, in grid order). */
export const SINGULAR_LINE_SAMPLES = 24;
/** Bisection of a factor's sign change along a grid edge: adjacency of doubles stops it first. */
export const SINGULAR_BISECTION_MAX_ITERATIONS = 200;

// ── classification ──────────────────────────────────────────────────────────────────────────

/**
 * Relative tolerance for calling trace or determinant zero, against a scale for
 * each that a change of units (J → D J D⁻¹, D diagonal) leaves unchanged: the spectral radius ρ,
 * and the sizes of the terms that cancel (|a|, |d| for the trace; |ad|, |bc| for the
 * determinant). Entries are evaluated at a point polished to ~1e-13 relative, so
 * cancellation noise stays near 1e-12; 1e-8 leaves four digits of margin and sends a genuinely
 * borderline case to "non-hyperbolic" (or "center") rather than guessing a side.
 */
export const CLASSIFY_REL_TOL = 1e-8;
/**
 * Node, focus, degenerate node and star are read in the states' scales (window widths, so that
 * a change of units changes nothing): J̃ = S⁻¹ J S and its traceless part Ñ = J̃ − λI. J̃'s
 * entries are good to ~1e-13 of ‖J̃‖ (a polished point), so the discriminant −4 det Ñ is good to
 * 4‖Ñ‖·1e-13‖J̃‖ and ‖Ñ‖/|λ| to ~1e-13. Below this fraction (a hundred times that noise) the
 * discriminant, against 4‖Ñ‖‖J̃‖, or ‖Ñ‖/|λ| is zero to the precision of J: the eigenvalue is
 * repeated, or J − λI vanishes, and the boundary type (degenerate node, star) is reported.
 */
export const CLASSIFY_ROUNDING_TOL = 1e-11;
/**
 * A node/focus or degenerate-node/star call whose quantity lies within this of zero is reported
 * as borderline, with its evidence. discriminant/trace² ≤ 1e-8 means the eigenvalues agree to
 * 1e-4 of their size: a focus that turns once in 2π·10⁴ e-folds of decay, a node whose two rates
 * no trajectory tells apart. ‖S⁻¹(J − λI)S‖/|λ| ≤ 1e-8: the Jordan coupling shears a trajectory
 * by at most 1e-8 of the window per e-fold, far below anything drawn or compared.
 */
export const CLASSIFY_BORDERLINE_TOL = 1e-8;
/** Eigenvector sign convention: a later component leads only when larger by more than rounding (relative to the norm). */
export const EIGENVECTOR_LEAD_TOL = 1e-14;

// ── nullclines ──────────────────────────────────────────────────────────────────────────────

/** Grid nodes across the window per state, both edges included: about 1/160 of the window per cell. */
export const DEFAULT_NULLCLINE_OPTIONS: NullclineOptions = { nx: 161, ny: 161 };
/**
 * Every vertex has |f_i| ≤ this × (max |f_i| over the grid). Contour vertices are bracketed to
 * adjacent doubles (rounding level, far below this); break points are equilibria, which are
 * accepted at ROOT_RESIDUAL_TOL, so the bound cannot be tighter than that.
 */
export const NULLCLINE_RESIDUAL_TOL = ROOT_RESIDUAL_TOL;
/** f_i vanishes identically on a line when every finite sample on it is this small (relative to its scale), as for invariant edges. */
export const VANISHING_LINE_TOL = INVARIANT_EDGE_TOL;
/**
 * An equilibrium lies on a nullcline curve when its distance to the nearest chord is below what the curve
 * can bend away from that chord: SAGITTA_SAFETY × (chord length × turning angle at its ends) / 8,
 * the sagitta of a circular arc, with a floor of MERGE_DISTANCE, and never beyond this many grid
 * cells (window-scaled): curves closer together than that are not resolved by the grid anyway.
 */
export const EQUILIBRIUM_ON_CURVE_CELLS = 0.5;
/** Margin on the arc estimate, for curvature that changes within one chord. */
export const SAGITTA_SAFETY = 4;
/** The other component counts as zero at a vertex when below this fraction of its scale. */
export const DIRECTION_ZERO_TOL = 1e-12;
/**
 * Vertices this close (window-scaled) to a break point merge into it: 100 × the position error an
 * equilibrium accepted at ROOT_RESIDUAL_TOL can carry, so no vertex beside it has a rounding-noise sign.
 */
export const MERGE_DISTANCE = 1e-7;
/** A point this close (window-scaled) to a vanishing line is on it: the deflated value then comes from the derivative. */
export const ON_LINE_TOL = 1e-12;
/** Where two vanishing lines cross, the deflated value is read this far (window-scaled) inside the window. */
export const CORNER_NUDGE = 1e-6;
/** Halvings of a grid edge: 2^-80 of a cell is below one ulp, so the bracket has collapsed well before. */
export const NULLCLINE_BISECTION_STEPS = 80;
/** Sign changes of the other component are located to 2^-50 of a segment. */
export const SIGN_BISECTION_STEPS = 50;
/** A located sign change is a zero when |f_j| there is below this fraction of its scale (bisection leaves rounding level); otherwise it is a jump. */
export const SIGN_CHANGE_ZERO_TOL = 1e-8;
/** Newton from within a cell of the curve converges in a handful of steps; the rest is room near tangencies. */
export const PROJECTION_STEPS = 30;
/** A Newton step shorter than this (window-scaled) is a few ulps: the projection has converged. */
export const PROJECTION_STEP_TOL = 1e-15;

// ── regions and direction field ─────────────────────────────────────────────────────────────

/** Cells across the window per state: fine enough that a region one percent wide holds a checkable point. */
export const DEFAULT_REGION_OPTIONS: RegionOptions = { nx: 160, ny: 160 };
/**
 * Components covering less than this fraction of the window are dropped (and counted in a
 * diagnostic): at the default grid that is under 26 cells, too thin to hold a checkable point,
 * and most such slivers are cells the grid splits off where two nullclines meet.
 */
export const MIN_REGION_FRACTION = 1e-3;
/** A cell whose component is within this fraction of its scale of zero lies on a nullcline and gets no label. */
export const REGION_ZERO_TOL = 1e-12;
/** Arrows across the window per state: readable at the size of a printed figure. */
export const DEFAULT_DIRECTION_FIELD_OPTIONS: DirectionFieldOptions = { nx: 21, ny: 21 };

// ── integration ─────────────────────────────────────────────────────────────────────────────

/**
 * Trajectory tolerances: 1e-9 relative, and 1e-11 of the window width absolute, so a state of
 * size 10 and one of size 1e5 are both resolved to about nine digits.
 */
export const TRAJECTORY_RELATIVE_TOL = 1e-9;
export const TRAJECTORY_ABSOLUTE_TOL_OF_WIDTH = 1e-11;
/**
 * Longest step as a fraction of the horizon, for the follower and the basin kernel alike: curves
 * drawn from the step points need it small, and the algebraic-approach rule (ALGEBRAIC_STEPS
 * steps in a row closing in) needs that many steps. A power of two, so h · this = h / 64 exactly.
 */
export const MAX_STEP_OF_HORIZON = 1 / 64;
/** Accepted steps per trajectory: far above what a decided trajectory takes (a few thousand). */
export const TRAJECTORY_MAX_STEPS = 200_000;
/** Halvings of a step to locate an event on the dense interpolant: 2^-60 of a step is below rounding. */
export const EVENT_BISECTION_STEPS = 60;
/**
 * A step's dense output is sampled at this many even intervals to find an excursion past the
 * feasible region's edge between two accepted steps (numeric/excursion.ts): a peak narrower than
 * an eighth of a step, within one step, needs curvature the step control does not admit.
 */
export const EXCURSION_SAMPLES = 8;
/** Golden-section reductions locating such a peak: 0.618^40 ≈ 4e-9 of two sample intervals. */
export const EXCURSION_SEARCH_STEPS = 40;

// ── flow and fates (rules in flow/rules.ts) ─────────────────────────────────────────────────

/** Beyond this many window widths outside the feasible region, growth is called a blow-up ... */
export const BLOWUP_WINDOWS = 1e6;
/**
 * ... if it is also faster than exponential: the e-folding time |z|/|z'| (window-scaled) is below
 * this fraction of the time since the window exit. An exponential escape (a linear saddle) needs
 * ln(1e6) ≈ 14 e-foldings to get that far, a fraction near 1/14, and it is a plain exit; in a
 * finite-time blow-up, x ~ (t* − t)^−p, the e-folding time (t* − t)/p shrinks to nothing.
 */
export const BLOWUP_EFOLDING_FRACTION = 1e-2;
/**
 * A state may overshoot the feasible region (its min/max) by this fraction of the window's width
 * before it has left: rounding, not a tolerance of the model.
 */
export const WINDOW_EXIT_SLACK = 1e-9;
/** Saddle capture: within this scaled distance ... */
export const SADDLE_NEAR = 1e-3;
/** ... with the unstable component below this fraction of the distance. */
export const SADDLE_UNSTABLE_FRACTION = 1e-6;
/**
 * Non-hyperbolic capture: within this scaled distance, closing in for ALGEBRAIC_STEPS steps in a
 * row while heading at the equilibrium (cosine above ALGEBRAIC_HEADING). The heading test keeps
 * a trajectory that merely passes by, as along the repelling side of a saddle-node, from counting.
 */
export const ALGEBRAIC_NEAR = 0.05;
export const ALGEBRAIC_STEPS = 40;
export const ALGEBRAIC_HEADING = 0.9;
/** Closer than this (scaled) to a saddle or a non-hyperbolic equilibrium, a trajectory has arrived whatever its heading. */
export const ARRIVAL_DISTANCE = 1e-12;
/**
 * Closer than this (scaled) to a singular point, a step has run into it. Looser than arrival at an
 * equilibrium: near a singular point the field is not smooth, steps do not shrink as they do near
 * a root, and the next step may cross the singular set; 1e-6 of the window is still far below
 * anything a figure or a fate can resolve.
 */
export const SINGULAR_ARRIVAL_DISTANCE = 1e-6;
/** Recurrence: consecutive ray crossings closer than this (scaled) ... */
export const RECURRENCE_TOL = 1e-6;
/** ... and farther than this from the equilibrium (else it is spiralling in or out). */
export const RECURRENCE_MIN_RADIUS = 1e-3;
/** Crossings of one ray needed at the horizon to see gaps shrink steadily (three gaps). */
export const SLOW_RECURRENCE_CROSSINGS = 4;

/** Portrait trajectories and separatrices run this many slowest time scales; basin trajectories as long, or to the longest scenario horizon if longer. */
export const PORTRAIT_TIME_SCALES = 60;
/** Portrait seeds and stored points: enough to draw the portrait, few enough to keep results.json small. */
export const DEFAULT_TRAJECTORY_OPTIONS: TrajectoryOptions = {
  maxPathPoints: 1200,
  seriesPoints: 401,
  seedsPerEdge: 6,
  seedsAroundEquilibrium: 6,
  seedRadius: 0.02,
};
/** Scenario paths keep every step while they are followed (thinned to maxPathPoints afterwards). */
export const SCENARIO_PATH_POINTS = 200_000;

// ── capture regions ─────────────────────────────────────────────────────────────────────────

/** Radii tried, as fractions of the window, halving from the first. */
export const CAPTURE_FIRST_RADIUS = 0.25;
export const CAPTURE_MIN_RADIUS = 1e-7;
/** Angles sampled on each ellipse, and the interior shells (fractions of the level) also checked. */
export const CAPTURE_ANGLES = 72;
export const CAPTURE_SHELLS = [1, 0.7, 0.45, 0.25, 0.1, 0.03];
/** Sampling cannot prove dV/dt < 0 between samples: keep only this fraction of the verified level. */
export const CAPTURE_SAFETY = 0.5;

// ── cycles ──────────────────────────────────────────────────────────────────────────────────

/** Shooting integrates tighter than trajectories: the period is reported to ~1e-9 relative. */
export const SHOOT_RELATIVE_TOL = 1e-12;
export const SHOOT_ABSOLUTE_TOL_OF_WIDTH = 1e-13;
/** Newton (secant) on the return map stops when |P(r) − r| is below this, scaled. */
export const SHOOT_RESIDUAL_TOL = 1e-11;
export const SHOOT_MAX_ITERATIONS = 40;
/** A solved orbit is accepted when its residual is within this factor of SHOOT_RESIDUAL_TOL (the secant may stop one step short). */
export const SHOOT_ACCEPT_FACTOR = 1e3;
/** ... that is, when |P(r) − r| is below this (scaled): the shooting converged. */
export const SHOOT_ACCEPT_TOL = SHOOT_ACCEPT_FACTOR * SHOOT_RESIDUAL_TOL;
/**
 * A periodic orbit must be larger than an equilibrium's neighbourhood: its fixed point on the
 * section farther from the equilibrium, and its extent wider (scaled, in some state), than this
 * multiple of DEDUP_REL_TOL, the distance below which two equilibria are one. A spiral into a
 * focus hands the shooting a return map whose only fixed point is the focus itself (r → 0).
 */
export const CYCLE_MIN_EXTENT_OF_DEDUP = 100;
export const CYCLE_MIN_EXTENT = CYCLE_MIN_EXTENT_OF_DEDUP * DEDUP_REL_TOL;
/**
 * The Floquet multiplier (trace quadrature, ~1e-10) and the return map's slope (central
 * differences at RETURN_SLOPE_OFFSET on returns good to ~1e-12: ~1e-6) must agree to this,
 * relative to max(1, multiplier) in the direction integrated. At a false fixed point (a focus:
 * the multiplier is the slope squared) they differ by the damping per turn.
 */
export const MULTIPLIER_AGREEMENT_TOL = 1e-4;
/** Relative offset of the second secant start: far above rounding, far below the distance to another orbit. */
export const SHOOT_SECANT_OFFSET = 1e-5;
/** Each return is integrated for at most this many guessed periods ... */
export const SHOOT_PERIODS = 3;
/** ... in steps of at most this fraction of the guessed period, at most SHOOT_MAX_STEPS of them ... */
export const SHOOT_MAX_STEP_OF_PERIOD = 1 / 16;
/**
 * ... or of this fraction, where a return only samples the return map (the section scan, capture
 * probes): the error control sets the steps, and a quarter period still puts the crossings of
 * the two senses in different steps on any orbit that crosses each sense once a period half a
 * period apart; a missed crossing costs one more period, and P∘P − r has the sign of P − r.
 */
export const SHOOT_SAMPLE_MAX_STEP_OF_PERIOD = 1 / 4;
export const SHOOT_MAX_STEPS = 100_000;
/** The cycle capture probes the section ray this many window widths past the window (inside the feasible region). */
export const CAPTURE_PROBE_WINDOWS = 1;
/** Halvings locating the section crossing on the interpolant before the final secant step. */
export const SECTION_BISECTION_STEPS = 80;
/**
 * |m − 1| below this: the multiplier alone cannot tell stable from unstable. The trace quadrature
 * is integrated to SHOOT_RELATIVE_TOL (absolute), so m is good to ~1e-10; 1e-8 leaves two digits,
 * and a cycle 1e-7 (relative) past a supercritical Hopf point (m ≈ 1 − 4πμ/ω) is still told stable.
 */
export const NEUTRAL_MULTIPLIER_TOL = 1e-8;
/** Offset (scaled) of the central difference for the return map's slope: the cross-check of the multiplier. */
export const RETURN_SLOPE_OFFSET = 1e-6;
/** Return-map offsets (scaled) used to tell a family of closed orbits from a semi-stable orbit. */
export const FAMILY_PROBE = 1e-3;
/** Ends of the section ray that count as a genuine return (not the start) after this fraction of the guess period. */
export const MIN_RETURN_FRACTION = 0.2;
/** Points stored per orbit, evenly in time: enough to draw it smoothly. */
export const ORBIT_SAMPLES = 240;
/**
 * A solved cycle's capture on its section is probed at offsets from its fixed point growing
 * geometrically (doubling) from this fraction of its radius, until a probe fails: ten or so
 * returns per side.
 */
export const CYCLE_CAPTURE_FIRST_OFFSET = 1 / 64;
/** Halvings that place the edge of a family of closed orbits between its last passing and first failing probe: 2^-16 of the gap. */
export const FAMILY_EDGE_BISECTIONS = 16;
/**
 * A trajectory still undecided at its horizon (or recurring without being a periodic orbit) is
 * followed on, each stretch twice the last, this many times: to 2^4 = 16 horizons in all. A spiral
 * into a weakly damped focus takes ln(r0 / r_capture) / |Re λ|, which a scenario's horizon often
 * falls short of by a few times; a known cycle ends it as soon as it crosses the cycle's capture.
 */
export const FATE_HORIZON_DOUBLINGS = 4;
/** ... within this many accepted steps over all the extensions together (one trajectory's worth). */
export const FATE_EXTENSION_MAX_STEPS = TRAJECTORY_MAX_STEPS;
/**
 * The section scan samples each focus's return map at radii growing by this factor (from
 * CYCLE_MIN_EXTENT to the window's edge, about 13 returns): two cycles nested closer than that
 * share a bracket and are left to the trajectories. The scan runs at every outcome point of the
 * parameter studies and maps, hundreds of times.
 */
export const CYCLE_SCAN_RATIO = 2;
/**
 * Returns spent looking for a band of inward returns between the last outward one and the first
 * radius that does not return (flow/scan.ts): 12 halvings of a factor-2 gap resolve a band of
 * 1/4096 of the radius, about 1e-5 of the window for a cycle of a tenth of it.
 */
export const CYCLE_EDGE_BISECTIONS = 12;
/** Two solved orbits are one when their periods agree to this, relatively ... */
export const SAME_CYCLE_PERIOD_TOL = 1e-6;
/** ... and their extents to this fraction of the window. */
export const SAME_CYCLE_EXTENT_TOL = 1e-5;

// ── separatrices ────────────────────────────────────────────────────────────────────────────

/**
 * Offset from the saddle along the eigenvector, as a fraction of the window: small enough that
 * the linear approximation holds (error ~ offset², here 1e-12), large enough to leave in a few
 * dozen e-foldings.
 */
export const MANIFOLD_OFFSET = 1e-6;
/** Separatrices are drawn from their step points: at least this many steps over the horizon keep the curve smooth. */
export const MANIFOLD_MIN_STEPS = 4000;

// ── basins ──────────────────────────────────────────────────────────────────────────────────

export const DEFAULT_BASIN_OPTIONS: BasinOptions = {
  resolution: DEFAULT_BASIN_RESOLUTION,
  coarse: DEFAULT_BASIN_COARSE,
};
/**
 * Basin labels need the attractor reached, not an accurate path: 1e-7 relative and 1e-9 of the
 * window keep every label decided by the verified capture regions.
 */
export const BASIN_RELATIVE_TOL = 1e-7;
export const BASIN_ABSOLUTE_TOL_OF_WIDTH = 1e-9;
/**
 * A stable cycle with no capture probed on its section (CycleResult.capture null) still labels a
 * basin start whose crossing of its section lies this close (scaled) to its fixed point: the
 * multiplier (< 1) makes the return map contract there, and 1e-3 is far inside the reach of its
 * linear part for any cycle larger than CYCLE_MIN_EXTENT (never more than half the radius).
 */
export const CYCLE_CAPTURE_RADIUS = 1e-3;
/** The kernel's first step, as a fraction of the shorter of the horizon and the flow's time scale. */
export const BASIN_INITIAL_STEP_OF_TIMESCALE = 1e-3;
/** Accepted steps per basin trajectory (as TRAJECTORY_MAX_STEPS). */
export const BASIN_MAX_STEPS = TRAJECTORY_MAX_STEPS;
/** Steps allowed outside the window to tell a blow-up from a plain exit. */
export const BASIN_MAX_STEPS_OUTSIDE = 2_000;
/** Step size control of the Dormand–Prince pair (Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed., II.4): safety factor, growth and shrink limits, and exponent −1/5. */
export const STEP_SAFETY = 0.9;
export const STEP_MAX_GROWTH = 5;
export const STEP_MIN_SHRINK = 0.2;
export const STEP_ERROR_EXPONENT = -0.2;
/** A step whose error estimate is NaN is retried this much shorter ... */
export const NAN_STEP_SHRINK = 0.25;
/** ... until it is below this: then the right-hand side is not finite nearby and the start is undecided. */
export const KERNEL_MIN_STEP = 1e-300;

// ── continuation ────────────────────────────────────────────────────────────────────────────

/** Step lengths in scaled arclength: a first step and a longest one that draw a smooth diagram, an angle that follows turns. */
export const DEFAULT_STEP_OPTIONS: StepOptions = {
  initialStep: 0.005,
  maxStep: 0.02,
  minStep: 1e-9,
  maxAngle: 0.15,
  windowMargin: 0.25,
  maxSteps: 4000,
};
/** Evenly spaced seed values across the range, besides the nominal one. */
export const CONTINUATION_SEED_VALUES = 5;
/** At most this many branches are continued (a guard against a curve of equilibria). */
export const CONTINUATION_MAX_BRANCHES = 40;
/** Newton iterations per corrector while continuing a branch; more means the step was too long. */
export const CORRECTOR_ITERATIONS = 8;
/** Step grows by this factor after an easy corrector (at most this many iterations)... */
export const GROW = 1.5;
export const EASY_ITERATIONS = 2;
/** ...and shrinks after a hard one (at least this many). */
export const SHRINK = 0.7;
export const HARD_ITERATIONS = 5;
/** A corrector that moved further than this fraction of the step has likely jumped to another branch. */
export const MAX_CORRECTION = 0.3;
/** A branch has closed when it returns within one step of its seed after at least this many steps ... */
export const CLOSE_MIN_STEPS = 10;
/** ... and more than this many step lengths of travel (so the seed's own neighbourhood does not count). */
export const CLOSE_MIN_TRAVEL_STEPS = 3;
/** Floor of the on-branch tolerance (scaled): a polygon of tiny steps still gets a tolerance above location error. */
export const ON_BRANCH_MIN_TOL = 1e-6;
/** Offset (scaled) from a branch point at which the crossing branch is sought. */
export const SWITCH_OFFSET = 1e-2;
/** Corrector stops when its scaled Newton step is this small: quadratic convergence leaves ~1e-22. */
export const CORRECTOR_STEP_TOL = 1e-11;
/** A corrector step longer than this (scaled) has left the basin of the branch being followed. */
export const CORRECTOR_MAX_JUMP = 0.5;
/**
 * Where the corrector's matrix is singular (at a branch point itself, hit exactly by an
 * interpolated trial point on a straight branch), a point whose scaled residual is this small is
 * an equilibrium to rounding: a few hundred ulps of the terms, far below ROOT_RESIDUAL_TOL.
 */
export const CORRECTOR_ROUNDING_RESIDUAL = 1e-13;
/** Rows of [J | f_p] this close to parallel (|r0 × r1| / (|r0||r1|)) leave no unique tangent. */
export const RANK_TOL = 1e-10;
/** A unit tangent whose parameter component is below this is vertical in p: its orientation comes from its largest component. */
export const TANGENT_P_ZERO_TOL = 1e-12;
/** Newton iterations per corrector while locating; near a branch point convergence is slow. */
export const LOCATE_ITERATIONS = 30;
/**
 * Bracket width (scaled arclength) at which location stops: 1e-13 of the range width in p, so
 * 1e-10 relative wherever |p| is above 1e-3 of the range width, with three digits to spare.
 */
export const LOCATE_TOL = 1e-13;
export const LOCATE_MAX_ITERATIONS = 200;
/** Rounding limits how finely s can be resolved: a few ulps of the largest scaled coordinate. */
export const LOCATE_ULPS = 8 * Number.EPSILON;
/** Along-branch offset (scaled arclength) at which the types on either side are read: far above the location error (1e-13), far below the spacing of distinct events. */
export const SIDE_OFFSET = 1e-5;
/**
 * l1 is called zero when it is this small against the sum of the magnitudes of its three terms:
 * the derivatives are exact symbolic values at a point located to ~1e-13, so cancellation noise
 * stays near 1e-12 of the terms; 1e-8 keeps four digits of margin (as CLASSIFY_REL_TOL).
 */
export const LYAPUNOV_REL_TOL = 1e-8;
/**
 * The branch of cycles born at a Hopf point (parameters/cycle-branch.ts): its first orbit is
 * sought this fraction of the range from the Hopf value (the amplitude grows as the square root of
 * the distance, so the orbit is already well above an equilibrium's neighbourhood there), then
 * one orbit every CYCLE_BRANCH_STEP of the range (40 across it: a smooth amplitude curve), at most
 * CYCLE_BRANCH_MAX_POINTS of them.
 */
export const CYCLE_BRANCH_FIRST_OFFSET = 2e-3;
export const CYCLE_BRANCH_STEP = 1 / 40;
export const CYCLE_BRANCH_MAX_POINTS = 41;
/** Scaled radii the first orbit's shooting starts from, smallest first (later orbits start from the previous one). */
export const CYCLE_BRANCH_RADII = [0.02, 0.05, 0.1, 0.2];
/** A point within this fraction of the window width of a state bound lies on it (covers location near a branch point, ~1e-8). */
export const BOUND_CONTACT_TOL = 1e-7;
/**
 * A branch crosses a bound only transversally: the component of its unit (scaled) tangent across
 * the bound must be at least this at the crossing. A branch lying on the bound (an invariant axis,
 * with corrector noise of 1e-40 about it) has a component at rounding level; one that truly
 * crosses has a component of the order of its slope, far above this.
 */
export const BOUND_TRANSVERSAL_TOL = 1e-6;
/**
 * Two located points are one threshold when they agree to this (scaled) in every coordinate. On
 * a branch crossing another, the corrector stops converging near the crossing, so what that
 * branch locates there is good to ~1e-6 only; the branch lying on the bound locates it exactly.
 */
export const DUPLICATE_TOL = 1e-4;
/** A located point passes verification when its test function is this small against its scale (as CLASSIFY_REL_TOL). */
export const TEST_FUNCTION_TOL = CLASSIFY_REL_TOL;
/** Neighbourhood (scaled) in which a crossing branch must reach both sides of the threshold value. */
export const CROSSING_NEIGHBOURHOOD = 0.05;
/**
 * A branch point is across a bound when the vanishing eigenvalue belongs to the state at the
 * bound (J_kk ≈ 0: that population's growth rate there, its invasion rate). The point is located
 * to ~1e-6 at worst (DUPLICATE_TOL), so J_kk is then ~1e-6 of the Jacobian's size; a rate that is
 * not at zero is of the order of it.
 */
export const ACROSS_BOUND_TOL = 1e-4;

// ── invasion ────────────────────────────────────────────────────────────────────────────────

/**
 * Highest degree of a resident's numerator handled: a quadratic per-capita rate times the
 * resident itself (f_j = x_j g_j, g_j quadratic, as with an Allee effect) is a cubic with a root at 0.
 */
export const MAX_POLYNOMIAL_DEGREE = 3;
/** Agreement of a closed-form root with a numerical value, relative to the window. */
export const ROOT_MATCH_REL_TOL = 1e-7;
/** The numerical screen agrees with an exact form to this, relatively (rounding only). */
export const FORM_SCREEN_REL_TOL = 1e-8;
/** Parameter values of the screen, as multiples of the nominal value (of 1 when that is 0). */
export const FORM_SCREEN_FACTORS = [1, 1.7, 0.45, 2.9];
/** At a threshold the rate vanishes to rounding, against the rate's size at the nominal values. */
export const THRESHOLD_CHECK_REL_TOL = 1e-9;

// ── assumptions ─────────────────────────────────────────────────────────────────────────────

/** Samples per range in the search for where a condition flips. */
export const FLIP_SAMPLES = 400;
/** Bisection of a flip: as EDGE_BISECTION_MAX_ITERATIONS, adjacency of the bracket stops it first. */
export const FLIP_BISECTION_MAX_ITERATIONS = 200;
/** A condition's flip coincides with a located threshold when they agree to this, relatively. */
export const ASSUMPTION_MATCH_TOL = 1e-6;

// ── parameters & checks (outcomes, studies, maps, claims) ───────────────────────────────────

// An outcome away from the nominal values is decided exactly as the nominal one (the main
// equilibrium search, the fate rules, the scenarios' horizons): a coarser search or a looser rule
// there puts breaks where none are.

/** Path points a scenario keeps while its outcome is decided: the fate is read, not the path. */
export const OUTCOME_PATH_POINTS = 16;
/**
 * Outcome samples across each range (OUTCOME_SAMPLES + 1 values, both ends included), besides the
 * current value and the located thresholds' sides: catches changes no local bifurcation marks.
 * Twelve missed fate switches a few percent of the range from a transcritical.
 */
export const OUTCOME_SAMPLES = 24;
/**
 * Gaps beside a change (a break, a decision limit, a threshold's sides) are halved and searched
 * this many times, down to 1/16 of a sample interval: fate switches come in company (beside a
 * transcritical, or one separatrix after another), and two in one gap cancel out.
 */
export const OUTCOME_REFINE_LEVELS = 4;
/** A break found between samples is bisected on the outcome itself to this fraction of the range. */
export const SWITCH_LOCATE_TOL = 1e-6;
/**
 * The outcome on each side of a located threshold is read at least this fraction of the range
 * away from it: nearer, the linearisation does not decide (CLASSIFY_REL_TOL), and breaks are located no
 * finer anyway. The current value this near a break sits on it.
 */
export const THRESHOLD_SIDE_OFFSET = SWITCH_LOCATE_TOL;
/**
 * ... and up to this many decades farther, until the next decade out confirms it: where two
 * equilibria about to meet are within DEDUP_REL_TOL of the window they are one, and the outcome
 * read there is neither side's (a transcritical on a wide window: 1e-6 of the range was not enough).
 */
export const THRESHOLD_SIDE_DECADES = 3;
/**
 * Outcome evaluations one study may spend on locating breaks; past it, the changes left are
 * reported as unresolved (a limit, not a break) with a diagnostic. A study needs a few hundred.
 */
export const OUTCOME_EVALUATION_BUDGET = 4000;
/**
 * A break or claimed value within this fraction of the range from zero is at zero: a margin or a
 * difference is then given in the parameter's unit, not as a percentage of a value that is zero
 * to the location's accuracy.
 */
export const ZERO_VALUE_TOL = SWITCH_LOCATE_TOL;
/**
 * A claimed threshold value of zero has no relative difference: the claim's tolerance is read
 * against this fraction of the parameter's range width instead (all of it: "within 1 %" of a
 * threshold at zero means within 1 % of the range).
 */
export const CLAIM_ZERO_SCALE_OF_RANGE = 1;
/** A numerical and a symbolic threshold are the same threshold when they agree to this, relatively. */
export const SYMBOLIC_MATCH_TOL = 1e-6;
/** ... or, for a symbolic threshold at zero, to this fraction of the range (ZERO_VALUE_TOL). */
export const SYMBOLIC_MATCH_ZERO_TOL = ZERO_VALUE_TOL;
/**
 * Outcome-map cells per parameter axis at the finest level of the refinement: fine enough to show
 * the shape of each outcome region and where its edge runs.
 */
export const MAP_RESOLUTION = 48;
/**
 * Cells per axis of the map's first, uniform pass: an outcome region narrower than a coarse cell
 * that no coarse centre samples and no threshold curve crosses can be missed (a region that a
 * local bifurcation bounds is refined along its traced curve).
 */
export const MAP_COARSE = 6;
/** Map points per worker task: a few tenths of a second of work, against a millisecond of messaging. */
export const MAP_POINTS_PER_TASK = 16;
/** condition-decides: sample points whose condition sides agree to this, relatively, are too close to call and skipped. */
export const CONDITION_MARGIN_TOL = 1e-3;
/** Bases of the Halton sequence that samples the parameter ranges, one prime per ranged parameter (reused beyond 16). */
export const HALTON_PRIMES = [2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41, 43, 47, 53];

// Continuation of the outcome maps' threshold curves (parameters/curves.ts).

/** Steps of threshold-curve continuation across the second parameter's range, each way from the start. */
export const CURVE_STEPS = 60;
/** Newton iterations per curve point: the linear predictor starts within a few iterations of it. */
export const CURVE_NEWTON_ITERATIONS = 25;
/** Newton on the defining system converges when the scaled step is below this. */
export const CURVE_STEP_TOL = 1e-12;
/** A curve may run this fraction of the first parameter's range beyond it before continuation stops. */
export const CURVE_RANGE_SLACK = 0.05;
/** On a bound, a state is on its invariant axis when its own derivative is this small against the other's (plus an underflow floor). */
export const ON_AXIS_REL_TOL = 1e-12;
export const ON_AXIS_ABS_FLOOR = 1e-300;

/**
 * Step-size control of the Rosenbrock (RODAS) integrator, as in Hairer and Wanner, Solving ODEs
 * II, 2nd ed., §IV.8 (the usual values, from memory): safety factor on the predicted step; the
 * largest growth and smallest shrink per step keep the controller from oscillating; a step whose
 * stage matrix I/(hγ) − J is singular is retried a quarter as long (common practice).
 */
export const ROSENBROCK_SAFETY = 0.9;
export const ROSENBROCK_MAX_GROWTH = 6;
export const ROSENBROCK_MIN_SHRINK = 0.2;
export const ROSENBROCK_SINGULAR_SHRINK = 0.25;

/**
 * integrateFlow's stiffness switch (numeric/stiff-switch.ts). odex's step has collapsed when
 * STIFF_WINDOW_STEPS accepted steps in a row advance less than one longest step (the caller's
 * maxStep, a fixed fraction of its horizon or period: the flow's time scale as the caller sees
 * it); at that pace a follower's horizon (64 longest steps) would take 65 000 steps. A window
 * this long lets a brief collapse (a corner, a fast transient crossed in a few hundred steps)
 * pass, and costs a stiff run 1024 of its 200 000 steps.
 */
export const STIFF_WINDOW_STEPS = 1024;
/**
 * The collapse is stiffness when the directed field's most negative eigenvalue real part times
 * that time scale reaches this: odex's extrapolated midpoint steps are held to h·|Re λ| of a few
 * units by stability (its real stability interval; from memory), so a pace of 1/1024 of the time
 * scale per step is what stability alone imposes at |Re λ| · time scale ≈ 1000. Below, the step
 * shrank for another reason (a fast rotation, a near-singular field, a blow-up) that an implicit
 * method would not cure.
 */
export const STIFFNESS_RATIO = 1000;
/**
 * The tightest relative tolerance RODAS is run at; a tighter request (shooting asks 1e-12) has
 * both tolerances scaled up to it. RODAS is of order 4, so its steps grow as tol^(-1/4) where
 * odex's grow far more slowly: at 1e-12 one relaxation period of van der Pol at mu = 1000 takes
 * over 100 000 steps (shooting's whole budget), at 1e-10 about 10 000, and the period and return
 * point still agree to 1e-11 of the window (measured on that orbit).
 */
export const RODAS_MIN_RELATIVE_TOL = 1e-10;
/** RODAS's first step when odex handed over before accepting one: the controller grows it sixfold a step. */
export const RODAS_FIRST_STEP_OF_SCALE = 1e-6;
/**
 * Central-difference step for a quadrature's gradient in RODAS's Jacobian, relative to the state
 * (or to atol/rtol, where the absolute tolerance takes over): the cube root of the double's
 * epsilon balances the h² truncation against rounding (common practice).
 */
export const QUADRATURE_GRADIENT_STEP = Math.cbrt(2 ** -52);

import type { EquilibriumResult } from "../../analysis/types.js";

/**
 * keel's visual code: one place for every colour, dash pattern, marker and font a figure uses.
 *
 * Colours are our own. Each line colour has its own lightness (CIELAB L*, listed beside it), so
 * the roles stay apart when printed in grey, and pairs that meet in one figure also differ in
 * hue along the blue–orange axis that red–green colour blindness keeps. Every role that has to be
 * told apart without colour also differs in dash pattern, width or marker shape.
 * tests/report/figures.test.ts checks lightness steps, contrast and colour-blind simulations.
 */

/** Text, axes, equilibrium outlines (L* 12). */
export const INK = "#1f1d2b";
export const PAPER = "#ffffff";
/** Plot frame and axis ticks: quieter than the data (L* 56). */
export const FRAME = "#85838c";

export interface LineStyle {
  color: string;
  /** px */
  strokeWidth: number;
  /** SVG dash array in px; empty: solid. */
  strokeDash: number[];
  /** What the legend says this line is. */
  label: string;
}

/** The two nullclines: blue long dashes for the first state, orange dots for the second. */
export const NULLCLINE_STYLES: readonly [Omit<LineStyle, "label">, Omit<LineStyle, "label">] = [
  { color: "#2663b0", strokeWidth: 2, strokeDash: [9, 4] }, // L* 42
  { color: "#c47f12", strokeWidth: 2.4, strokeDash: [2, 3] }, // L* 59
];

export const LINE_STYLES = {
  /** The scenario trajectories the dossier is about: the darkest and widest lines (L* 26). */
  scenario: { color: "#3d2c8d", strokeWidth: 2.4, strokeDash: [], label: "scenario trajectory" },
  /** Portrait trajectories: context only, light grey and thin (L* 81). */
  portrait: { color: "#c6c9d0", strokeWidth: 1, strokeDash: [], label: "other trajectories" },
  /** The saddles' stable manifolds: the separatrices between basins, solid (L* 36). */
  stableManifold: {
    color: "#9c2759",
    strokeWidth: 2.2,
    strokeDash: [],
    label: "stable manifold (separatrix)",
  },
  /** The saddles' unstable manifolds: lighter and dash-dotted (L* 56). */
  unstableManifold: {
    color: "#d4607f",
    strokeWidth: 1.6,
    strokeDash: [6, 2, 2, 2],
    label: "unstable manifold",
  },
  /** An attracting periodic orbit: solid teal (L* 48). */
  cycleStable: { color: "#15806c", strokeWidth: 2.6, strokeDash: [], label: "periodic orbit, attracting" },
  /** A periodic orbit that does not attract (unstable, semi-stable, or one of a family): dashed teal. */
  cycleOther: {
    color: "#15806c",
    strokeWidth: 2.2,
    strokeDash: [5, 3],
    label: "periodic orbit, not attracting",
  },
  /** The trace–determinant parabola τ² = 4Δ. */
  parabola: { color: "#2663b0", strokeWidth: 1.6, strokeDash: [], label: "τ² = 4Δ" },
  /** Reference lines τ = 0, Δ = 0 and equilibrium levels in time series. */
  reference: { color: FRAME, strokeWidth: 1, strokeDash: [3, 3], label: "reference" },
} as const satisfies Record<string, LineStyle>;

/** Direction-field arrows: mid grey, thin (L* 59). */
export const FIELD_STYLE = { color: "#8a8f99", strokeWidth: 1, label: "direction of flow" } as const;

/**
 * Custom symbol paths (vega scales them from the square [-1, 1]²; angle 0 points up).
 * The field arrow is open (stroke only) so hundreds of them stay light; the trajectory head is a
 * filled, notched arrowhead.
 */
export const FIELD_ARROW_PATH = "M0,1L0,-1M-0.42,-0.45L0,-1L0.42,-0.45";
export const ARROWHEAD_PATH = "M0,-1L0.75,0.85L0,0.35L-0.75,0.85Z";
/** Field arrow symbol size (vega area units: side² of the bounding square). */
export const FIELD_ARROW_SIZE = 130;
export const ARROWHEAD_SIZE = 110;
/** Scenario start: a filled diamond in the scenario colour (no equilibrium uses a diamond). */
export const START_MARKER = { shape: "diamond", size: 80 } as const;

/** The start marker of a path drawn in `color`. */
export const startMarker = (color: string): Omit<MarkerStyle, "label"> => ({
  ...START_MARKER,
  angle: 0,
  fill: color,
  stroke: color,
  strokeWidth: 0,
});

/** A filled arrowhead in `color`, pointing `angle` degrees clockwise from up. */
export const arrowheadMarker = (
  color: string,
  angle: number,
  size = ARROWHEAD_SIZE,
): Omit<MarkerStyle, "label"> => ({
  shape: ARROWHEAD_PATH,
  angle,
  fill: color,
  stroke: color,
  strokeWidth: 0,
  size,
});

/** A direction-field arrow pointing `angle` degrees clockwise from up. */
export const fieldArrowMarker = (angle: number): Omit<MarkerStyle, "label"> => ({
  shape: FIELD_ARROW_PATH,
  angle,
  fill: "transparent",
  stroke: FIELD_STYLE.color,
  strokeWidth: FIELD_STYLE.strokeWidth,
  size: FIELD_ARROW_SIZE,
});

/** How an equilibrium is drawn: four classes, each its own shape and fill, so no colour is needed. */
export type EquilibriumClass = "stable" | "unstable" | "saddle" | "non-hyperbolic";

export interface MarkerStyle {
  /** vega symbol shape name. */
  shape: string;
  /** degrees clockwise */
  angle: number;
  fill: string;
  stroke: string;
  strokeWidth: number;
  /** vega area units */
  size: number;
  label: string;
}

export const EQUILIBRIUM_MARKERS: Record<EquilibriumClass, MarkerStyle> = {
  // filled disc: the trajectories around end here
  stable: {
    shape: "circle",
    angle: 0,
    fill: INK,
    stroke: INK,
    strokeWidth: 1.2,
    size: 110,
    label: "stable equilibrium",
  },
  // open square: a source
  unstable: {
    shape: "square",
    angle: 0,
    fill: PAPER,
    stroke: INK,
    strokeWidth: 1.8,
    size: 100,
    label: "unstable equilibrium",
  },
  // an X: two manifolds cross here
  saddle: {
    shape: "cross",
    angle: 45,
    fill: INK,
    stroke: PAPER,
    strokeWidth: 0.8,
    size: 190,
    label: "saddle",
  },
  // open triangle: the linearisation does not decide (zero eigenvalue, or a centre)
  "non-hyperbolic": {
    shape: "triangle-up",
    angle: 0,
    fill: PAPER,
    stroke: INK,
    strokeWidth: 1.8,
    size: 120,
    label: "non-hyperbolic (undecided)",
  },
};

export const EQUILIBRIUM_CLASSES: readonly EquilibriumClass[] = [
  "stable",
  "unstable",
  "saddle",
  "non-hyperbolic",
];

/** Saddles first (they are hyperbolic by definition), then anything the linearisation does not decide. */
export function classifyForDrawing(
  e: Pick<EquilibriumResult, "type" | "hyperbolic" | "stable">,
): EquilibriumClass {
  if (e.type === "saddle") return "saddle";
  if (!e.hyperbolic || e.stable === null) return "non-hyperbolic";
  return e.stable ? "stable" : "unstable";
}

export const FONT_FAMILY = "DejaVu Sans, sans-serif";
/** px, fixed so every figure prints alike. */
export const FONT_SIZE = { tick: 10, axisTitle: 11, legend: 10, annotation: 10, regionLabel: 10 } as const;

/**
 * Figure sizes in px. Every figure comes out about 620 px wide: at 96 px per inch that is
 * 164 mm, inside the text width of A4 and of US letter with 2 cm margins.
 */
export const FIGURE_WIDTH = 620;
export const PORTRAIT_PLOT = { width: 370, height: 380 } as const;
export const KEY_WIDTH = 160;
export const TIME_PANEL = { width: 540, height: 165 } as const;
export const TRACE_DETERMINANT_PLOT = { width: 370, height: 320 } as const;

/** vega-lite config shared by every figure: fonts, quiet axes, no ARIA text (figures carry captions instead). */
export function figureConfig(): Record<string, unknown> {
  return {
    font: FONT_FAMILY,
    background: PAPER,
    aria: false,
    view: { stroke: FRAME, strokeWidth: 1 },
    axis: {
      grid: false,
      domain: false,
      tickColor: FRAME,
      labelColor: INK,
      titleColor: INK,
      labelFontSize: FONT_SIZE.tick,
      titleFontSize: FONT_SIZE.axisTitle,
      titleFontWeight: "normal",
      labelFont: FONT_FAMILY,
      titleFont: FONT_FAMILY,
    },
    text: { font: FONT_FAMILY, fontSize: FONT_SIZE.annotation, color: INK },
    concat: { spacing: 14 },
  };
}

/**
 * Region fills for basin and outcome maps: light (L* 67 to 91), so the lines and markers drawn
 * over them keep their contrast, and each its own lightness, at least 5.8 L* from every other
 * fill below (the special greys included), so neighbouring regions part in grey-scale print.
 * Hues alternate between the blue and orange ends of the axis that red–green colour blindness
 * keeps. The first two, the most common pair, are 12 L* apart.
 */
export const REGION_FILLS = [
  "#cde9fe", // L* 91, pale blue
  "#f0b982", // L* 79, sand orange
  "#a1e1d0", // L* 85, pale teal
  "#bfacd2", // L* 73, lilac
  "#aea564", // L* 67, olive
] as const;

/**
 * Basin outcomes that are not attractors, in neutral greys: leaving the window near white (no
 * attractor in view), blow-up and undecided darker, as cells that call for attention.
 */
export const SPECIAL_REGION_FILLS: Record<string, string> = {
  "left-window": "#f6f6f6", // L* 97
  "blow-up": "#939393", // L* 61
  undecided: "#848484", // L* 55
};

/** A fill's sample in a key: a landscape rectangle (no equilibrium marker has that shape), outlined so the palest fill shows. */
export const SWATCH_PATH = "M-1,-0.62L1,-0.62L1,0.62L-1,0.62Z";
export const SWATCH_SIZE = 190;

/** Branches of equilibria in a bifurcation diagram: stability told by dash and width as well as lightness. */
export const BRANCH_STYLES = {
  stable: { color: "#23395b", strokeWidth: 2.4, strokeDash: [], label: "stable equilibria" }, // L* 24
  unstable: {
    color: "#5b7fb8",
    strokeWidth: 1.7,
    strokeDash: [7, 4],
    label: "unstable equilibria (saddle or source)",
  }, // L* 53
  undecided: {
    color: FRAME,
    strokeWidth: 1.7,
    strokeDash: [1, 3.5],
    label: "stability not decided by the linearisation",
  },
} as const satisfies Record<string, LineStyle>;

/** The current parameter values: a burnt-orange rule ("now") and, in two-parameter maps, a star (L* 47). */
export const NOMINAL_COLOR = "#b5541c";
export const NOMINAL_STYLE = {
  color: NOMINAL_COLOR,
  strokeWidth: 1.4,
  strokeDash: [],
  label: "current value (now)",
} as const satisfies LineStyle;
export const NOMINAL_MARKER: MarkerStyle = {
  shape:
    "M0,-1L0.225,-0.31L0.951,-0.309L0.363,0.118L0.588,0.809L0,0.382L-0.588,0.809L-0.363,0.118L-0.951,-0.309L-0.225,-0.31Z",
  angle: 0,
  fill: NOMINAL_COLOR,
  stroke: INK,
  strokeWidth: 0.8,
  size: 230,
  label: "current values (now)",
};

/** Located special points on branches: four shapes that need no colour, none of them an equilibrium marker's. */
export const SPECIAL_POINT_MARKERS: Record<
  "saddle-node" | "transcritical" | "hopf" | "boundary-crossing",
  MarkerStyle
> = {
  // open diamond: two branches meet and end
  "saddle-node": {
    shape: "diamond",
    angle: 0,
    fill: PAPER,
    stroke: INK,
    strokeWidth: 1.6,
    size: 120,
    label: "fold (saddle-node)",
  },
  // bow tie: two branches cross and exchange stability
  transcritical: {
    shape: "M-1,-0.8L1,0.8L1,-0.8L-1,0.8Z",
    angle: 0,
    fill: INK,
    stroke: INK,
    strokeWidth: 0.6,
    size: 120,
    label: "transcritical",
  },
  // ring: a periodic orbit is born
  hopf: { shape: "circle", angle: 0, fill: PAPER, stroke: INK, strokeWidth: 2.2, size: 100, label: "Hopf" },
  // filled down-triangle: the branch passes a bound of the feasible region
  "boundary-crossing": {
    shape: "triangle-down",
    angle: 0,
    fill: INK,
    stroke: INK,
    strokeWidth: 0.6,
    size: 100,
    label: "boundary crossing",
  },
};

/** Threshold curves in outcome maps: one ink colour, told apart by dash pattern alone. */
export const THRESHOLD_CURVE_STYLES: Record<string, LineStyle> = {
  "saddle-node": { color: INK, strokeWidth: 1.8, strokeDash: [9, 3], label: "fold (saddle-node) curve" },
  transcritical: { color: INK, strokeWidth: 1.8, strokeDash: [1, 3.5], label: "transcritical curve" },
  hopf: { color: INK, strokeWidth: 1.8, strokeDash: [9, 3, 1, 3], label: "Hopf curve" },
  "boundary-crossing": { color: INK, strokeWidth: 1.8, strokeDash: [4, 4], label: "boundary-crossing curve" },
};

export const BIFURCATION_PANEL = { width: 370, height: 165 } as const;
export const OUTCOME_MAP_PLOT = { width: 370, height: 340 } as const;

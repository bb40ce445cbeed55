import type { NormalizedSpec } from "../../spec/types.js";
import type { Results } from "../../analysis/types.js";
import { formatNumberTex, formatUnit } from "../format.js";
import { renderMath } from "../math.js";

/** A rendered figure as the templates need it. */
export interface FigureView {
  id: string;
  number: number;
  title: string;
  caption: string;
  /** Inline SVG markup (trusted: produced by our renderer). */
  svg: string;
}

export interface RenderOptions {
  paper: "a4" | "letter";
  /** Seconds since the epoch: SOURCE_DATE_EPOCH when set, else the build's clock (injected by the CLI). */
  dateEpoch: number;
  /** Wall time of the analysis in seconds, or null for reproducible builds. */
  runSeconds: number | null;
  nodeVersion: string;
  libraries: Record<string, string>;
}

/** What every section's view builder reads. */
export interface ViewInput {
  spec: NormalizedSpec;
  results: Results;
  /** The figure with this id, numbered in reading order, or null when it was not drawn. */
  figure: (id: string) => FigureView | null;
  options: RenderOptions;
}

export const m = (tex: string, display = false) => renderMath(tex, display);

export function matrixTex(rows: string[][]): string {
  return `\\begin{pmatrix} ${rows.map((r) => r.join(" & ")).join(" \\\\ ")} \\end{pmatrix}`;
}

export const numberTex = (v: number, digits = 5) => formatNumberTex(v, digits);

export { gridSize } from "../words/index.js";

/**
 * Coordinates smaller than this fraction of the window's width are printed as 0: an integrator
 * leaves residues like 6e-20 on an axis, far below the 6 significant digits any number here
 * shows of window-scale values.
 */
const SNAP_TO_ZERO = 1e-10;

export function snapToZero(spec: NormalizedSpec, point: Record<string, number>): Record<string, number> {
  return Object.fromEntries(
    Object.entries(point).map(([k, v]) => {
      const w = spec.window[k];
      return [k, w && Math.abs(v) < SNAP_TO_ZERO * Math.abs(w[1] - w[0]) ? 0 : v];
    }),
  );
}

/** Figures numbered in the order the templates print them, so Figure 3 follows Figure 2. */
export function numberFiguresInReadingOrder(figures: FigureView[], results: Results): FigureView[] {
  const order = [
    "trace-determinant",
    "portrait",
    ...results.scenarios.map((s) => `timeseries-${s.name}`),
    ...(results.basins.attractors.length > 0 ? ["basins"] : []),
    ...results.conditions.studies.map((st) => `bifurcation-${st.parameter}`),
    ...results.conditions.maps.map((mp) => `outcome-map-${mp.parameters[0]}-${mp.parameters[1]}`),
  ];
  const printed = order
    .map((id) => figures.find((f) => f.id === id))
    .filter((f): f is FigureView => f !== undefined);
  const rest = figures.filter((f) => !printed.includes(f));
  // captions name units as the spec writes them (g/m^2); print their powers as superscripts
  return [...printed, ...rest].map((f, k) => ({ ...f, number: k + 1, caption: formatUnit(f.caption) }));
}

import type { Results, ScenarioResult } from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { formatNumber } from "../format.js";
import { fateWords, pointWords } from "../words.js";
import type { VegaLiteSpec } from "./layers.js";
import { buildPortraitFigure, type FieldInput, type NullclineInput } from "./portrait.js";
import { buildTimeSeriesFigure } from "./timeseries.js";
import { buildTraceDeterminantFigure, placeOnTraceDeterminant, SPREAD_LIMIT } from "./traceDeterminant.js";

/**
 * Results → figures. Every builder is pure: it reads Results (and the spec for labels and
 * units) and returns a vega-lite spec as plain JSON with inline data; render/svg.ts draws it.
 */
export interface Figure {
  /** Stable id: "portrait", "trace-determinant", "timeseries-<scenario name>". */
  id: string;
  title: string;
  /** Plain text (the template escapes it). */
  caption: string;
  spec: VegaLiteSpec;
}

export type { VegaLiteSpec } from "./layers.js";
export type { FieldInput, NullclineInput } from "./portrait.js";

/** The nullclines and direction field the portrait draws; null leaves that part out. */
export interface PortraitExtras {
  nullclines: NullclineInput[] | null;
  field: FieldInput | null;
}

const extrasOf = (results: Results): PortraitExtras => ({ nullclines: results.nullclines ?? null, field: results.field ?? null });

const range = (w: [number, number], unit: string) => `[${formatNumber(w[0])}, ${formatNumber(w[1])}]${unit ? ` ${unit}` : ""}`;

function portraitCaption(results: Results, spec: NormalizedSpec, extras: PortraitExtras): string {
  const [a, b] = spec.states;
  const parts: string[] = [];
  if (extras.nullclines?.some((n) => n.pieces.length)) parts.push(`the nullclines d${a.name}/dt = 0 and d${b.name}/dt = 0`);
  if (extras.field) parts.push(`the direction of the flow on a ${extras.field.nx} × ${extras.field.ny} grid (direction only, not speed)`);
  if (results.scenarios.length) {
    parts.push(`the scenario trajector${results.scenarios.length === 1 ? "y" : "ies"} ${results.scenarios.map((s) => s.name).join(", ")} from their start (diamond), an arrowhead half way along`);
  }
  if (results.trajectories.length) parts.push(`${results.trajectories.length} further trajectories in grey`);
  const saddles = [...new Set(results.separatrices.map((s) => s.saddle))];
  if (saddles.length) parts.push(`the stable manifolds (separatrices) and unstable manifolds of ${saddles.length === 1 ? "the saddle" : "the saddles"} ${saddles.join(", ")}`);
  if (results.cycles.length) parts.push(`the periodic orbit${results.cycles.length === 1 ? "" : "s"} ${results.cycles.map((c) => `${c.id} (${c.stability})`).join(", ")}`);
  if (results.equilibria.length) parts.push(`the equilibria ${results.equilibria.map((e) => e.id).join(", ")}, marked by class`);
  return `Phase portrait over the window ${a.name} in ${range(spec.window[a.name], a.unit)}, ${b.name} in ${range(spec.window[b.name], b.unit)}. ` +
    `Shown: ${parts.join("; ")}. The key explains every colour, dash and marker. ` +
    "Grey trajectories and manifolds are drawn as smooth curves through the integrator's steps; scenario trajectories from its dense output.";
}

function traceDeterminantCaption(results: Results, spec: NormalizedSpec): string {
  const placed = placeOnTraceDeterminant(results.equilibria);
  const regions = "Saddles lie below Δ = 0; above it, nodes lie outside the parabola τ² = 4Δ and foci inside, stable on the left (τ < 0) and unstable on the right; centres sit on τ = 0 above the axis.";
  const radii = placed.points.map((p) => p.radius).filter((r) => r > 0);
  const scale = placed.mode === "linear"
    ? `Both axes are linear, in 1/${spec.timeUnit} and (1/${spec.timeUnit})².`
    : `The equilibria's spectral radii ρ (largest |λ|) differ by a factor of ${formatNumber(Math.max(...radii) / Math.min(...radii), 3)}, more than ${SPREAD_LIMIT}, ` +
      "so each is drawn at (τ/ρ, Δ/ρ²): that keeps it in its region and keeps every point in view; the equilibrium table gives the actual values.";
  return `Trace–determinant diagram: each equilibrium at the trace τ and determinant Δ of its Jacobian. ${regions} ${scale}`;
}

function timeSeriesCaption(results: Results, spec: NormalizedSpec, s: ScenarioResult): string {
  const what = spec.scenarios.find((q) => q.name === s.name)?.label;
  const level = s.fate.kind === "equilibrium" ? ` The dashed level marks ${s.fate.target}.` : "";
  return `Scenario ${s.name}${what ? ` (${what})` : ""}: each state against time from ${pointWords(s.start)}, ` +
    `shown to t = ${formatNumber(s.series.t[s.series.t.length - 1] ?? 0, 4)} ${spec.timeUnit}. The trajectory ${fateWords(s.fate, results, spec.timeUnit)}.${level}`;
}

/** Every figure of the dossier, in the order the dossier shows them. */
export function buildFigures(results: Results, spec: NormalizedSpec, extras: PortraitExtras = extrasOf(results)): Figure[] {
  const figures: Figure[] = [
    {
      id: "trace-determinant",
      title: "Equilibria in the trace–determinant plane",
      caption: traceDeterminantCaption(results, spec),
      spec: buildTraceDeterminantFigure(results, spec),
    },
    {
      id: "portrait",
      title: "Phase portrait",
      caption: portraitCaption(results, spec, extras),
      spec: buildPortraitFigure({ results, spec, ...extras }),
    },
  ];
  for (const s of results.scenarios) {
    figures.push({
      id: `timeseries-${s.name}`,
      title: `Time series of scenario ${s.name}`,
      caption: timeSeriesCaption(results, spec, s),
      spec: buildTimeSeriesFigure(results, spec, s),
    });
  }
  return figures;
}

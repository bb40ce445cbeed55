import type {
  OutcomeMapResult,
  ParameterStudyResult,
  Results,
  ScenarioResult,
} from "../../analysis/types.js";
import type { NormalizedSpec } from "../../spec/types.js";
import { formatNumber, formatPercent } from "../format.js";
import {
  THRESHOLD_KIND_WORDS,
  BASIN_OTHER_WORDS,
  basinLabelWords,
  fateWords,
  outcomeWords,
  stateTerms,
  pointWords,
} from "../words/index.js";
import { BASIN_DRAW_MAX, downsampleBasinGrid, buildBasinFigure } from "./basins.js";
import { buildBifurcationFigure, drawnSpecialPoints } from "./bifurcation.js";
import type { VegaLiteSpec } from "./layers.js";
import { buildOutcomeMapFigure, outcomeLetter } from "./outcomeMap.js";
import { buildPortraitFigure, type FieldInput, type NullclineInput } from "./portrait.js";
import { buildTimeSeriesFigure } from "./timeseries.js";
import { buildTraceDeterminantFigure, placeOnTraceDeterminant, SPREAD_LIMIT } from "./traceDeterminant.js";

/**
 * Results → figures. Every builder is pure: it reads Results (and the spec for labels and
 * units) and returns a vega-lite spec as plain JSON with inline data; render/svg.ts draws it.
 */
export interface Figure {
  /**
   * Stable id: "trace-determinant", "portrait", "basins", "bifurcation-<parameter>",
   * "outcome-map-<parameter>-<parameter>", "timeseries-<scenario name>".
   */
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

const extrasOf = (results: Results): PortraitExtras => ({
  nullclines: results.nullclines ?? null,
  field: results.field ?? null,
});

const range = (w: [number, number], unit: string) =>
  `[${formatNumber(w[0])}, ${formatNumber(w[1])}]${unit ? ` ${unit}` : ""}`;

function portraitCaption(results: Results, spec: NormalizedSpec, extras: PortraitExtras): string {
  const [a, b] = spec.states;
  const parts: string[] = [];
  if (extras.nullclines?.some((n) => n.pieces.length))
    parts.push(`the nullclines d${a.name}/dt = 0 and d${b.name}/dt = 0`);
  if (extras.field)
    parts.push(
      `the direction of the flow on a ${extras.field.nx} × ${extras.field.ny} grid (direction only, not speed)`,
    );
  if (results.scenarios.length) {
    parts.push(
      `the scenario trajector${results.scenarios.length === 1 ? "y" : "ies"} ${results.scenarios.map((s) => s.name).join(", ")} from their start (diamond), an arrowhead half way along`,
    );
  }
  if (results.trajectories.length) parts.push(`${results.trajectories.length} further trajectories in grey`);
  const saddles = [...new Set(results.separatrices.map((s) => s.saddle))];
  if (saddles.length)
    parts.push(
      `the stable manifolds (separatrices) and unstable manifolds of ${saddles.length === 1 ? "the saddle" : "the saddles"} ${saddles.join(", ")}`,
    );
  if (results.cycles.length)
    parts.push(
      `the periodic orbit${results.cycles.length === 1 ? "" : "s"} ${results.cycles.map((c) => `${c.id} (${c.stability})`).join(", ")}`,
    );
  if (results.equilibria.length)
    parts.push(`the equilibria ${results.equilibria.map((e) => e.id).join(", ")}, marked by class`);
  return (
    `Phase portrait over the window ${a.name} in ${range(spec.window[a.name], a.unit)}, ${b.name} in ${range(spec.window[b.name], b.unit)}. ` +
    `Shown: ${parts.join("; ")}. The key explains every colour, dash and marker. ` +
    "Grey trajectories and manifolds are drawn as smooth curves through the integrator's steps; scenario trajectories from its dense output."
  );
}

function traceDeterminantCaption(results: Results, spec: NormalizedSpec): string {
  const placed = placeOnTraceDeterminant(results.equilibria);
  const regions =
    "Saddles lie below Δ = 0; above it, nodes lie outside the parabola τ² = 4Δ and foci inside, stable on the left (τ < 0) and unstable on the right; centres sit on τ = 0 above the axis.";
  const radii = placed.points.map((p) => p.radius).filter((r) => r > 0);
  const scale =
    placed.mode === "linear"
      ? `Both axes are linear, in 1/${spec.timeUnit} and (1/${spec.timeUnit})².`
      : `The equilibria's spectral radii ρ (largest |λ|) differ by a factor of ${formatNumber(Math.max(...radii) / Math.min(...radii), 3)}, more than ${SPREAD_LIMIT}, ` +
        "so each is drawn at (τ/ρ, Δ/ρ²): that keeps it in its region and keeps every point in view; the equilibrium table gives the actual values.";
  return `Trace–determinant diagram: each equilibrium at the trace τ and determinant Δ of its Jacobian. ${regions} ${scale}`;
}

const count = (n: number) => n.toLocaleString("en-US");

function basinCaption(results: Results, spec: NormalizedSpec): string {
  const b = results.basins;
  const [a, c] = spec.states;
  const drawn = downsampleBasinGrid(b.grid);
  const computed =
    `computed on a ${b.grid.nx} × ${b.grid.ny} grid by adaptive refinement from ${b.coarse} × ${b.coarse} ` +
    `(${count(b.trajectories)} trajectories instead of ${count(b.uniformTrajectories)})`;
  const drawing =
    drawn.factor === 1
      ? "drawn cell for cell"
      : `drawn at ${drawn.nx} × ${drawn.ny} (at most ${BASIN_DRAW_MAX} a side): each drawn cell shows the majority label of the ${drawn.factor} × ${drawn.factor} computed cells it covers, a tie going to the first in the key`;
  const shares = Object.entries(b.fractions)
    .map(
      ([k, v]) =>
        `${b.attractors.includes(k) ? basinLabelWords(results, k) : (BASIN_OTHER_WORDS[k] ?? k)} ${formatPercent(v)}`,
    )
    .join(", ");
  const saddles = [
    ...new Set(results.separatrices.filter((s) => s.manifold === "stable").map((s) => s.saddle)),
  ];
  const over = [
    saddles.length
      ? `the stable manifolds (separatrices) of ${saddles.length === 1 ? "the saddle" : "the saddles"} ${saddles.join(", ")}`
      : null,
    results.cycles.length
      ? `the periodic orbit${results.cycles.length === 1 ? "" : "s"} ${results.cycles.map((q) => q.id).join(", ")}`
      : null,
    results.equilibria.length ? "the equilibria, marked by class" : null,
  ].filter(Boolean);
  return (
    `Basins of attraction over the window ${a.name} in ${range(spec.window[a.name], a.unit)}, ${c.name} in ${range(spec.window[c.name], c.unit)}: ` +
    `each cell is filled by the outcome its centre's trajectory reaches, ${computed}, ${drawing}. ` +
    `Shares of the window: ${shares}; ` +
    (b.errorBound > 0
      ? `each share is within ±${formatPercent(b.errorBound)} of the window (the finest cells that border another label could belong to either side, an undecided cell to any)`
      : "no cell borders another label and none is undecided, so the shares are exact at this resolution") +
    ", and a basin narrower than a coarse cell can be missed." +
    (over.length ? ` Drawn over the fills: ${over.join("; ")}.` : "")
  );
}

function bifurcationCaption(results: Results, spec: NormalizedSpec, study: ParameterStudyResult): string {
  const p = spec.parameters.find((q) => q.name === study.parameter)!;
  const [a, b] = results.model.states;
  const drawn = new Set(results.model.states.flatMap((s) => drawnSpecialPoints(results, study, s)));
  const marked = study.thresholds.map(
    (t) =>
      `${THRESHOLD_KIND_WORDS[t.kind] ?? t.kind}${t.criticality ? ` (${t.criticality})` : ""} at ${t.parameter} = ${formatNumber(t.value)}` +
      `${t.decisive ? ", where the outcome changes" : ""}${drawn.has(t) ? "" : ", outside the window and not drawn"}`,
  );
  return (
    `Equilibria against ${study.parameter}${p.label && p.label !== p.name ? ` (${p.label})` : ""} across its plausible range ${range(study.range, p.unit)}, ` +
    `the other parameters at their current values: ${a} in the upper panel and ${b} in the lower, on every branch followed by pseudo-arclength continuation ` +
    `(${study.continuation.branches.length} branch${study.continuation.branches.length === 1 ? "" : "es"}). ` +
    "Solid where the equilibrium is stable, dashed where it is unstable, dotted where the linearisation does not decide. " +
    (marked.length
      ? `Marked by kind and labelled with the value: ${marked.join("; ")}. `
      : "No threshold lies in the range. ") +
    (study.continuation.cycles.some((c) => c.points.length)
      ? "Teal lines from a Hopf point: the least and the greatest value of the state over the periodic orbit born there, solid where it attracts, dashed where not. "
      : "") +
    `The vertical line is the current value, ${study.parameter} = ${formatNumber(study.nominal)}. ` +
    "Each panel spans the state's window; branch parts outside the feasible region (infeasible equilibria, such as negative populations) are cut off in every panel."
  );
}

function outcomeMapCaption(results: Results, spec: NormalizedSpec, map: OutcomeMapResult): string {
  const [p1, p2] = map.parameters.map((n) => spec.parameters.find((q) => q.name === n)!);
  const outcomes = map.legend
    .map((o, k) => `${outcomeLetter(k)}, ${outcomeWords(o, stateTerms(spec.states))}`)
    .join("; ");
  const curves = map.curves.map(
    (c) =>
      `${THRESHOLD_KIND_WORDS[c.kind] ?? c.kind} from ${c.origin.parameter} = ${formatNumber(c.origin.value)}`,
  );
  return (
    `Outcome across ${p1.name} in ${range(map.ranges[0], p1.unit)} and ${p2.name} in ${range(map.ranges[1], p2.unit)}, the other parameters at their current values: ` +
    `each of the ${map.nx} × ${map.ny} cells is filled by the outcome (the set of attractors) at its centre, refined from ${map.coarse} × ${map.coarse} along the edges of the regions (${map.evaluations} outcomes evaluated), and lettered in the key and in the largest clear part of each region. Outcomes: ${outcomes}. ` +
    (curves.length
      ? `Lines: the threshold curves continued in the second parameter from the thresholds located one parameter at a time (${curves.join("; ")}), dashed by kind. `
      : "No threshold curve was traced. ") +
    `Star: the current values, ${p1.name} = ${formatNumber(map.nominal[0])}, ${p2.name} = ${formatNumber(map.nominal[1])}.`
  );
}

function timeSeriesCaption(results: Results, spec: NormalizedSpec, s: ScenarioResult): string {
  const what = spec.scenarios.find((q) => q.name === s.name)?.label;
  const level = s.fate.kind === "equilibrium" ? ` The dashed level marks ${s.fate.target}.` : "";
  return (
    `Scenario ${s.name}${what ? ` (${what})` : ""}: each state against time from ${pointWords(s.start)}, ` +
    `shown to t = ${formatNumber(s.series.t[s.series.t.length - 1] ?? 0, 4)} ${spec.timeUnit}. The trajectory ${fateWords(s.fate, results, spec.timeUnit)}.${level}`
  );
}

/** Every figure of the dossier, in the order the dossier shows them. */
export function buildFigures(
  results: Results,
  spec: NormalizedSpec,
  extras: PortraitExtras = extrasOf(results),
): Figure[] {
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
  if (results.basins.attractors.length >= 1) {
    figures.push({
      id: "basins",
      title: "Basins of attraction",
      caption: basinCaption(results, spec),
      spec: buildBasinFigure(results, spec),
    });
  }
  for (const study of results.conditions.studies) {
    if (study.thresholds.length === 0 && study.continuation.branches.length <= 1) continue;
    figures.push({
      id: `bifurcation-${study.parameter}`,
      title: `Equilibria against ${study.parameter}`,
      caption: bifurcationCaption(results, spec, study),
      spec: buildBifurcationFigure(results, spec, study),
    });
  }
  for (const map of results.conditions.maps) {
    const [p1, p2] = map.parameters;
    figures.push({
      id: `outcome-map-${p1}-${p2}`,
      title: `Outcomes across ${p1} and ${p2}`,
      caption: outcomeMapCaption(results, spec, map),
      spec: buildOutcomeMapFigure(spec, map),
    });
  }
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

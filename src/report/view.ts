import type { NormalizedSpec } from "../spec/types.js";
import type { Results } from "../analysis/types.js";
import { nameToTex } from "../model/tex.js";
import { formatDate, formatEigenvalues, formatNumber, formatNumberHtml, formatNumberTex, formatQuantity, formatUnit } from "./format.js";
import { renderMath } from "./math.js";
import { fateWords, pointWords, TYPE_WORDS } from "./words.js";

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

/** Standard cautions, printed in every dossier before the spec's own. */
export const STANDARD_CAUTIONS = [
  "A model simplifies. This dossier describes the behaviour of the model as specified, not of the real system; its conclusions hold only as far as the model's structure, parameter values and assumptions hold.",
  "Decisions about wildlife, fisheries or public health rest with the responsible authority and qualified professionals. This dossier is an input to such decisions, not a decision or a recommendation.",
  "Local laws, regulations and management rules apply and take precedence over anything stated here.",
  "Parameter values carry uncertainty. A conclusion near a threshold can change with small changes in the values; read the margins before relying on an outcome.",
  "Numerical results are computed to stated tolerances. Equilibria are found by a dense deterministic search, not a proof of completeness; a borderline case is reported as undecided rather than guessed.",
];

const m = (tex: string, display = false) => renderMath(tex, display);

const kindWords: Record<string, string> = {
  "saddle-node": "fold (saddle-node)",
  transcritical: "transcritical",
  hopf: "Hopf",
  "boundary-crossing": "boundary crossing",
  "outcome change": "outcome change (no local bifurcation)",
};

function matrixTex(rows: string[][]): string {
  return `\\begin{pmatrix} ${rows.map((r) => r.join(" & ")).join(" \\\\ ")} \\end{pmatrix}`;
}

const numberTex = (v: number, digits = 5) => formatNumberTex(v, digits);

/**
 * Coordinates smaller than this fraction of the window's width are printed as 0: an integrator
 * leaves residues like 6e-20 on an axis, far below the 6 significant digits any number here
 * shows of window-scale values.
 */
const SNAP_TO_ZERO = 1e-10;

/** Figures numbered in the order the templates print them, so Figure 3 follows Figure 2. */
function numberFiguresInReadingOrder(figures: FigureView[], results: Results): FigureView[] {
  const order = [
    "trace-determinant",
    "portrait",
    ...results.scenarios.map((s) => `timeseries-${s.name}`),
    ...(results.basins.attractors.length > 0 ? ["basins"] : []),
    ...results.conditions.studies.map((st) => `bifurcation-${st.parameter}`),
    ...results.conditions.maps.map((mp) => `outcome-map-${mp.parameters[0]}-${mp.parameters[1]}`),
  ];
  const printed = order.map((id) => figures.find((f) => f.id === id)).filter((f): f is FigureView => f !== undefined);
  const rest = figures.filter((f) => !printed.includes(f));
  // captions name units as the spec writes them (g/m^2); print their powers as superscripts
  return [...printed, ...rest].map((f, k) => ({ ...f, number: k + 1, caption: formatUnit(f.caption) }));
}

/** "64 × 64", kept on one line. */
const gridSize = (n: number) => `${n}\u00a0×\u00a0${n}`;

/** The basin pass's method in words, from the settings it recorded (none when it did not run). */
function basinMethod(settings: Record<string, unknown>, timeUnit: string): string[] {
  const b = settings.basins as { resolution?: number; coarse?: number; integrator?: string; relativeTolerance?: number; absoluteToleranceOfWindow?: number; horizon?: number } | undefined;
  if (!b || b.resolution === undefined || b.coarse === undefined) return [];
  return [
    `Basins: a first pass over ${gridSize(b.coarse)} cells, then cells subdivided near basin boundaries up to ${gridSize(b.resolution)}; ` +
      `each cell's trajectory integrated${b.integrator ? ` by ${b.integrator}` : ""}` +
      (b.relativeTolerance !== undefined ? ` at relative tolerance ${formatNumber(b.relativeTolerance)}` : "") +
      (b.absoluteToleranceOfWindow !== undefined ? `, absolute tolerance ${formatNumber(b.absoluteToleranceOfWindow)} of the window` : "") +
      (b.horizon !== undefined ? `, for at most t = ${formatNumber(b.horizon, 4)} ${timeUnit}` : "") + ".",
  ];
}

/** Everything the templates print, formatted; user text stays plain (the template escapes it). */
export function buildDossierView(spec: NormalizedSpec, results: Results, figures: FigureView[], options: RenderOptions) {
  const unitOf = Object.fromEntries(spec.states.map((s) => [s.name, formatUnit(s.unit)]));
  const snap = (point: Record<string, number>) =>
    Object.fromEntries(Object.entries(point).map(([k, v]) => {
      const w = spec.window[k];
      return [k, w && Math.abs(v) < SNAP_TO_ZERO * Math.abs(w[1] - w[0]) ? 0 : v];
    }));
  const numbered = numberFiguresInReadingOrder(figures, results);
  const stateTex = spec.states.map((s) => nameToTex(s.name));
  const equilibria = results.equilibria.map((e) => ({
    id: e.id,
    coordinates: spec.states.map((s) => formatNumberHtml(e.point[s.name])),
    trace: formatNumberHtml(e.trace),
    determinant: formatNumberHtml(e.determinant),
    discriminant: formatNumberHtml(e.discriminant),
    eigenvalues: formatEigenvalues(e.eigenvalues, 5),
    type: TYPE_WORDS[e.type],
    hyperbolic: e.hyperbolic ? "yes" : "no",
    boundary: e.onBoundary ? `on the boundary (${e.boundaryStates.join(", ")} at a bound)` : "interior",
    jacobianMath: m(`J(${e.id}) = ${matrixTex(e.jacobian.map((r) => r.map((v) => numberTex(v))))}`, true),
    undecidedNote: e.hyperbolic ? "" : "The linearisation does not decide this equilibrium's stability; higher-order terms do.",
  }));
  const scenarios = results.scenarios.map((s) => ({
    name: s.name,
    start: pointWords(s.start),
    outcome: fateWords(s.fate, results, spec.timeUnit),
    horizon: `${formatNumber(s.horizon)} ${spec.timeUnit}`,
  }));
  const dotted = (name: string) => `\\frac{d${nameToTex(name)}}{dt}`;
  const parameters = spec.parameters.map((p) => ({
    symbol: m(nameToTex(p.name)),
    name: p.name,
    value: formatNumberHtml(p.value),
    unit: formatUnit(p.unit),
    label: p.label,
    source: p.source,
    range: p.range ? `${formatNumber(p.range[0])} to ${formatNumber(p.range[1])}` : "—",
  }));
  const assumptions = results.assumptions.map((a) => ({
    text: a.text,
    condition: a.tex ? m(a.tex) : "",
    status: a.holds === null ? (a.condition ? "could not be evaluated" : "not machine-checkable") : a.holds ? "holds at the nominal values" : "does not hold at the nominal values",
    detail: a.condition && a.lhs !== null && a.rhs !== null ? `left side ${formatNumber(a.lhs)}, right side ${formatNumber(a.rhs)}` : "",
    flips: a.flips.map((f) => f.nearestThreshold
      ? `flips at ${f.parameter} = ${formatNumber(f.value)}: ${f.coincides ? "coincides with" : "does not coincide with"} the ${kindWords[f.nearestThreshold.kind] ?? f.nearestThreshold.kind} threshold at ${formatNumber(f.nearestThreshold.value)} (relative difference ${formatNumber(f.relativeDifference ?? NaN, 2)})`
      : `flips at ${f.parameter} = ${formatNumber(f.value)}; no threshold of ${f.parameter} was located`),
    holds: a.holds,
  }));
  const cycles = results.cycles.map((c) => ({
    id: c.id,
    period: `${formatNumber(c.period, 6)} ${spec.timeUnit}`,
    stability: c.stability,
    multiplier: formatNumberHtml(c.floquetMultiplier, 6),
    around: c.around,
    extent: spec.states.map((s) => `${s.name}: ${formatNumber(c.extent[s.name][0], 5)} to ${formatNumber(c.extent[s.name][1], 5)}`).join("; "),
  }));
  const separatrices = results.separatrices.map((x) => ({
    saddle: x.saddle,
    manifold: x.manifold === "stable" ? "stable (backward in time)" : "unstable (forward in time)",
    branch: x.branch > 0 ? "+" : "−",
    end: x.end.kind === "equilibrium" || x.end.kind === "cycle" ? `reaches ${x.end.target}`
      : x.end.kind === "left-window" ? `leaves the window through ${x.end.edge} at ${pointWords(snap(x.end.point))}`
      : x.end.kind === "outside-window" ? "points out of the window (not drawn)"
      : `undecided: ${x.end.reason}`,
  }));
  const figure = (id: string) => numbered.find((f) => f.id === id) ?? null;
  const growth = (sign: string) => (sign === "+" ? "grows" : "declines");
  const regions = results.regions.map((r) => ({
    id: r.id,
    signs: spec.states.map((s) => `${s.name} ${growth(r.signs[s.name])}`).join(", "),
    point: pointWords(r.point, 4),
    area: formatNumber(100 * r.areaFraction, 3) + "%",
  }));
  const directionWords = { increasing: "increasing", decreasing: "decreasing", zero: "at rest" } as const;
  const nullclines = results.nullclines.map((n) => ({
    state: n.state,
    math: m(`\\frac{d${nameToTex(n.state)}}{dt} = 0`),
    pieces: n.pieces.map((piece) => ({
      kind: piece.onAxis && piece.axis ? `the line ${piece.axis.state} = ${formatNumber(piece.axis.value)}` : "curve",
      from: pointWords(snap({ [spec.states[0].name]: piece.points[0][0], [spec.states[1].name]: piece.points[0][1] }), 4),
      to: pointWords(snap({ [spec.states[0].name]: piece.points[piece.points.length - 1][0], [spec.states[1].name]: piece.points[piece.points.length - 1][1] }), 4),
      direction: `${piece.otherState} ${directionWords[piece.otherDirection]}`,
      vertices: piece.points.length,
    })),
    maxResidual: formatNumberHtml(n.maxResidual, 2),
  }));
  const c = results.conditions;
  const conditions = {
    show: c.studies.length > 0 || c.invasion.length > 0,
    invasion: c.invasion.map((q) => ({
      equilibrium: q.equilibrium,
      absent: q.absent,
      resident: q.resident ? (q.resident.closedForm ? m(`${nameToTex(q.resident.state)} = ${q.resident.tex}`) : `${q.resident.state} = ${formatNumber(Number(q.resident.text))} (numerical)`) : "—",
      rate: m(`\\lambda = ${q.rate.tex}`),
      value: formatNumberHtml(q.value),
      check: formatNumberHtml(Math.abs(q.value - q.numericEigenvalue), 2),
      invades: q.invades ? `${q.absent} can invade` : `${q.absent} cannot invade`,
      thresholds: q.thresholds.filter((t) => t.value !== 0).map((t) => ({ math: m(`${nameToTex(t.parameter)} ${t.invadesWhen} ${t.tex}`), value: formatNumber(t.value) })),
    })),
    studies: c.studies.map((st) => {
      const param = spec.parameters.find((q) => q.name === st.parameter)!;
      return {
        parameter: st.parameter,
        symbol: m(nameToTex(st.parameter)),
        label: param.label,
        nominal: formatQuantity(st.nominal, param.unit),
        range: `${formatNumber(st.range[0])} to ${formatNumber(st.range[1])}${param.unit ? " " + formatUnit(param.unit) : ""}`,
        branches: st.continuation.branches.length,
        thresholds: st.thresholds.map((t) => ({
          kind: kindWords[t.kind] ?? t.kind,
          value: formatNumberHtml(t.value, 8),
          point: pointWords(t.point, 5),
          criticality: t.criticality ?? "",
          decisive: t.decisive ? "yes" : "no",
          symbolic: t.symbolic ? m(`${t.symbolic.tex}`) : "",
          agreement: !t.symbolic ? ""
            : t.symbolic.relativeDifference === 0 ? "matches the located value exactly"
            : `matches the located value to ${formatNumberHtml(t.symbolic.relativeDifference, 2)}, relative`,
        })),
        intervals: st.intervals.map((iv) => ({ math: m(iv.statement.tex), words: iv.outcome.words, now: iv.containsNominal })),
        margin: st.margin?.statement ?? "",
        figure: figure(`bifurcation-${st.parameter}`),
      };
    }),
    maps: c.maps.map((mp) => ({ pair: mp.parameters.join(" and "), figure: figure(`outcome-map-${mp.parameters[0]}-${mp.parameters[1]}`), legend: mp.legend.map((l, k) => ({ letter: String.fromCharCode(65 + k), words: l })) })),
  };
  const margins = c.studies
    .filter((st) => st.margin)
    .sort((x, y) => Math.abs(x.margin!.relative) - Math.abs(y.margin!.relative))
    .map((st) => {
      const margin = st.margin!;
      const unit = spec.parameters.find((q) => q.name === st.parameter)?.unit ?? "";
      const current = st.intervals.find((iv) => iv.containsNominal);
      return {
        parameter: st.parameter,
        symbol: m(nameToTex(st.parameter)),
        statement: margin.statement,
        // the interval of this parameter over which the current outcome holds, the others fixed
        holds: current ? m(current.statement.tex) : "",
        now: formatQuantity(st.nominal, unit),
        // the table has no room for the long "(no local bifurcation)" gloss the threshold tables give
        threshold: `${margin.kind === "outcome change" ? "outcome change" : kindWords[margin.kind] ?? margin.kind} at ${formatNumberHtml(margin.threshold)}`,
        percent: formatNumber(100 * Math.abs(margin.relative), 3) + "%",
        side: margin.side,
      };
    });
  // at the current values every study sees the same outcome; it is printed once, above the margins
  const currentOutcome = c.studies.flatMap((st) => st.intervals.filter((iv) => iv.containsNominal))[0]?.outcome.words ?? "";
  const b = results.basins;
  const attractorWords = (id: string) => {
    const e = results.equilibria.find((q) => q.id === id);
    if (e) return `${id} (${TYPE_WORDS[e.type]})`;
    const cyc = results.cycles.find((q) => q.id === id);
    return cyc ? `${id} (${cyc.stability} periodic orbit)` : id;
  };
  const basins = {
    show: b.attractors.length > 0,
    rows: Object.entries(b.fractions).map(([k, v]) => ({ outcome: attractorWords(k), fraction: formatNumber(100 * v, 4) + "%" })),
    errorBound: formatNumber(100 * b.errorBound, 3) + "%",
    resolution: gridSize(b.resolution),
    trajectories: `${b.trajectories} trajectories were integrated instead of the ${b.uniformTrajectories} a uniform grid would need (${formatNumber((100 * b.trajectories) / b.uniformTrajectories, 3)}%)`,
    scenarios: results.scenarios.map((s) => ({
      name: s.name,
      reaches: s.fate.kind === "equilibrium" || s.fate.kind === "cycle" ? s.fate.target : s.fate.kind,
    })),
    figure: figure("basins"),
  };
  const stableCount = results.equilibria.filter((e) => e.stable === true).length + results.cycles.filter((c) => c.stability === "stable").length;
  return {
    lang: "en",
    title: spec.title,
    id: spec.id,
    authors: spec.authors.join(", "),
    organisation: spec.organisation,
    purpose: spec.purpose,
    date: formatDate(options.dateEpoch),
    sha256: spec.sha256,
    version: results.keel,
    paper: options.paper,
    timeUnit: spec.timeUnit,
    summary: {
      equilibriumCount: results.equilibria.length,
      attractorCount: stableCount,
      multistable: stableCount > 1,
      scenarios,
      equilibria: equilibria.map((e) => ({ id: e.id, type: e.type, at: pointWords(results.equilibria.find((q) => q.id === e.id)!.point, 4) })),
      assumptionsFailing: assumptions.filter((a) => a.holds === false).length,
      margins,
      currentOutcome,
      claims: results.claims.map((c) => ({ id: c.id, text: c.text, verdict: c.verdict, evidence: c.evidence, where: c.where })),
      claimCounts: {
        supported: results.claims.filter((c) => c.verdict === "supported").length,
        contradicted: results.claims.filter((c) => c.verdict === "contradicted").length,
        undecided: results.claims.filter((c) => c.verdict === "undecided").length,
      },
    },
    model: {
      equations: results.model.equations.map((e) => m(`${dotted(e.state)} = ${e.tex}`, true)),
      states: spec.states.map((s, i) => ({ symbol: m(stateTex[i]), name: s.name, label: s.label, unit: formatUnit(s.unit), bounds: `${formatNumber(s.min)} to ${formatNumber(s.max)}`, window: `${formatNumber(spec.window[s.name][0])} to ${formatNumber(spec.window[s.name][1])}` })),
      parameters,
      assumptions,
      defaulted: spec.defaulted,
      jacobianMath: m(`J = ${matrixTex(results.model.jacobian.map((row) => row.map((e) => e.tex)))}`, true),
    },
    equilibria,
    stateHeaders: spec.states.map((s) => (s.unit ? `${s.name} (${formatUnit(s.unit)})` : s.name)),
    scenarios: results.scenarios.map((s) => ({ name: s.name, figure: figure(`timeseries-${s.name}`) })),
    cycles,
    separatrices,
    regions,
    nullclines,
    basins,
    conditions,
    figures: {
      portrait: figure("portrait"),
      traceDeterminant: figure("trace-determinant"),
    },
    diagnostics: results.diagnostics,
    methods: {
      tolerances: [
        "Equilibria: damped Newton from a deterministic multistart set (a grid, cell centres, window edges and axes, roots of each component along each edge); a root is accepted when every residual is below 10⁻⁹ of that component's scale over the window; roots closer than 10⁻⁶ of the window are merged.",
        "Classification: trace, determinant and discriminant are called zero within 10⁻⁸ relative to the matching power of the Jacobian's norm; such borderline cases are reported as non-hyperbolic or center.",
        "Trajectories: Hairer's GBS extrapolation method (odex) with dense output; relative tolerance 10⁻⁹, absolute tolerance 10⁻¹¹ of each state's window width. A trajectory counts as converged once it enters a neighbourhood of a stable equilibrium on which the linearisation's quadratic Lyapunov function was checked to decrease.",
        "Periodic orbits: recurrence through a ray section from an equilibrium, then shooting (secant iteration on the return map) at relative tolerance 10⁻¹²; the Floquet multiplier is exp of the integral of the Jacobian's trace over one period.",
        "Separatrices: each saddle's manifolds integrated from points 10⁻⁶ of the window along its eigenvectors (stable manifolds backward in time).",
        ...basinMethod(results.settings, spec.timeUnit),
      ],
      settings: JSON.stringify(results.settings, null, 1),
      versions: Object.entries({ keel: results.keel, node: options.nodeVersion, ...options.libraries }).map(([k, v]) => `${k} ${v}`).join(", "),
      runTime: options.runSeconds === null ? "not recorded (reproducible build: SOURCE_DATE_EPOCH was set)" : `${formatNumber(options.runSeconds, 3)} s`,
    },
    cautions: [...STANDARD_CAUTIONS, ...spec.cautions],
    unitOf,
  };
}

export type DossierView = ReturnType<typeof buildDossierView>;

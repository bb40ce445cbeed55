import { existsSync, readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline, type PipelineOutput } from "../../src/pipeline.js";
import { classifyEquilibrium } from "../../src/analysis/phase/stability.js";
import type { EquilibriumResult, Results } from "../../src/analysis/types.js";
import { buildFigures, type Figure, type PortraitExtras } from "../../src/report/figures/index.js";
import { clipPolyline, type PlotFrame } from "../../src/report/figures/geometry.js";
import { wrapLabel } from "../../src/report/figures/key.js";
import { placeOnTraceDeterminant, SPREAD_LIMIT } from "../../src/report/figures/traceDeterminant.js";
import {
  classifyForDrawing,
  EQUILIBRIUM_CLASSES,
  EQUILIBRIUM_MARKERS,
  FIELD_STYLE,
  LINE_STYLES,
  NULLCLINE_STYLES,
  PAPER,
} from "../../src/report/figures/palette.js";
import { compileFigure, renderSvg } from "../../src/report/render/svg.js";
import { textWidthPx } from "../../src/report/render/textWidth.js";

type Layer = {
  name?: string;
  data?: { values: Record<string, unknown>[] };
  mark?: Record<string, unknown>;
  layer?: Layer[];
};

interface Example {
  run: PipelineOutput;
  extras: PortraitExtras;
  figures: Figure[];
}

function runExample(text: string): Example {
  const parsed = runPipeline(text);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  const { results, spec } = parsed.value;
  const extras = { nullclines: results.nullclines, field: results.field };
  return { run: parsed.value, extras, figures: buildFigures(results, spec) };
}

const specText = (id: string) => readFileSync(new URL(`../../specs/${id}.json`, import.meta.url), "utf8");
const EXAMPLES = ["reservoir-competition", "grazer-forage"];
const examples = new Map<string, Example>();
const svgs = new Map<string, string>();
const renderWarnings = new Map<string, string[]>();

/** The plot's layers (first view of a concat) and the key's. */
function views(figure: Figure): Layer[] {
  const spec = figure.spec as { hconcat?: Layer[]; vconcat?: Layer[] };
  return spec.hconcat ?? spec.vconcat ?? [];
}
const layerNamed = (figure: Figure, name: string) =>
  views(figure)
    .flatMap((v) => v.layer ?? [])
    .find((l) => l.name === name);

beforeAll(async () => {
  for (const id of EXAMPLES) {
    const ex = runExample(specText(id));
    examples.set(id, ex);
    for (const f of ex.figures) {
      const diagnostics = { warnings: [] as string[] };
      svgs.set(`${id}/${f.id}`, await renderSvg(f.spec, diagnostics));
      renderWarnings.set(`${id}/${f.id}`, diagnostics.warnings);
    }
  }
});

describe("buildFigures on the example specs", () => {
  it("buildFigures(example) gives the trace–determinant diagram, the portrait and one time series per scenario", () => {
    for (const id of EXAMPLES) {
      const ex = examples.get(id)!;
      const ids = ex.figures.map((f) => f.id);
      expect(ids.slice(0, 2)).toEqual(["trace-determinant", "portrait"]);
      expect(ids.slice(-ex.run.results.scenarios.length)).toEqual(
        ex.run.results.scenarios.map((s) => `timeseries-${s.name}`),
      );
      for (const f of ex.figures) {
        expect(f.title.length).toBeGreaterThan(0);
        expect(f.caption.length).toBeGreaterThan(40);
      }
    }
  });

  it("compileFigure(every figure) raises no vega-lite warning", () => {
    for (const ex of examples.values())
      for (const f of ex.figures) {
        const warnings: string[] = [];
        compileFigure(f.spec, warnings);
        expect(warnings, f.id).toEqual([]);
      }
  });

  it("renderSvg(every figure) logs no warning from vega-lite or vega", () => {
    for (const [key, warnings] of renderWarnings) expect(warnings, key).toEqual([]);
  });

  it("renderSvg(every figure) gives an SVG with no URL, no url() reference and no script", () => {
    for (const [key, svg] of svgs) {
      expect(svg.startsWith("<svg"), key).toBe(true);
      expect(svg, key).not.toMatch(/http/i);
      expect(svg, key).not.toContain("url(");
      expect(svg, key).not.toMatch(/<script/i);
      expect(svg, key).not.toContain("xmlns");
    }
  });

  it("renderSvg(every figure) is byte-identical when rendered twice", async () => {
    for (const [id, ex] of examples)
      for (const f of ex.figures) {
        expect(await renderSvg(f.spec), f.id).toBe(svgs.get(`${id}/${f.id}`));
      }
  });

  it("buildFigures leaves its inputs unchanged", () => {
    const ex = runExample(specText("reservoir-competition"));
    const before = JSON.stringify([ex.run.results, ex.run.spec, ex.extras]);
    buildFigures(ex.run.results, ex.run.spec, ex.extras);
    expect(JSON.stringify([ex.run.results, ex.run.spec, ex.extras])).toBe(before);
  });

  it("buildFigures(results with nothing to draw) still gives figures that compile and render", async () => {
    const ex = examples.get("reservoir-competition")!;
    const empty: Results = {
      ...ex.run.results,
      equilibria: [],
      scenarios: [],
      trajectories: [],
      separatrices: [],
      cycles: [],
      basins: { ...ex.run.results.basins, attractors: [] },
      conditions: { invasion: [], studies: [], maps: [] },
    };
    const figures = buildFigures(empty, ex.run.spec, { nullclines: null, field: null });
    expect(figures.map((f) => f.id)).toEqual(["trace-determinant", "portrait"]);
    for (const f of figures) {
      const diagnostics = { warnings: [] as string[] };
      expect(await renderSvg(f.spec, diagnostics)).toMatch(/^<svg/);
      expect(diagnostics.warnings, f.id).toEqual([]);
    }
  });

  it("the figure specs carry inline data only: no url, no $schema", () => {
    for (const ex of examples.values())
      for (const f of ex.figures) {
        const json = JSON.stringify(f.spec);
        expect(json).not.toMatch(/"url"|"\$schema"|http/);
      }
  });
});

describe("the phase portrait", () => {
  const countSymbols = (svg: string, mark: string) => {
    const group = new RegExp(`<g class="mark-symbol role-mark ${mark}_marks"[^>]*>(.*?)</g>`, "s").exec(svg);
    return group ? (group[1].match(/<path /g) ?? []).length : 0;
  };

  it("portrait(example) draws one equilibrium marker per equilibrium, in the SVG and in the data", () => {
    for (const [id, ex] of examples) {
      const n = ex.run.results.equilibria.length;
      expect(n).toBeGreaterThan(0);
      expect(countSymbols(svgs.get(`${id}/portrait`)!, "equilibria"), id).toBe(n);
      const portrait = ex.figures.find((f) => f.id === "portrait")!;
      expect(layerNamed(portrait, "equilibria")!.data!.values.map((r) => r.what)).toEqual(
        ex.run.results.equilibria.map((e) => e.id),
      );
    }
  });

  it("portrait(example) draws both nullclines, the field, the scenarios and the separatrices", () => {
    for (const ex of examples.values()) {
      const portrait = ex.figures.find((f) => f.id === "portrait")!;
      for (const name of [
        "nullcline_1",
        "nullcline_2",
        "field",
        "scenarios",
        "stable_manifolds",
        "unstable_manifolds",
        "trajectories",
      ]) {
        expect(layerNamed(portrait, name)?.data?.values.length ?? 0, name).toBeGreaterThan(0);
      }
      const starts = layerNamed(portrait, "scenario_marks")!.data!.values.filter((r) =>
        String(r.what).startsWith("start "),
      );
      expect(starts.map((r) => r.what)).toEqual(ex.run.results.scenarios.map((s) => `start ${s.name}`));
    }
  });

  it("portrait(reservoir-competition) tells the two nullclines apart by dash pattern, not only colour", () => {
    const portrait = examples.get("reservoir-competition")!.figures.find((f) => f.id === "portrait")!;
    const dash = (name: string) => JSON.stringify(layerNamed(portrait, name)!.mark!.strokeDash);
    expect(dash("nullcline_1")).not.toBe(dash("nullcline_2"));
    expect(dash("stable_manifolds")).not.toBe(dash("unstable_manifolds"));
  });

  it("portrait(example) keeps every plotted point inside the window", () => {
    for (const ex of examples.values()) {
      const portrait = ex.figures.find((f) => f.id === "portrait")!;
      const [a, b] = ex.run.results.model.states;
      const [wa, wb] = [ex.run.results.model.window[a], ex.run.results.model.window[b]];
      const plot = views(portrait)[0].layer!;
      for (const layer of plot)
        for (const r of layer.data!.values) {
          if (layer.mark!.type === "text") continue; // labels sit beside their points
          // rounding to 7 significant digits may step a point on the edge out by a hair
          const slack = 1e-6;
          expect(Number(r.x), layer.name).toBeGreaterThanOrEqual(wa[0] - slack * (wa[1] - wa[0]));
          expect(Number(r.x), layer.name).toBeLessThanOrEqual(wa[1] + slack * (wa[1] - wa[0]));
          expect(Number(r.y), layer.name).toBeGreaterThanOrEqual(wb[0] - slack * (wb[1] - wb[0]));
          expect(Number(r.y), layer.name).toBeLessThanOrEqual(wb[1] + slack * (wb[1] - wb[0]));
        }
    }
  });

  it("portrait(example)'s key shows every line style and every equilibrium marker the plot uses", () => {
    for (const ex of examples.values()) {
      const portrait = ex.figures.find((f) => f.id === "portrait")!;
      const [plot, key] = views(portrait);
      const style = (l: Layer) =>
        `${l.mark!.color} ${JSON.stringify(l.mark!.strokeDash ?? [])} ${l.mark!.strokeWidth}`;
      const keyStyles = new Set(key.layer!.filter((l) => l.mark!.type === "line").map(style));
      for (const l of plot.layer!.filter((q) => q.mark!.type === "line"))
        expect(keyStyles.has(style(l)), l.name).toBe(true);
      const keyShapes = new Set(
        layerNamed(portrait, "key_symbols")!.data!.values.map((r) => `${r.shape} ${r.fill}`),
      );
      for (const r of layerNamed(portrait, "equilibria")!.data!.values)
        expect(keyShapes.has(`${r.shape} ${r.fill}`), String(r.what)).toBe(true);
    }
  });
});

describe("the phase portrait of a limit cycle", () => {
  it("portrait(r' = r(1 − r²), θ' = 1) draws the attracting orbit on the unit circle over the scenarios", () => {
    // In Cartesian form x' = x − y − x(x² + y²), y' = x + y − y(x² + y²): a stable limit cycle
    // r = 1 of period 2π around an unstable focus (Strogatz, Nonlinear Dynamics and Chaos,
    // 2nd ed., Example 7.1.1).
    const ex = runExample(
      JSON.stringify({
        keel: 1,
        id: "unit-cycle",
        title: "unit cycle",
        time: { unit: "s" },
        states: [
          { name: "x", min: -2, max: 2 },
          { name: "y", min: -2, max: 2 },
        ],
        equations: { x: "x - y - x*(x^2 + y^2)", y: "x + y - y*(x^2 + y^2)" },
        scenarios: [{ name: "inside", initial: { x: 0.1, y: 0 }, horizon: 30 }],
      }),
    );
    const portrait = ex.figures.find((f) => f.id === "portrait")!;
    const orbit = layerNamed(portrait, "cycles_attracting")!.data!.values;
    expect(orbit.length).toBeGreaterThan(50);
    for (const r of orbit) expect(Math.hypot(Number(r.x), Number(r.y))).toBeCloseTo(1, 4);
    const names = views(portrait)[0].layer!.map((l) => l.name);
    expect(names.indexOf("cycles_attracting")).toBeGreaterThan(names.indexOf("scenarios"));
    expect(layerNamed(portrait, "equilibria")!.data!.values.map((r) => r.shape)).toEqual([
      EQUILIBRIUM_MARKERS.unstable.shape,
    ]);
    const warnings: string[] = [];
    compileFigure(portrait.spec, warnings);
    expect(warnings).toEqual([]);
  });
});

describe("the trace–determinant diagram", () => {
  it("traceDeterminant(reservoir-competition) puts the saddle E2 = (0, K2) below Δ = 0, at Δ = −r1 r2 (1 − a12 K2/K1)", () => {
    // Linearising competitive Lotka–Volterra at (0, K2) gives J = [[r1 (1 − a12 K2/K1), 0], [−r2 a21, −r2]],
    // so Δ = −r1 r2 (1 − a12 K2/K1) < 0 when a12 K2 < K1: a saddle (Strogatz, Nonlinear Dynamics and
    // Chaos, 2nd ed., §6.4 and §5.2 for the trace–determinant classification).
    const ex = examples.get("reservoir-competition")!;
    const p = ex.run.results.model.parameters;
    const expected = -p.r1 * p.r2 * (1 - (p.a12 * p.K2) / p.K1);
    const td = ex.figures.find((f) => f.id === "trace-determinant")!;
    const e2 = layerNamed(td, "equilibria")!.data!.values.find((r) => r.what === "E2")!;
    expect(ex.run.results.equilibria.find((e) => e.id === "E2")!.point).toEqual({ N: 0, S: p.K2 });
    expect(Number(e2.y)).toBeLessThan(0);
    expect(Number(e2.y)).toBeCloseTo(expected, 9);
    expect(e2.shape).toBe(EQUILIBRIUM_MARKERS.saddle.shape);
  });

  it("traceDeterminant(example) plots one marker per equilibrium, each in the region of its type", () => {
    for (const [id, ex] of examples) {
      const td = ex.figures.find((f) => f.id === "trace-determinant")!;
      const rows = layerNamed(td, "equilibria")!.data!.values;
      expect(rows.length).toBe(ex.run.results.equilibria.length);
      const svg = svgs.get(`${id}/trace-determinant`)!;
      const group = /<g class="mark-symbol role-mark equilibria_marks"[^>]*>(.*?)<\/g>/s.exec(svg)!;
      expect((group[1].match(/<path /g) ?? []).length).toBe(rows.length);
      for (const e of ex.run.results.equilibria) {
        const r = rows.find((q) => q.what === e.id)!;
        const [x, y] = [Number(r.x), Number(r.y)];
        if (e.type === "saddle") expect(y).toBeLessThan(0);
        if (e.type.endsWith("-node")) expect(x * x).toBeGreaterThan(4 * y);
        if (e.type.endsWith("-focus")) expect(x * x).toBeLessThan(4 * y);
        if (e.type.startsWith("stable-")) expect(x).toBeLessThan(0);
        if (e.type.startsWith("unstable-")) expect(x).toBeGreaterThan(0);
      }
    }
  });

  const equilibrium = (id: string, jacobian: number[][]): EquilibriumResult => ({
    id,
    point: { x: 0, y: 0 },
    onBoundary: false,
    boundaryStates: [],
    residual: 0,
    ...classifyEquilibrium(jacobian),
  });

  it("placeOnTraceDeterminant(rates 1000 times apart) switches to τ/ρ, Δ/ρ² and keeps every point in its region", () => {
    const fast = equilibrium("E1", [
      [-1000, 0],
      [0, -3000],
    ]); // stable node, ρ = 3000
    const slow = equilibrium("E2", [
      [0.5, 1],
      [-1, 0.5],
    ]); // unstable focus, ρ = √1.25
    const saddle = equilibrium("E3", [
      [2, 0],
      [0, -1],
    ]);
    const placed = placeOnTraceDeterminant([fast, slow, saddle]);
    expect(placed.mode).toBe("normalised");
    for (const [k, e] of [fast, slow, saddle].entries()) {
      const p = placed.points[k];
      expect(Math.abs(p.x)).toBeLessThanOrEqual(2 + 1e-12);
      expect(Math.abs(p.y)).toBeLessThanOrEqual(1 + 1e-12);
      // the signs of τ, Δ and τ² − 4Δ decide the region; dividing J by ρ > 0 keeps all three
      expect(Math.sign(p.x)).toBe(Math.sign(e.trace));
      expect(Math.sign(p.y)).toBe(Math.sign(e.determinant));
      expect(Math.sign(p.x * p.x - 4 * p.y)).toBe(Math.sign(e.discriminant));
      expect(Math.abs(p.x)).toBeLessThanOrEqual(placed.T);
      expect(Math.abs(p.y)).toBeLessThanOrEqual(placed.D);
    }
  });

  it("placeOnTraceDeterminant(rates within a factor 10) keeps the actual trace and determinant", () => {
    const placed = placeOnTraceDeterminant([
      equilibrium("E1", [
        [-1, 0],
        [0, -2],
      ]),
      equilibrium("E2", [
        [3, 0],
        [0, -1],
      ]),
    ]);
    expect(SPREAD_LIMIT).toBe(10);
    expect(placed.mode).toBe("linear");
    expect(placed.points.map((p) => [p.x, p.y])).toEqual([
      [-3, 2],
      [2, -3],
    ]);
  });

  it("buildFigures(widely spread rates) says in the caption that the diagram is normalised", () => {
    const ex = examples.get("reservoir-competition")!;
    const results: Results = {
      ...ex.run.results,
      equilibria: [
        equilibrium("E1", [
          [-1000, 0],
          [0, -3000],
        ]),
        equilibrium("E2", [
          [0.5, 1],
          [-1, 0.5],
        ]),
      ],
      scenarios: [],
    };
    const td = buildFigures(results, ex.run.spec, ex.extras).find((f) => f.id === "trace-determinant")!;
    expect(td.caption).toMatch(/τ\/ρ, Δ\/ρ²/);
    const warnings: string[] = [];
    compileFigure(td.spec, warnings);
    expect(warnings).toEqual([]);
  });
});

describe("time series", () => {
  it("timeseries(example) stacks one panel per state on a shared time axis, from the scenario's series", () => {
    for (const ex of examples.values())
      for (const s of ex.run.results.scenarios) {
        const f = ex.figures.find((q) => q.id === `timeseries-${s.name}`)!;
        const panels = (f.spec as { vconcat: Layer[] }).vconcat;
        expect(panels.length).toBe(2);
        const first = panels[0].layer!.find((l) => l.name === "series_1")!.data!.values;
        const second = panels[1].layer!.find((l) => l.name === "series_2")!.data!.values;
        expect(first.length).toBe(s.series.t.length);
        expect(Number(first[0].y)).toBeCloseTo(s.start[ex.run.results.model.states[0]], 6);
        expect(Number(second[0].y)).toBeCloseTo(s.start[ex.run.results.model.states[1]], 6);
        expect((f.spec as { resolve: unknown }).resolve).toEqual({ scale: { x: "shared" } });
      }
  });
});

describe("labels from the spec", () => {
  it("renderSvg(figures of a spec whose labels hold markup) prints the labels as text, escaped", async () => {
    const raw = JSON.parse(specText("reservoir-competition"));
    raw.states[0].label = 'perch <script>alert("x")</script> & co';
    raw.states[1].unit = "fish & fry";
    raw.states[1].label = "pike, see url(https://example.invalid/pike)";
    raw.scenarios[0].name = "survey<b>&1";
    delete raw.claims; // they name the scenario by its old name
    const ex = runExample(JSON.stringify(raw));
    const portrait = await renderSvg(ex.figures.find((f) => f.id === "portrait")!.spec);
    const series = await renderSvg(ex.figures.find((f) => f.id === "timeseries-survey<b>&1")!.spec);
    for (const svg of [portrait, series]) {
      expect(svg).not.toMatch(/<script|<b>/);
      expect(svg).not.toMatch(/&(?!amp;|lt;|gt;|quot;|#\d+;)/); // every & starts an entity
    }
    expect(portrait).toContain("perch &lt;script&gt;alert(");
    expect(portrait).toContain("&lt;/script&gt; &amp; co, N (fish)");
    expect(portrait).toContain("fish &amp; fry");
    expect(portrait).toContain("see url(https://example.invalid/pike)"); // as text only
    expect(portrait).not.toMatch(/<[^>]*(?<!aria-label)="[^"]*url\(/);
    expect(portrait).toContain("survey&lt;b&gt;&amp;1");
  });
});

describe("visual code", () => {
  // Relative luminance and contrast ratio as defined in W3C, Web Content Accessibility Guidelines
  // (WCAG) 2.1, "relative luminance" and "contrast ratio"; SC 1.4.11 asks 3:1 for graphical objects.
  const channel = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  const linear = (hex: string) => [1, 3, 5].map((i) => channel(parseInt(hex.slice(i, i + 2), 16)));
  const luminance = (rgb: number[]) => 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
  const contrast = (a: string, b: string) => {
    const [hi, lo] = [luminance(linear(a)), luminance(linear(b))].sort((p, q) => q - p);
    return (hi + 0.05) / (lo + 0.05);
  };
  // CIELAB from linear sRGB (D65), CIE 15:2004 formulae
  const lab = (rgb: number[]) => {
    const X = (0.4124 * rgb[0] + 0.3576 * rgb[1] + 0.1805 * rgb[2]) / 0.95047;
    const Y = 0.2126 * rgb[0] + 0.7152 * rgb[1] + 0.0722 * rgb[2];
    const Z = (0.0193 * rgb[0] + 0.1192 * rgb[1] + 0.9505 * rgb[2]) / 1.08883;
    const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
    return [116 * f(Y) - 16, 500 * (f(X) - f(Y)), 200 * (f(Y) - f(Z))];
  };
  const deltaE = (a: number[], b: number[]) => Math.hypot(...lab(a).map((v, k) => v - lab(b)[k]));
  // Dichromat simulation matrices at severity 1.0 on linear RGB: Machado, Oliveira & Fernandes,
  // "A Physiologically-based Model for Simulation of Color Vision Deficiency", IEEE TVCG 15(6),
  // 2009, table of precomputed matrices (values from memory).
  const DICHROMATS: Record<string, number[][]> = {
    protanopia: [
      [0.152286, 1.052583, -0.204868],
      [0.114503, 0.786281, 0.099216],
      [-0.003882, -0.048116, 1.051998],
    ],
    deuteranopia: [
      [0.367322, 0.860646, -0.227968],
      [0.280085, 0.672501, 0.047413],
      [-0.01182, 0.04294, 0.968881],
    ],
    tritanopia: [
      [1.255528, -0.076749, -0.178779],
      [-0.078411, 0.930809, 0.147602],
      [0.004733, 0.691367, 0.3039],
    ],
  };
  const simulate = (m: number[][], rgb: number[]) =>
    m.map((row) => Math.min(1, Math.max(0, row[0] * rgb[0] + row[1] * rgb[1] + row[2] * rgb[2])));
  const lightness = (hex: string) => lab(linear(hex))[0];

  /** Colours that meet in one figure and must be told apart. */
  const PAIRS: [string, string, string][] = [
    ["nullclines", NULLCLINE_STYLES[0].color, NULLCLINE_STYLES[1].color],
    ["manifolds", LINE_STYLES.stableManifold.color, LINE_STYLES.unstableManifold.color],
    ["scenario vs other trajectories", LINE_STYLES.scenario.color, LINE_STYLES.portrait.color],
    ["scenario vs stable manifold", LINE_STYLES.scenario.color, LINE_STYLES.stableManifold.color],
    ["nullcline 1 vs cycle", NULLCLINE_STYLES[0].color, LINE_STYLES.cycleStable.color],
  ];

  it("palette: every data line has at least 3:1 contrast with the paper (WCAG 2.1 SC 1.4.11)", () => {
    const lines = [
      ...NULLCLINE_STYLES.map((s) => s.color),
      LINE_STYLES.scenario.color,
      LINE_STYLES.stableManifold.color,
      LINE_STYLES.unstableManifold.color,
      LINE_STYLES.cycleStable.color,
      FIELD_STYLE.color,
    ];
    for (const c of lines) expect(contrast(c, PAPER), c).toBeGreaterThanOrEqual(3);
  });

  it("palette: colours that meet in a figure differ in lightness, so they part in grey-scale print", () => {
    // 5 L* units is a clearly visible step in grey (common practice)
    for (const [what, a, b] of PAIRS)
      expect(Math.abs(lightness(a) - lightness(b)), what).toBeGreaterThanOrEqual(5);
  });

  it("palette: colours that meet in a figure stay apart for protan, deutan and tritan dichromats", () => {
    // ΔE*ab of 10 or more is an obvious difference side by side (common practice)
    for (const [name, m] of Object.entries(DICHROMATS))
      for (const [what, a, b] of PAIRS) {
        expect(
          deltaE(simulate(m, linear(a)), simulate(m, linear(b))),
          `${what}, ${name}`,
        ).toBeGreaterThanOrEqual(10);
      }
  });

  it("markers: stable, unstable, saddle and non-hyperbolic have four different shapes", () => {
    expect(new Set(EQUILIBRIUM_CLASSES.map((c) => EQUILIBRIUM_MARKERS[c].shape)).size).toBe(4);
    expect(EQUILIBRIUM_MARKERS.stable.fill).not.toBe(EQUILIBRIUM_MARKERS.unstable.fill);
  });

  it("classifyForDrawing(type) sends saddles, undecided and hyperbolic points to their classes", () => {
    expect(
      classifyForDrawing(
        classifyEquilibrium([
          [1, 0],
          [0, -1],
        ]),
      ),
    ).toBe("saddle");
    expect(
      classifyForDrawing(
        classifyEquilibrium([
          [-1, 2],
          [-2, -1],
        ]),
      ),
    ).toBe("stable");
    expect(
      classifyForDrawing(
        classifyEquilibrium([
          [1, 0],
          [0, 2],
        ]),
      ),
    ).toBe("unstable");
    expect(
      classifyForDrawing(
        classifyEquilibrium([
          [0, 1],
          [-1, 0],
        ]),
      ),
    ).toBe("non-hyperbolic"); // a linear centre
    expect(
      classifyForDrawing(
        classifyEquilibrium([
          [0, 0],
          [0, -1],
        ]),
      ),
    ).toBe("non-hyperbolic"); // a zero eigenvalue
  });
});

describe("geometry and text", () => {
  const frame: PlotFrame = { lo: [0, 0], hi: [10, 10], width: 100, height: 100 };

  it("clipPolyline(a path that leaves and re-enters) cuts it exactly at the window edges", () => {
    // hand-worked: (5,5)→(15,5) leaves through x = 10; (15,5)→(5,8) re-enters at x = 10, y = 6.5
    const pieces = clipPolyline(frame, { x: [5, 15, 5], y: [5, 5, 8] });
    expect(pieces).toEqual([
      { x: [5, 10], y: [5, 5] },
      { x: [10, 5], y: [6.5, 8] },
    ]);
  });

  it("clipPolyline(a path wholly outside, or with a non-finite point) keeps only drawable runs", () => {
    expect(clipPolyline(frame, { x: [11, 12], y: [1, 2] })).toEqual([]);
    expect(clipPolyline(frame, { x: [1, 2, NaN, 4, 5], y: [1, 2, 3, 4, 5] })).toEqual([
      { x: [1, 2], y: [1, 2] },
      { x: [4, 5], y: [4, 5] },
    ]);
  });

  it("wrapLabel(long label) breaks at spaces within the line width", () => {
    expect(wrapLabel("stable manifold (separatrix)", 19)).toEqual(["stable manifold", "(separatrix)"]);
    expect(wrapLabel("saddle", 19)).toEqual(["saddle"]);
  });

  const FONT = "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf";
  it.skipIf(!existsSync(FONT))(
    "textWidthPx(text) matches DejaVu Sans's own advance widths (hmtx table)",
    () => {
      // Reference: the font file itself (DejaVu Sans, Debian's fonts-dejavu-core), read with the
      // table layout of the OpenType specification (Microsoft, OpenType 1.9: cmap format 4, hhea, hmtx).
      const font = readFileSync(FONT);
      const tables = new Map<string, number>();
      for (let i = 0; i < font.readUInt16BE(4); i++)
        tables.set(font.toString("latin1", 12 + 16 * i, 16 + 16 * i), font.readUInt32BE(20 + 16 * i));
      const unitsPerEm = font.readUInt16BE(tables.get("head")! + 18);
      const metrics = font.readUInt16BE(tables.get("hhea")! + 34);
      const cmap = tables.get("cmap")!;
      let sub = -1;
      for (let i = 0; i < font.readUInt16BE(cmap + 2); i++) {
        if (font.readUInt16BE(cmap + 4 + 8 * i) === 3 && font.readUInt16BE(cmap + 6 + 8 * i) === 1)
          sub = cmap + font.readUInt32BE(cmap + 8 + 8 * i);
      }
      const segments = font.readUInt16BE(sub + 6) / 2;
      const at = (array: number, k: number) =>
        font.readUInt16BE(sub + 14 + array * (2 * segments) + (array > 0 ? 2 : 0) + 2 * k);
      const glyph = (code: number) => {
        for (let k = 0; k < segments; k++) {
          if (code < at(1, k) || code > at(0, k)) continue;
          const delta = at(2, k),
            rangeOffset = at(3, k);
          if (rangeOffset === 0) return (code + delta) & 0xffff;
          const address = sub + 14 + 3 * (2 * segments) + 2 + 2 * k + rangeOffset + 2 * (code - at(1, k));
          const g = font.readUInt16BE(address);
          return g === 0 ? 0 : (g + delta) & 0xffff;
        }
        return 0;
      };
      const advance = (ch: string) =>
        font.readUInt16BE(tables.get("hmtx")! + 4 * Math.min(glyph(ch.codePointAt(0)!), metrics - 1));
      const sample =
        "dN/dt = 0 (N-nullcline) stable manifold, τ² = 4Δ −0.15 80,000 fish & fry ABCDEFGHIJKLMNOPQRSTUVWXYZ";
      for (const ch of new Set(sample)) {
        expect(textWidthPx(ch, unitsPerEm), JSON.stringify(ch)).toBe(advance(ch));
      }
    },
  );
});

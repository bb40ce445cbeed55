import { readFileSync } from "node:fs";
import { beforeAll, describe, expect, it } from "vitest";
import { runPipeline, type PipelineOutput } from "../../src/pipeline.js";
import { encodeRuns } from "../../src/analysis/basins/refine.js";
import type { BranchResult } from "../../src/analysis/parameters/continuation/index.js";
import type { Results } from "../../src/analysis/types.js";
import { buildFigures, type Figure } from "../../src/report/figures/index.js";
import { BASIN_DRAW_MAX, buildBasinFigure, downsampleBasinGrid } from "../../src/report/figures/basins.js";
import { branchPieces, buildBifurcationFigure, labelNumber } from "../../src/report/figures/bifurcation.js";
import { outcomeLetter } from "../../src/report/figures/outcomeMap.js";
import { buildPortraitFigure } from "../../src/report/figures/portrait.js";
import { outcomeWords, stateTerms } from "../../src/report/words/index.js";
import {
  BRANCH_STYLES,
  EQUILIBRIUM_MARKERS,
  REGION_FILLS,
  SPECIAL_POINT_MARKERS,
  SPECIAL_REGION_FILLS,
  THRESHOLD_CURVE_STYLES,
} from "../../src/report/figures/palette.js";
import { compileFigure, renderSvg } from "../../src/report/render/svg.js";

type Row = Record<string, unknown>;
type View = {
  name?: string;
  data?: { values: Row[] };
  mark?: Record<string, unknown>;
  layer?: View[];
  hconcat?: View[];
  vconcat?: View[];
  encoding?: Record<string, { scale?: { domain?: number[] } }>;
};

/** Every layer of a figure, however its views are nested. */
function layersOf(view: View): View[] {
  return [
    ...(view.layer ?? []),
    ...(view.hconcat ?? []).flatMap(layersOf),
    ...(view.vconcat ?? []).flatMap(layersOf),
  ];
}
const layer = (f: Figure, name: string) => layersOf(f.spec as View).find((l) => l.name === name);
const rowsOf = (f: Figure, name: string) => layer(f, name)?.data?.values ?? [];
/** Marks vega drew for a named layer in the SVG (one <path> per rect or symbol). */
function countMarks(svg: string, kind: "rect" | "symbol", name: string): number {
  const group = new RegExp(`<g class="mark-${kind} role-mark ${name}_marks"[^>]*>(.*?)</g>`, "s").exec(svg);
  return group ? (group[1].match(/<path /g) ?? []).length : 0;
}

const specText = (id: string) => readFileSync(new URL(`../../specs/${id}.json`, import.meta.url), "utf8");
/** The example specs with a small basin map (fast), and for the competition model one outcome map. */
function exampleText(id: string): string {
  const raw = JSON.parse(specText(id));
  raw.analysis = { ...(raw.analysis ?? {}), basins: { resolution: 128, coarse: 16 } };
  if (id === "reservoir-competition") raw.analysis.parameterPairs = [["a12", "a21"]];
  return JSON.stringify(raw);
}
function run(text: string): PipelineOutput {
  const parsed = runPipeline(text);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return parsed.value;
}

const EXAMPLES = ["reservoir-competition", "grazer-forage"];
const runs = new Map<string, PipelineOutput>();
const figures = new Map<string, Figure[]>();
const svgs = new Map<string, string>();
const warnings = new Map<string, string[]>();
const isNew = (f: Figure) =>
  f.id === "basins" || f.id.startsWith("bifurcation-") || f.id.startsWith("outcome-map-");

beforeAll(async () => {
  for (const id of EXAMPLES) {
    const out = run(exampleText(id));
    runs.set(id, out);
    const built = buildFigures(out.results, out.spec);
    figures.set(id, built);
    for (const f of built.filter(isNew)) {
      const diagnostics = { warnings: [] as string[] };
      svgs.set(`${id}/${f.id}`, await renderSvg(f.spec, diagnostics));
      warnings.set(`${id}/${f.id}`, diagnostics.warnings);
    }
  }
}, 120_000);

const figure = (id: string, fid: string) => figures.get(id)!.find((f) => f.id === fid)!;

describe("buildFigures with basins, studies and maps", () => {
  it("buildFigures(example) orders trace-determinant, portrait, basins, bifurcations, outcome maps, time series", () => {
    for (const id of EXAMPLES) {
      const { results } = runs.get(id)!;
      const studied = results.conditions.studies.filter(
        (s) => s.thresholds.length > 0 || s.continuation.branches.length > 1,
      );
      expect(
        figures.get(id)!.map((f) => f.id),
        id,
      ).toEqual([
        "trace-determinant",
        "portrait",
        ...(results.basins.attractors.length ? ["basins"] : []),
        ...studied.map((s) => `bifurcation-${s.parameter}`),
        ...results.conditions.maps.map((m) => `outcome-map-${m.parameters[0]}-${m.parameters[1]}`),
        ...results.scenarios.map((s) => `timeseries-${s.name}`),
      ]);
    }
    // pinned: both examples have a basin map; the competition model's a12 and a21 each have a
    // transcritical threshold (see below), and the one map asked for
    const ids = figures.get("reservoir-competition")!.map((f) => f.id);
    for (const fid of ["basins", "bifurcation-a12", "bifurcation-a21", "outcome-map-a12-a21"])
      expect(ids).toContain(fid);
    expect(figures.get("grazer-forage")!.map((f) => f.id)).toContain("basins");
  });

  it("compileFigure(basin, bifurcation and outcome-map figures) raises no vega-lite warning", () => {
    for (const [id, built] of figures)
      for (const f of built.filter(isNew)) {
        const found: string[] = [];
        compileFigure(f.spec, found);
        expect(found, `${id}/${f.id}`).toEqual([]);
      }
  });

  it("renderSvg(basin, bifurcation and outcome-map figures) logs no warning and holds no URL", () => {
    expect(svgs.size).toBeGreaterThanOrEqual(4);
    for (const [key, svg] of svgs) {
      expect(warnings.get(key), key).toEqual([]);
      expect(svg.startsWith("<svg"), key).toBe(true);
      expect(svg, key).not.toMatch(/http|url\(|<script|xmlns/i);
      expect(
        JSON.stringify(figures.get(key.split("/")[0])!.find((f) => key.endsWith(`/${f.id}`))!.spec),
      ).not.toMatch(/"url"|"\$schema"/);
    }
  });

  it("renderSvg(basin, bifurcation and outcome-map figures) is byte-identical when rendered twice", async () => {
    for (const [id, built] of figures)
      for (const f of built.filter(isNew)) {
        expect(await renderSvg(f.spec), f.id).toBe(svgs.get(`${id}/${f.id}`));
      }
  });

  it("buildFigures(results) leaves the basin grid, the studies and the maps unchanged", () => {
    const { results, spec } = runs.get("reservoir-competition")!;
    const before = JSON.stringify(results);
    buildFigures(results, spec);
    expect(JSON.stringify(results)).toBe(before);
  });

  it("buildFigures(no attractor, one branch and no threshold) leaves out the basin map and that bifurcation diagram", () => {
    const { results, spec } = runs.get("reservoir-competition")!;
    const [first, ...rest] = results.conditions.studies;
    const lonely = {
      ...first,
      thresholds: [],
      continuation: { ...first.continuation, branches: first.continuation.branches.slice(0, 1) },
    };
    const trimmed: Results = {
      ...results,
      basins: { ...results.basins, attractors: [] },
      conditions: { ...results.conditions, studies: [lonely, ...rest] },
    };
    const ids = buildFigures(trimmed, spec).map((f) => f.id);
    expect(ids).not.toContain("basins");
    expect(ids).not.toContain(`bifurcation-${first.parameter}`);
    expect(ids).toContain(`bifurcation-${rest[0].parameter}`);
  });

  it("buildFigures(results with no equilibria, orbits or manifolds) still gives basin, bifurcation and map figures that render cleanly", async () => {
    const { results, spec } = runs.get("reservoir-competition")!;
    const empty: Results = {
      ...results,
      equilibria: [],
      scenarios: [],
      trajectories: [],
      separatrices: [],
      cycles: [],
    };
    const built = buildFigures(empty, spec).filter(isNew);
    expect(built.map((f) => f.id)).toContain("basins");
    expect(built.map((f) => f.id)).toContain("outcome-map-a12-a21");
    for (const f of built) {
      const diagnostics = { warnings: [] as string[] };
      expect(await renderSvg(f.spec, diagnostics)).toMatch(/^<svg/);
      expect(diagnostics.warnings, f.id).toEqual([]);
    }
  });
});

describe("the basin map", () => {
  it("basins(example) draws cells covering exactly the downsampled grid, one SVG rect per run", () => {
    for (const id of EXAMPLES) {
      const { results } = runs.get(id)!;
      const drawn = downsampleBasinGrid(results.basins.grid);
      expect(drawn.factor).toBe(1); // 128 cells a side, under BASIN_DRAW_MAX
      const cells = rowsOf(figure(id, "basins"), "cells");
      expect(
        cells.reduce((s, r) => s + Number(r.cells), 0),
        id,
      ).toBe(drawn.nx * drawn.ny);
      expect(countMarks(svgs.get(`${id}/basins`)!, "rect", "cells"), id).toBe(cells.length);
    }
  });

  it("basins(grazer-forage) keys each attractor with its type and area fraction, in its own fill", () => {
    const { results } = runs.get("grazer-forage")!;
    const f = figure("grazer-forage", "basins");
    const key = rowsOf(f, "key_symbols").map((r) => `${r.fill} ${r.what}`);
    const cellFills = new Map(rowsOf(f, "cells").map((r) => [r.what, r.fill]));
    results.basins.attractors.forEach((a, k) => {
      const e = results.equilibria.find((q) => q.id === a)!;
      const pct = `${Number((100 * results.basins.fractions[a]).toPrecision(3))}%`;
      expect(key).toContain(`${REGION_FILLS[k]} ${a} (${e.type.replace(/-/g, " ")}): ${pct}`);
      expect(cellFills.get(a)).toBe(REGION_FILLS[k]);
    });
    // the separatrices and the equilibria over the fills, in the portrait's code
    expect(rowsOf(f, "stable_manifolds").length).toBeGreaterThan(0);
    const eq = rowsOf(f, "equilibria");
    expect(eq.map((r) => r.what)).toEqual(results.equilibria.map((e) => e.id));
    expect(eq.find((r) => r.what === "E3")!.shape).toBe(EQUILIBRIUM_MARKERS.saddle.shape);
    expect(f.caption).toMatch(/128 × 128/);
    expect(f.caption).toContain("±");
  });

  it("downsampleBasinGrid(4 × 4, at most 2 a side) takes each 2 × 2 block's majority, a tie to the first legend entry", () => {
    // hand-worked; rows from the bottom: blocks (lower left, lower right, upper left, upper right)
    const cells = [0, 1, 2, 2, 1, 1, 2, 0, 0, 0, 1, 2, 1, 1, 2, 1];
    const grid = {
      nx: 4,
      ny: 4,
      legend: ["E1", "E2", "undecided"],
      runs: encodeRuns(Int32Array.from(cells), (l) => l),
    };
    const drawn = downsampleBasinGrid(grid, 2);
    expect(drawn.factor).toBe(2);
    // lower left 0,1,1,1 → 1; lower right 2,2,2,0 → 2; upper left 0,0,1,1 → tie → 0; upper right 1,2,2,1 → tie → 1
    expect(Array.from(drawn.cells)).toEqual([1, 2, 0, 1]);
  });

  it("buildBasinFigure(1024 × 1024 grid) draws it at 256 × 256 and says so in the caption", () => {
    const { results, spec } = runs.get("grazer-forage")!;
    const n = 1024;
    const labels = new Int32Array(n * n);
    // a disc of E2 in E4, with one undecided row through it
    for (let j = 0; j < n; j++)
      for (let i = 0; i < n; i++)
        labels[j * n + i] = Math.hypot(i - 400, j - 600) < 300 ? 0 : j === 100 ? 4 : 1;
    const big: Results = {
      ...results,
      basins: {
        ...results.basins,
        resolution: n,
        grid: { ...results.basins.grid, nx: n, ny: n, runs: encodeRuns(labels, (l) => l) },
      },
    };
    const f = buildFigures(big, spec).find((q) => q.id === "basins")!;
    expect(BASIN_DRAW_MAX).toBe(256);
    const rows = rowsOf(f, "cells");
    expect(rows.reduce((s, r) => s + Number(r.cells), 0)).toBe(256 * 256);
    // a single undecided row is a quarter of each 4 × 4 block: the majority hides it
    expect(rows.some((r) => r.what === "undecided")).toBe(false);
    expect(f.caption).toMatch(/drawn at 256 × 256/);
    expect(f.caption).toMatch(/majority/);
    const found: string[] = [];
    compileFigure(buildBasinFigure(big, spec), found);
    expect(found).toEqual([]);
  });
});

describe("the basin map of a limit cycle", () => {
  it("basins(r' = r(1 − r²), θ' = 1) keys the orbit as C1 (stable cycle) and draws it over the fills", async () => {
    // In Cartesian form x' = x − y − x(x² + y²), y' = x + y − y(x² + y²): the cycle r = 1 attracts
    // every start but the unstable focus at the origin (Strogatz, Nonlinear Dynamics and Chaos,
    // 2nd ed., Example 7.1.1), so its basin is the whole window.
    const out = run(
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
        analysis: { basins: { resolution: 32, coarse: 8 } },
      }),
    );
    expect(out.results.basins.attractors).toEqual(["C1"]);
    const f = buildFigures(out.results, out.spec).find((q) => q.id === "basins")!;
    const key = rowsOf(f, "key_symbols").map((r) => r.what);
    expect(key[0]).toMatch(/^C1 \(stable cycle\): (99\.\d|100)%$/);
    const orbit = rowsOf(f, "cycles_attracting");
    expect(orbit.length).toBeGreaterThan(50);
    for (const r of orbit) expect(Math.hypot(Number(r.x), Number(r.y))).toBeCloseTo(1, 4);
    const diagnostics = { warnings: [] as string[] };
    await renderSvg(f.spec, diagnostics);
    expect(diagnostics.warnings).toEqual([]);
  });
});

describe("the bifurcation diagrams", () => {
  it("bifurcation(example) marks every threshold once per panel, in the SVG and in the data", () => {
    for (const id of EXAMPLES) {
      const { results } = runs.get(id)!;
      for (const study of results.conditions.studies) {
        const f = figures.get(id)!.find((q) => q.id === `bifurcation-${study.parameter}`);
        if (!f) continue;
        const svg = svgs.get(`${id}/${f.id}`)!;
        results.model.states.forEach((state, k) => {
          const rows = rowsOf(f, `special_points_${k + 1}`);
          expect(rows.length, `${f.id} panel ${k + 1}`).toBe(study.thresholds.length);
          expect(countMarks(svg, "symbol", `special_points_${k + 1}`), f.id).toBe(study.thresholds.length);
          rows.forEach((r, i) => {
            // plotted data keep 7 significant digits (geometry.ts DATA_DIGITS)
            expect(Math.abs(Number(r.x) - study.thresholds[i].value)).toBeLessThanOrEqual(
              1e-6 * (study.range[1] - study.range[0]),
            );
            expect(r.shape).toBe(SPECIAL_POINT_MARKERS[study.thresholds[i].kind].shape);
            const [lo, hi] = results.model.window[state];
            expect(Math.abs(Number(r.y) - study.thresholds[i].point[state])).toBeLessThanOrEqual(
              1e-6 * (hi - lo),
            );
          });
        });
        const labels = layersOf(f.spec as View)
          .filter((l) => /^special_labels_\d_(left|right)$/.test(l.name ?? ""))
          .flatMap((l) => l.data!.values);
        expect(labels.length, f.id).toBe(study.thresholds.length);
      }
    }
  });

  it("bifurcation(reservoir-competition, a12) puts the transcritical at a12 = K1/K2, where (0, K2) meets the coexistence branch", () => {
    // Competitive Lotka–Volterra: at (0, K2) the perch's invasion rate is r1 (1 − a12 K2/K1), zero at
    // a12 = K1/K2; there the coexistence equilibrium passes through (0, K2) and the two exchange
    // stability (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §6.4 and §3.2 for the transcritical).
    const { results } = runs.get("reservoir-competition")!;
    const p = results.model.parameters;
    const f = figure("reservoir-competition", "bifurcation-a12");
    const [inN, inS] = [rowsOf(f, "special_points_1"), rowsOf(f, "special_points_2")];
    expect(inN.length).toBe(1);
    expect(inN[0].shape).toBe(SPECIAL_POINT_MARKERS.transcritical.shape);
    expect(Number(inN[0].x)).toBeCloseTo(p.K1 / p.K2, 6);
    expect(Number(inN[0].y)).toBeCloseTo(0, 3);
    expect(Number(inS[0].y) / p.K2).toBeCloseTo(1, 6);
    const text = layersOf(f.spec as View)
      .filter((l) => /^special_labels_1_(left|right)$/.test(l.name ?? ""))
      .flatMap((l) => l.data!.values)
      .map((r) => r.text);
    expect(text).toEqual([`transcritical ${labelNumber(p.K1 / p.K2)}`]);
    expect(labelNumber(p.K1 / p.K2)).toBe("0.6667");
  });

  it("bifurcation(example) spans the range on x and the window on y, with the current value as a rule", () => {
    for (const id of EXAMPLES) {
      const { results } = runs.get(id)!;
      for (const study of results.conditions.studies) {
        const f = figures.get(id)!.find((q) => q.id === `bifurcation-${study.parameter}`);
        if (!f) continue;
        results.model.states.forEach((state, k) => {
          const now = layer(f, `now_${k + 1}`)!;
          expect(now.encoding!.x.scale!.domain).toEqual(study.range);
          expect(now.encoding!.y.scale!.domain).toEqual(results.model.window[state]);
          expect(now.data!.values.map((r) => r.x)).toEqual([study.nominal, study.nominal]);
          for (const s of ["stable", "unstable", "undecided"])
            for (const r of rowsOf(f, `branches_${s}_${k + 1}`)) {
              const [lo, hi] = results.model.window[state];
              expect(Number(r.y)).toBeGreaterThanOrEqual(lo - 1e-6 * (hi - lo));
              expect(Number(r.y)).toBeLessThanOrEqual(hi + 1e-6 * (hi - lo));
            }
        });
        expect(rowsOf(f, "now_label").map((r) => r.text)).toEqual(["now"]);
      }
    }
  });

  it("bifurcation(reservoir-competition, a12) draws stable branches solid and unstable ones dashed", () => {
    const f = figure("reservoir-competition", "bifurcation-a12");
    expect(layer(f, "branches_stable_1")!.mark!.strokeDash).toBeUndefined();
    expect(layer(f, "branches_unstable_1")!.mark!.strokeDash).toEqual(BRANCH_STYLES.unstable.strokeDash);
    expect(new Set(Object.values(BRANCH_STYLES).map((s) => JSON.stringify(s.strokeDash))).size).toBe(3);
  });

  const branch = (values: number[], ys: number[], stable: (boolean | null)[]): BranchResult => ({
    index: 0,
    seed: { value: values[0], point: { x: 0, y: ys[0] } },
    ends: ["range", "range"],
    points: values.map((v, k) => ({
      value: v,
      point: { x: 0, y: ys[k] },
      stable: stable[k],
      type: "saddle",
      trace: 0,
      determinant: 0,
    })),
  });

  it("branchPieces(stable, stable, unstable, unstable, undecided) splits at the midpoint and lets a lone undecided end follow its neighbour", () => {
    const pieces = branchPieces(
      branch([0, 1, 2, 3, 4], [0, 10, 20, 30, 40], [true, true, false, false, null]),
      "y",
    );
    expect(pieces).toEqual([
      { stability: "stable", line: { x: [0, 1, 1.5], y: [0, 10, 15] } },
      { stability: "unstable", line: { x: [1.5, 2, 3, 4], y: [15, 20, 30, 40] } },
    ]);
  });

  it("branchPieces(undecided, undecided, stable) draws the undecided stretch dotted and the rest solid", () => {
    const pieces = branchPieces(branch([0, 1, 2], [5, 6, 7], [null, null, true]), "y");
    expect(pieces.map((p) => p.stability)).toEqual(["undecided", "stable"]);
    expect(pieces[0].line).toEqual({ x: [0, 1], y: [5, 6] });
    expect(pieces[1].line).toEqual({ x: [1, 2], y: [6, 7] });
  });

  it("labelNumber(value) rounds to four significant digits without an exponent below a million", () => {
    expect(labelNumber(30000)).toBe("30000");
    expect(labelNumber(1.136318)).toBe("1.136");
    expect(labelNumber(0.0709712)).toBe("0.07097");
  });

  it("buildBifurcationFigure(study with a Hopf point) marks it with a ring and names its criticality", () => {
    const { results, spec } = runs.get("grazer-forage")!;
    const study = results.conditions.studies.find((s) => s.parameter === "r")!;
    const hopf = { ...study.thresholds[0], kind: "hopf" as const, criticality: "subcritical" as const };
    const f = buildBifurcationFigure(results, spec, { ...study, thresholds: [hopf] });
    const asFigure = { id: "x", title: "", caption: "", spec: f };
    expect(rowsOf(asFigure, "special_points_1")[0].shape).toBe(SPECIAL_POINT_MARKERS.hopf.shape);
    const text = layersOf(f as View)
      .filter((l) => /^special_labels_1_(left|right)$/.test(l.name ?? ""))
      .flatMap((l) => l.data!.values)
      .map((r) => r.text);
    expect(text).toEqual([`Hopf (sub) ${labelNumber(hopf.value)}`]);
  });
});

describe("the outcome map", () => {
  it("outcomeMap(reservoir-competition, a12 × a21) draws nx × ny cells, in the SVG and in the data", () => {
    const { results } = runs.get("reservoir-competition")!;
    const map = results.conditions.maps[0];
    const f = figure("reservoir-competition", "outcome-map-a12-a21");
    const cells = rowsOf(f, "cells");
    expect(cells.length).toBe(map.nx * map.ny);
    expect(countMarks(svgs.get("reservoir-competition/outcome-map-a12-a21")!, "rect", "cells")).toBe(
      map.nx * map.ny,
    );
    expect(cells.map((r) => r.what)).toEqual(map.cells.map((c) => `outcome ${outcomeLetter(c)}`));
  });

  it("outcomeMap(reservoir-competition) puts each cell where the competition outcome of its centre says", () => {
    // Competitive Lotka–Volterra: coexistence when a12 < K1/K2 and a21 < K2/K1, bistability when both
    // inequalities reverse, otherwise the stronger competitor alone (Strogatz, Nonlinear Dynamics and
    // Chaos, 2nd ed., §6.4; Murray, Mathematical Biology I, 3rd ed., §3.5).
    const { results } = runs.get("reservoir-competition")!;
    const p = results.model.parameters;
    const map = results.conditions.maps[0];
    const f = figure("reservoir-competition", "outcome-map-a12-a21");
    const dx = (map.ranges[0][1] - map.ranges[0][0]) / map.nx,
      dy = (map.ranges[1][1] - map.ranges[1][0]) / map.ny;
    // the stable equilibria, each by the states it keeps present
    const expected = (a12: number, a21: number) => {
      const perchInvades = a12 < p.K1 / p.K2,
        breamInvades = a21 < p.K2 / p.K1;
      return perchInvades && breamInvades
        ? ["N,S"]
        : !perchInvades && !breamInvades
          ? ["N", "S"]
          : perchInvades
            ? ["N"]
            : ["S"];
    };
    rowsOf(f, "cells").forEach((r, c) => {
      const found = map.legend[map.cells[c]].attractors
        .map((a) => (a.kind === "equilibrium" ? a.present.join() : "cycle"))
        .sort();
      expect(found).toEqual(expected(Number(r.x) + dx / 2, Number(r.y) + dy / 2));
    });
  });

  it("outcomeMap(reservoir-competition) draws the a12 threshold curve at a12 = K1/K2 for every a21, dashed as transcritical", () => {
    // a12 = K1/K2 does not depend on a21 (same source as above): the traced curve is a vertical line
    const { results } = runs.get("reservoir-competition")!;
    const p = results.model.parameters;
    const f = figure("reservoir-competition", "outcome-map-a12-a21");
    const curve = layer(f, "curves_transcritical")!;
    expect(curve.mark!.strokeDash).toEqual(THRESHOLD_CURVE_STYLES.transcritical.strokeDash);
    const vertical = curve.data!.values.filter((r) => Math.abs(Number(r.x) - p.K1 / p.K2) < 1e-6);
    expect(vertical.length).toBeGreaterThan(20);
    const ys = vertical.map((r) => Number(r.y));
    expect(Math.min(...ys)).toBeCloseTo(results.conditions.maps[0].ranges[1][0], 6);
    expect(Math.max(...ys)).toBeCloseTo(results.conditions.maps[0].ranges[1][1], 6);
    expect(rowsOf(f, "now").map((r) => [r.x, r.y])).toEqual([[p.a12, p.a21]]);
  });

  it("outcomeMap(example) keys outcomes by letter and spells each out in the caption", () => {
    const { results, spec } = runs.get("reservoir-competition")!;
    const map = results.conditions.maps[0];
    const f = figure("reservoir-competition", "outcome-map-a12-a21");
    const key = rowsOf(f, "key_text").map((r) => (r.text as string[]).join(" "));
    map.legend.forEach((outcome, k) => {
      expect(key).toContain(`outcome ${outcomeLetter(k)}`);
      expect(f.caption).toContain(`${outcomeLetter(k)}, ${outcomeWords(outcome, stateTerms(spec.states))}`);
    });
    expect(
      rowsOf(f, "letters")
        .map((r) => r.text)
        .sort(),
    ).toEqual(map.legend.map((_, k) => outcomeLetter(k)).filter((_, k) => map.cells.includes(k)));
    expect([0, 25, 26, 27].map(outcomeLetter)).toEqual(["A", "Z", "AA", "AB"]);
  });
});

describe("visual code of the maps and diagrams", () => {
  // CIELAB lightness from sRGB (D65), CIE 15:2004 formulae
  const channel = (c: number) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  const lightness = (hex: string) => {
    const [r, g, b] = [1, 3, 5].map((i) => channel(parseInt(hex.slice(i, i + 2), 16)));
    const Y = 0.2126 * r + 0.7152 * g + 0.0722 * b;
    return 116 * (Y > 216 / 24389 ? Math.cbrt(Y) : ((24389 / 27) * Y + 16) / 116) - 16;
  };

  it("palette: region fills and the special greys differ pairwise in lightness, so they part in grey-scale print", () => {
    // 5 L* units is a clearly visible step in grey (common practice)
    const fills = [...REGION_FILLS, ...Object.values(SPECIAL_REGION_FILLS)];
    for (let i = 0; i < fills.length; i++)
      for (let j = i + 1; j < fills.length; j++) {
        expect(
          Math.abs(lightness(fills[i]) - lightness(fills[j])),
          `${fills[i]} ${fills[j]}`,
        ).toBeGreaterThanOrEqual(5);
      }
    // light enough that ink markers and the separatrix (L* 36) keep their contrast over them (common practice)
    for (const f of fills) expect(lightness(f)).toBeGreaterThanOrEqual(50);
  });

  it("markers: the four kinds of special point have four shapes, none drawn like an equilibrium marker", () => {
    const shapes = Object.values(SPECIAL_POINT_MARKERS).map((m) => m.shape);
    expect(new Set(shapes).size).toBe(4);
    // the Hopf ring shares the stable disc's outline but not its fill
    const looks = (m: { shape: string; fill: string }) => `${m.shape} ${m.fill}`;
    for (const m of Object.values(EQUILIBRIUM_MARKERS))
      expect(Object.values(SPECIAL_POINT_MARKERS).map(looks)).not.toContain(looks(m));
    expect(new Set(Object.values(THRESHOLD_CURVE_STYLES).map((s) => JSON.stringify(s.strokeDash))).size).toBe(
      4,
    );
  });
});

describe("figures agree with the results they draw", () => {
  const asFigure = (spec: unknown): Figure => ({ id: "x", title: "", caption: "", spec }) as Figure;
  const branchRows = (f: Figure, k: number) =>
    ["stable", "unstable", "undecided"].flatMap((s) => rowsOf(f, `branches_${s}_${k}`));

  it("bifurcation(reservoir-competition, a12) draws no part of the coexistence branch where its N is negative", () => {
    // Competitive Lotka–Volterra (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §6.4; Murray,
    // Mathematical Biology I, 3rd ed., §3.5): the coexistence point is ((K1 − a12 K2), (K2 − a21 K1)) /
    // (1 − a12 a21); for a12 > K1/K2 its N is negative while its S = (K2 − a21 K1)/(1 − a12 a21) lies
    // inside the S window. The other branches are (0, 0), (K1, 0) and (0, K2): S is 0 or K2 there.
    const { results } = runs.get("reservoir-competition")!;
    const p = results.model.parameters;
    const f = figure("reservoir-competition", "bifurcation-a12");
    const beyond = branchRows(f, 2).filter((r) => Number(r.x) > (p.K1 / p.K2) * (1 + 1e-6));
    expect(beyond.length).toBeGreaterThan(0);
    for (const r of beyond) {
      const y = Number(r.y);
      expect(Math.min(Math.abs(y), Math.abs(y - p.K2)) / p.K2, `S panel at a12 = ${r.x}`).toBeLessThan(1e-6);
    }
    for (const r of branchRows(f, 1)) expect(Number(r.y)).toBeGreaterThanOrEqual(0);
  });

  it("buildBifurcationFigure(a stable branch leaving N ≥ 0 at a12 = 0.55, window below the bound) draws it solid only up to 0.55", () => {
    // A hand-made branch (not keel's output): N = 40000 (0.55 − a12), S = 30000, stable throughout; the
    // window reaches N = −20000, below the state's bound N ≥ 0, so only the feasible-region cut hides it.
    const { results, spec } = runs.get("reservoir-competition")!;
    const study = results.conditions.studies.find((s) => s.parameter === "a12")!;
    const values = Array.from({ length: 29 }, (_, k) => 0.2 + 0.025 * k);
    const branch: BranchResult = {
      index: 0,
      seed: { value: values[0], point: { N: 40000 * 0.35, S: 30000 } },
      ends: ["range", "range"],
      points: values.map((v) => ({
        value: v,
        point: { N: 40000 * (0.55 - v), S: 30000 },
        stable: true,
        type: "stable-node",
        trace: -1,
        determinant: 1,
      })),
    };
    const window: Results["model"]["window"] = { ...results.model.window, N: [-20000, 60000] };
    const wide: Results = { ...results, model: { ...results.model, window } };
    const f = asFigure(
      buildBifurcationFigure(wide, spec, {
        ...study,
        thresholds: [],
        continuation: { ...study.continuation, branches: [branch] },
      }),
    );
    for (const k of [1, 2]) {
      const solid = rowsOf(f, `branches_stable_${k}`);
      expect(solid.length).toBeGreaterThan(2);
      expect(Math.max(...solid.map((r) => Number(r.x)))).toBeCloseTo(0.55, 6);
    }
    const inN = rowsOf(f, "branches_stable_1").map((r) => Number(r.y));
    expect(Math.min(...inN)).toBe(0);
  });

  it("buildPortraitFigure(a manifold that leaves the window and runs on outside) draws its curve, not chords between outside points", () => {
    // A hand-made unstable manifold: 41 points on a quarter ellipse inside the window (≥ 5 px apart, so
    // thinning keeps them all), one step leaving through the top edge S = 80000 at N = 30000, then two
    // points far outside whose chords cut across the window.
    const { results, spec } = runs.get("reservoir-competition")!;
    const arc = Array.from({ length: 41 }, (_, k) => (Math.PI / 2) * (k / 40));
    const x = [...arc.map((t) => 30000 + 20000 * Math.cos(t)), 30000, -50000, 120000];
    const y = [...arc.map((t) => 40000 + 30000 * Math.sin(t)), 100000, 40000, 40000];
    const separatrix = {
      saddle: "E9",
      manifold: "unstable" as const,
      side: 1 as const,
      start: { N: x[0], S: y[0] },
      fate: {
        kind: "left-window" as const,
        point: { N: 30000, S: 80000 },
        edge: { state: "S", value: 80000 },
      },
      path: { t: x.map((_, k) => k), x, y },
    };
    const f = asFigure(
      buildPortraitFigure({
        results: { ...results, separatrices: [separatrix] } as Results,
        spec,
        nullclines: null,
        field: null,
      }),
    );
    const rows = rowsOf(f, "unstable_manifolds");
    expect(new Set(rows.map((r) => r.k)).size).toBe(1);
    expect(rows).toHaveLength(42);
    expect(rows.at(-1)).toMatchObject({ x: 30000, y: 80000 });
  });
});

import { beforeAll, describe, expect, it } from "vitest";
import { analyzeAsync } from "../../src/analysis/analyze.js";
import { instantiateBasinKernel, type BasinKernel } from "../../src/analysis/basins/kernel.js";
import { labelName } from "../../src/analysis/basins/labels.js";
import { decodeRuns } from "../../src/analysis/basins/refine.js";
import type { Results, SeparatrixResult } from "../../src/analysis/types.js";
import type { Box } from "../../src/analysis/numeric/window.js";
import type { Model } from "../../src/model/types.js";
import { prepareModel, runPipeline } from "../../src/pipeline.js";
import { exampleField, exampleSpec as readExample } from "../fixtures/examples.js";
import { fixtureSpec, type ModelFixture } from "../fixtures/models.js";
import { seededUniform } from "../fixtures/random.js";
import { runReference } from "../fixtures/scipy.js";
import { referenceFate, rk4Step, type Field, type Point } from "../fixtures/reference-integrators.js";

/**
 * Cells whose centre lies within this many cell widths of the separatrix may sit on either side (cell-centre
 * sampling).
 */
const NEAR_CURVE_CELLS = 3;
/** Substeps of RK4 between consecutive separatrix points when densifying the polyline. */
const DENSIFY_SUBSTEPS = 8;
/**
 * A stable-manifold branch that ends at an equilibrium is carried on by RK4 until this close to it (scaled),
 * then joined to it by a chord: far below the 3-cell band.
 */
const EXTEND_TO_EQUILIBRIUM = 1e-3;
/**
 * Kernel and reference may disagree only for a start this close (scaled) to a separatrix: far above
 * both integrators' global error (tolerances 1e-7 and 1e-9 relative, amplified by the saddle's
 * passage), far below the 500 starts' typical spacing (~0.04), so a disagreement elsewhere fails.
 */
const SEPARATRIX_NEAR = 1e-4;
/**
 * Fractions: the map and the reference grid can also disagree on one start that lies within the two
 * integrators' error of a separatrix, and such a cell need not be a boundary cell of the map.
 * One cell per label is allowed on top of the stated errorBound.
 */
const FRACTION_ALLOWANCE_CELLS = 1;

// ---------------------------------------------------------------- models

/** Competition model (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4, rabbits vs sheep). */
const COMPETITION: ModelFixture = {
  id: "competition",
  equations: { x: "x*(3 - x - 2*y)", y: "y*(2 - x - y)" },
  window: { x: [0, 3], y: [0, 3] },
};
/** The competition field typed out again, for the reference integrator. */
const competitionField: Field = (x, y) => [x * (3 - x - 2 * y), y * (2 - x - y)];
/**
 * Van der Pol oscillator, mu = 1 (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., sections 7.1 and 7.5): one
 * stable limit cycle around an unstable focus.
 */
const VAN_DER_POL: ModelFixture = {
  id: "van-der-pol",
  equations: { x: "y", y: "mu*(1 - x^2)*y - x" },
  parameters: { mu: 1 },
  window: { x: [-4, 4], y: [-4, 4] },
};

function withBasins(spec: Record<string, unknown>, basins?: { resolution: number; coarse: number }): string {
  return JSON.stringify(basins ? { ...spec, analysis: { basins } } : spec);
}

function run(specText: string): { model: Model; results: Results } {
  const out = runPipeline(specText);
  if (!out.ok) throw new Error(JSON.stringify(out.issues));
  return { model: out.value.model, results: out.value.results };
}

const exampleSpec = (file: string): Record<string, unknown> => readExample(file.replace(/\.json$/, ""));
const exampleFieldOf = (file: string): Field => exampleField(file.replace(/\.json$/, ""));

/** Runs the analysis and keeps the kernel it generated (the evaluator receives plan.kernelSource). */
async function analyzeKeepingKernel(
  specText: string,
): Promise<{ model: Model; results: Results; kernel: BasinKernel }> {
  const prepared = prepareModel(specText);
  if (!prepared.ok) throw new Error(JSON.stringify(prepared.issues));
  let source = "";
  const results = await analyzeAsync(prepared.value.model, (kernelSource) => {
    source = kernelSource;
    const kernel = instantiateBasinKernel(kernelSource);
    return async (starts) => {
      const out = new Int32Array(starts.length / 2);
      kernel(starts, out);
      return out;
    };
  });
  return { model: prepared.value.model, results, kernel: instantiateBasinKernel(source) };
}

// ---------------------------------------------------------------- geometry and independent integration

function boxOf(results: Results): Box {
  const names = results.model.states;
  const lo = names.map((n) => results.model.window[n][0]);
  const hi = names.map((n) => results.model.window[n][1]);
  return { lo, hi, width: lo.map((l, k) => hi[k] - l) };
}

/** Decoded grid as label names, row-major from the lowest second-state row. */
function gridNames(results: Results): { n: number; names: string[] } {
  const g = results.basins.grid;
  const values = decodeRuns(g.runs, g.nx * g.ny);
  return { n: g.nx, names: Array.from(values, (v) => g.legend[v]) };
}

function cellCentre(box: Box, n: number, i: number, j: number): Point {
  return [box.lo[0] + ((i + 0.5) / n) * box.width[0], box.lo[1] + ((j + 0.5) / n) * box.width[1]];
}

/**
 * A stable-manifold branch from results.separatrices as a dense polyline starting at the saddle:
 * between keel's step points RK4 (backward time) fills in DENSIFY_SUBSTEPS points, since odex
 * steps are long and their chords stray from the curve. A branch that left the window stops at
 * its exit point, carried on one window width along its last chord so that no cell sees the end
 * as its nearest point; one that ends at an equilibrium is carried on by RK4 to that equilibrium
 * (keel stops at a capture region, which can be a quarter of the window across).
 */
function branchPolyline(f: Field, results: Results, branch: SeparatrixResult): Point[] {
  const box = boxOf(results);
  const scaled = (a: Point, b: Point) =>
    Math.hypot((a[0] - b[0]) / box.width[0], (a[1] - b[1]) / box.width[1]);
  const inside = (p: Point) => p.every((v, k) => v >= box.lo[k] && v <= box.hi[k]);
  const { t, x, y } = branch.path;
  const out: Point[] = [[x[0], y[0]]];
  for (let k = 1; k < t.length; k++) {
    const next: Point = [x[k], y[k]];
    if (!inside(next)) break;
    const dt = t[k] - t[k - 1];
    let p: Point = [x[k - 1], y[k - 1]];
    for (let s = 1; s < DENSIFY_SUBSTEPS && dt > 0; s++) {
      p = rk4Step(f, p, -dt / DENSIFY_SUBSTEPS);
      out.push(p);
    }
    out.push(next);
  }
  const end = branch.fate;
  if (end.kind === "left-window") {
    const names = results.model.states;
    const exit: Point = [end.point[names[0]], end.point[names[1]]];
    const last = out[out.length - 1];
    const chord = scaled(exit, last) || 1;
    out.push(exit, [exit[0] + (exit[0] - last[0]) / chord, exit[1] + (exit[1] - last[1]) / chord]);
  } else if (end.kind === "equilibrium") {
    const e = results.equilibria.find((q) => q.id === end.target)!;
    const target: Point = [e.point[results.model.states[0]], e.point[results.model.states[1]]];
    const rate = Math.max(...e.eigenvalues.map((ev) => Math.hypot(ev.re, ev.im)));
    const h = 0.05 / rate;
    let p = out[out.length - 1];
    for (let k = 0; k < 200_000 && scaled(p, target) > EXTEND_TO_EQUILIBRIUM; k++) {
      p = rk4Step(f, p, -h);
      out.push(p);
    }
    out.push(target);
  }
  return out;
}

/** Both stable branches of a saddle joined into one oriented curve: branch −1 reversed, then branch +1. */
function saddleStableCurve(f: Field, results: Results, saddle: string): Point[] {
  const branches = results.separatrices.filter((s) => s.saddle === saddle && s.manifold === "stable");
  const minus = branchPolyline(
    f,
    results,
    branches.find((b) => b.side === -1)!,
  );
  const plus = branchPolyline(
    f,
    results,
    branches.find((b) => b.side === 1)!,
  );
  return [...minus.reverse(), ...plus.slice(1)];
}

/**
 * Scaled distance to a polyline, and the sign of the cross product with its nearest segment (+1: left of the
 * direction of travel).
 */
function nearestSide(box: Box, curve: Point[], p: Point): { distance: number; side: number } {
  let best = Infinity;
  let side = 0;
  const px = p[0] / box.width[0],
    py = p[1] / box.width[1];
  for (let k = 0; k + 1 < curve.length; k++) {
    const ax = curve[k][0] / box.width[0],
      ay = curve[k][1] / box.width[1];
    const dx = curve[k + 1][0] / box.width[0] - ax,
      dy = curve[k + 1][1] / box.width[1] - ay;
    const len2 = dx * dx + dy * dy;
    const u = len2 > 0 ? Math.min(1, Math.max(0, ((px - ax) * dx + (py - ay) * dy) / len2)) : 0;
    const d = Math.hypot(px - ax - u * dx, py - ay - u * dy);
    if (d < best) {
      best = d;
      side = Math.sign(dx * (py - ay) - dy * (px - ax));
    }
  }
  return { distance: best, side };
}

/** The map's window and its attractors (stable equilibria here), for the reference fate rule. */
function targetsOf(results: Results) {
  const box = boxOf(results);
  const [a, b] = results.model.states;
  const attractors = results.equilibria
    .filter((e) => results.basins.attractors.includes(e.id))
    .map((e) => ({ id: e.id, point: [e.point[a], e.point[b]] as Point }));
  return { lo: box.lo as [number, number], hi: box.hi as [number, number], attractors };
}

const basinHorizon = (results: Results) => (results.settings.basins as { horizon: number }).horizon;

/**
 * An independent uniform n × n grid of reference labels (Dormand–Prince in the test), at the given cell
 * centres.
 */
function referenceGrid(
  f: Field,
  results: Results,
  n: number,
  centreOf: (i: number, j: number) => Point,
): string[] {
  const targets = targetsOf(results);
  const horizon = basinHorizon(results);
  const out: string[] = [];
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) out.push(referenceFate(f, centreOf(i, j), targets, horizon));
  return out;
}

function fractionsOf(names: string[]): Record<string, number> {
  const counts: Record<string, number> = {};
  for (const name of names) counts[name] = (counts[name] ?? 0) + 1;
  return Object.fromEntries(Object.entries(counts).map(([k, v]) => [k, v / names.length]));
}

/**
 * Cells of an n × n grid next (8-neighbourhood) to a differently labelled cell: the grid's own discretisation
 * error.
 */
function boundaryFraction(names: string[], n: number): number {
  let count = 0;
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      let differs = false;
      for (let dj = -1; dj <= 1 && !differs; dj++)
        for (let di = -1; di <= 1 && !differs; di++) {
          const a = i + di,
            b = j + dj;
          if (a >= 0 && a < n && b >= 0 && b < n && names[b * n + a] !== names[j * n + i]) differs = true;
        }
      if (differs) count++;
    }
  return count / (n * n);
}

/**
 * Whether fine cell (i, j) of the map is a boundary cell (borders another label), as errorBound counts them.
 */
function isMapBoundary(names: string[], n: number, i: number, j: number): boolean {
  for (let dj = -1; dj <= 1; dj++)
    for (let di = -1; di <= 1; di++) {
      const a = i + di,
        b = j + dj;
      if (a >= 0 && a < n && b >= 0 && b < n && names[b * n + a] !== names[j * n + i]) return true;
    }
  return false;
}

function equilibriumAt(results: Results, point: Point): string {
  const [a, b] = results.model.states;
  const found = results.equilibria.find(
    (e) => Math.abs(e.point[a] - point[0]) < 1e-9 && Math.abs(e.point[b] - point[1]) < 1e-9,
  );
  if (!found) throw new Error(`no equilibrium at ${point}`);
  return found.id;
}

// ---------------------------------------------------------------- 1, 2: the competition model

describe("basin map of the competition model (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 6.4)", () => {
  // Strogatz, section 6.4: (0,0) unstable node, (0,2) and (3,0) stable nodes, (1,1) a saddle
  // whose stable manifold separates the basins of (0,2) and (3,0).
  let results: Results, box: Box, upperLeft: string, lowerRight: string;
  beforeAll(() => {
    ({ results } = run(withBasins(fixtureSpec(COMPETITION), { resolution: 256, coarse: 16 })));
    box = boxOf(results);
    upperLeft = equilibriumAt(results, [0, 2]);
    lowerRight = equilibriumAt(results, [3, 0]);
  });

  it("analyze(competition).basins has the attractors (0,2) and (3,0)", () => {
    expect([...results.basins.attractors].sort()).toEqual([upperLeft, lowerRight].sort());
    expect(results.equilibria.find((e) => e.id === equilibriumAt(results, [1, 1]))?.type).toBe("saddle");
  });

  it("analyze(competition).basins labels every cell farther than 3 cells from the saddle's stable manifold with its side's attractor", () => {
    const curve = saddleStableCurve(competitionField, results, equilibriumAt(results, [1, 1]));
    // which side is whose, decided by the attractors' own positions
    const sideLabel = new Map([
      [nearestSide(box, curve, [0, 2]).side, upperLeft],
      [nearestSide(box, curve, [3, 0]).side, lowerRight],
    ]);
    expect(sideLabel.size).toBe(2);
    const { n, names } = gridNames(results);
    const near = NEAR_CURVE_CELLS / n;
    let far = 0,
      wrongFar = 0,
      close = 0,
      disagreeClose = 0;
    for (let j = 0; j < n; j++)
      for (let i = 0; i < n; i++) {
        const { distance, side } = nearestSide(box, curve, cellCentre(box, n, i, j));
        const agrees = names[j * n + i] === sideLabel.get(side);
        if (distance > near) {
          far++;
          if (!agrees) wrongFar++;
        } else {
          close++;
          if (!agrees) disagreeClose++;
        }
      }
    console.info(
      `competition ${n}x${n}: ${far} cells beyond ${NEAR_CURVE_CELLS} cells of the separatrix, ${wrongFar} mislabelled; ${close} within, ${disagreeClose} of them on the other side's label`,
    );
    expect(wrongFar).toBe(0);
    // the band near the curve must not swallow the test
    expect(far).toBeGreaterThan(0.9 * n * n);
  });

  it("analyze(competition, 128/16).basins fractions agree with a uniform 128 x 128 reference grid within errorBound", () => {
    const low = run(withBasins(fixtureSpec(COMPETITION), { resolution: 128, coarse: 16 }));
    const { n, names } = gridNames(low.results);
    const independent = referenceGrid(competitionField, low.results, n, (i, j) => cellCentre(box, n, i, j));
    expectLabelsAndFractionsAgree(low.results, names, independent, n, "competition 128/16");
  });
});

/**
 * Label by label, a map cell may differ from the reference at the same start only on the map's boundary
 * cells (those errorBound counts) or within FRACTION_ALLOWANCE_CELLS; fractions then differ by at
 * most errorBound plus that allowance.
 */
function expectLabelsAndFractionsAgree(
  results: Results,
  names: string[],
  independent: string[],
  n: number,
  what: string,
) {
  let differ = 0,
    differOffBoundary = 0;
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      if (names[j * n + i] === independent[j * n + i]) continue;
      differ++;
      if (!isMapBoundary(names, n, i, j)) differOffBoundary++;
    }
  const mine = fractionsOf(names),
    theirs = fractionsOf(independent);
  const worst = Math.max(
    ...[...new Set([...Object.keys(mine), ...Object.keys(theirs)])].map((k) =>
      Math.abs((mine[k] ?? 0) - (theirs[k] ?? 0)),
    ),
  );
  console.info(
    `${what}: ${differ} of ${n * n} cells differ from the reference (${differOffBoundary} off the map's boundary); worst fraction gap ${worst.toExponential(2)}, errorBound ${results.basins.errorBound.toExponential(2)}`,
  );
  expect(differOffBoundary).toBeLessThanOrEqual(FRACTION_ALLOWANCE_CELLS);
  expect(worst).toBeLessThanOrEqual(results.basins.errorBound + FRACTION_ALLOWANCE_CELLS / (n * n));
}

// ---------------------------------------------------------------- 2, 3, 6: the example specs

describe("basin maps of the example specs", () => {
  const examples: Record<string, { model: Model; results: Results; kernel: BasinKernel }> = {};
  beforeAll(async () => {
    // the default basin map; the parameter studies are not under test here and would only cost time
    for (const file of ["reservoir-competition.json", "grazer-forage.json"]) {
      const spec = exampleSpec(file);
      spec.analysis = { ...(spec.analysis as object | undefined), parameters: [] };
      examples[file] = await analyzeKeepingKernel(JSON.stringify(spec));
    }
  });

  it("analyzeAsync(examples) kernel labels 500 seeded random starts each as the reference Dormand–Prince does", () => {
    for (const [file, { results, kernel }] of Object.entries(examples)) {
      const box = boxOf(results);
      const f = exampleFieldOf(file);
      const targets = targetsOf(results);
      const horizon = basinHorizon(results);
      const curves = results.separatrices
        .filter((s) => s.manifold === "stable" && s.path.t.length > 0)
        .map((s) => branchPolyline(f, results, s));
      const uniform = seededUniform(0x5eed + file.length);
      const starts = new Float64Array(1000);
      for (let k = 0; k < 500; k++) {
        starts[2 * k] = box.lo[0] + uniform() * box.width[0];
        starts[2 * k + 1] = box.lo[1] + uniform() * box.width[1];
      }
      const labels = new Int32Array(500);
      kernel(starts, labels);
      const mismatches: string[] = [];
      for (let k = 0; k < 500; k++) {
        const start: Point = [starts[2 * k], starts[2 * k + 1]];
        const mine = labelName(labels[k], results.basins.attractors);
        const theirs = referenceFate(f, start, targets, horizon);
        if (mine === theirs) continue;
        const distance = Math.min(...curves.map((c) => nearestSide(box, c, start).distance));
        mismatches.push(
          `(${start}) kernel ${mine}, reference ${theirs}, ${distance.toExponential(1)} from a separatrix`,
        );
        expect(distance, mismatches.at(-1)).toBeLessThan(SEPARATRIX_NEAR);
      }
      console.info(
        `${file}: ${mismatches.length} of 500 starts labelled differently by kernel and reference${mismatches.length ? `: ${mismatches.join("; ")}` : ""}`,
      );
      // every label is an attractor: none of these starts leaves the window or stays undecided
      expect(Array.from(labels).every((l) => l >= 0)).toBe(true);
    }
  });

  it("analyzeAsync(grazer-forage).basins at 1024 fractions agree with the reference on every 8th fine cell", () => {
    const { results } = examples["grazer-forage.json"];
    const { n, names } = gridNames(results);
    const step = 8,
      m = n / step;
    const box = boxOf(results);
    const independent = referenceGrid(exampleFieldOf("grazer-forage.json"), results, m, (i, j) =>
      cellCentre(box, n, step * i + step / 2, step * j + step / 2),
    );
    let differ = 0,
      differOffBoundary = 0;
    for (let j = 0; j < m; j++)
      for (let i = 0; i < m; i++) {
        const fi = step * i + step / 2,
          fj = step * j + step / 2;
        if (names[fj * n + fi] === independent[j * m + i]) continue;
        differ++;
        if (!isMapBoundary(names, n, fi, fj)) differOffBoundary++;
      }
    // the sample is a 128 x 128 uniform grid: its fractions carry its own boundary fraction as error
    const mine = results.basins.fractions,
      theirs = fractionsOf(independent);
    const worst = Math.max(...results.basins.attractors.map((k) => Math.abs(mine[k] - (theirs[k] ?? 0))));
    const sampleError = boundaryFraction(independent, m);
    console.info(
      `grazer-forage 1024/64 sampled at ${m}x${m}: ${differ} differ from the reference (${differOffBoundary} off the map's boundary); fraction gap ${worst.toExponential(2)}, errorBound ${results.basins.errorBound.toExponential(2)} + sample error ${sampleError.toExponential(2)}`,
    );
    expect(differOffBoundary).toBeLessThanOrEqual(FRACTION_ALLOWANCE_CELLS);
    expect(worst).toBeLessThanOrEqual(results.basins.errorBound + sampleError);
  });

  it("analyzeAsync(examples).basins needs under a tenth of the uniform grid's trajectories at 1024 x 1024", () => {
    for (const [file, { results }] of Object.entries(examples)) {
      const b = results.basins;
      console.info(
        `${file}: ${b.trajectories} trajectories for ${b.uniformTrajectories} cells, ratio ${(b.trajectories / b.uniformTrajectories).toFixed(4)}`,
      );
      expect(b.resolution).toBe(1024);
      expect(b.uniformTrajectories).toBe(1024 * 1024);
      expect(b.trajectories / b.uniformTrajectories).toBeLessThan(0.1);
      expect(decodeRuns(b.grid.runs, b.grid.nx * b.grid.ny)).toHaveLength(1024 * 1024);
      expect([b.grid.nx, b.grid.ny]).toEqual([1024, 1024]);
    }
  });
});

describe("basin map of grazer-forage at resolution 128", () => {
  /**
   * The basin of E4 reaches up the V = 0 edge in a sliver between the edge and the stable
   * manifold of the saddle E3 (it meets G = 30 at V ≈ 14, under 2 cells of 128). A coarse pass
   * sees it only if some coarse centre falls in it: with coarse 64 (blocks of 2 cells, centres at
   * V ≈ 7.8) it does; with coarse 16 or 32 no centre does and the sliver is lost. errorBound does
   * not count a lost feature, so the cell-by-cell check runs at 128/64; at 128/16 only the
   * fraction check asked of the map is made, and the lost cells are reported.
   */
  let fine: Results, independent: string[];
  beforeAll(() => {
    const { results } = run(withBasins(exampleSpec("grazer-forage.json"), { resolution: 128, coarse: 64 }));
    fine = results;
    const box = boxOf(results);
    independent = referenceGrid(exampleFieldOf("grazer-forage.json"), results, 128, (i, j) =>
      cellCentre(box, 128, i, j),
    );
  });

  it("analyze(grazer-forage, 128/64).basins agrees cell by cell with a uniform 128 x 128 reference grid, fractions within errorBound", () => {
    const { n, names } = gridNames(fine);
    expectLabelsAndFractionsAgree(fine, names, independent, n, "grazer-forage 128/64");
  });

  it("analyze(grazer-forage, 128/16).basins fractions agree with a uniform 128 x 128 reference grid within errorBound", () => {
    const { results } = run(withBasins(exampleSpec("grazer-forage.json"), { resolution: 128, coarse: 16 }));
    const { n, names } = gridNames(results);
    const mine = fractionsOf(names),
      theirs = fractionsOf(independent);
    const lost = names.filter((name, k) => name !== independent[k]).length;
    const worst = Math.max(...results.basins.attractors.map((k) => Math.abs(mine[k] - (theirs[k] ?? 0))));
    console.info(
      `grazer-forage 128/16: ${lost} cells differ from the reference (the sliver along V = 0); fraction gap ${worst.toExponential(2)}, errorBound ${results.basins.errorBound.toExponential(2)}`,
    );
    expect(worst).toBeLessThanOrEqual(results.basins.errorBound + FRACTION_ALLOWANCE_CELLS / (n * n));
  });
});

// ---------------------------------------------------------------- 5: a periodic attractor

describe("basin map of the van der Pol oscillator (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., section 7.5)", () => {
  // For mu > 0 the oscillator has a unique, stable limit cycle (Liénard's theorem, Strogatz
  // section 7.4), and the origin is an unstable focus for 0 < mu < 2.
  let results: Results, box: Box;
  beforeAll(() => {
    ({ results } = run(withBasins(fixtureSpec(VAN_DER_POL), { resolution: 128, coarse: 16 })));
    box = boxOf(results);
  });

  it("analyze(vanDerPol).basins has the stable cycle as its only attractor", () => {
    expect(results.cycles.map((c) => [c.id, c.stability])).toEqual([["C1", "stable"]]);
    expect(results.basins.attractors).toEqual(["C1"]);
    expect(results.equilibria.map((e) => e.type)).toEqual(["unstable-focus"]);
  });

  it("analyze(vanDerPol).basins labels every cell C1 or left-window, and C1 within radius 1.5 and inside the orbit", () => {
    const { n, names } = gridNames(results);
    const orbit = results.cycles[0].orbit;
    let insideOrbit = 0;
    // resolution 128 is even, so no cell centre sits on the focus (0, 0)
    for (let j = 0; j < n; j++)
      for (let i = 0; i < n; i++) {
        const p = cellCentre(box, n, i, j);
        const label = names[j * n + i];
        expect(["C1", "left-window"], `cell (${p})`).toContain(label);
        // the region inside a closed orbit is invariant: from there every trajectory stays, and tends to the
        // cycle
        const inside = Math.hypot(p[0], p[1]) < 1.5 || insidePolygon(orbit.x, orbit.y, p);
        if (inside) {
          insideOrbit++;
          expect(label, `cell (${p})`).toBe("C1");
        }
      }
    expect(insideOrbit).toBeGreaterThan(0.1 * n * n);
  });
});

/** Even–odd rule point-in-polygon test (common practice). */
function insidePolygon(xs: number[], ys: number[], p: Point): boolean {
  let inside = false;
  for (let a = 0, b = xs.length - 1; a < xs.length; b = a++) {
    if (ys[a] > p[1] !== ys[b] > p[1] && p[0] < ((xs[b] - xs[a]) * (p[1] - ys[a])) / (ys[b] - ys[a]) + xs[a])
      inside = !inside;
  }
  return inside;
}

// ---------------------------------------------------------------- fates that are not attractors

describe("basin kernel on escapes, blow-ups and slow approaches, against closed forms", () => {
  // Closed forms by separation of variables (common practice): x' = x gives x0 e^t, an
  // exponential escape from the window (a plain exit); x' = x² gives x0 / (1 − x0 t), a blow-up
  // at t = 1/x0 for x0 > 0 and, for x0 < 0, an algebraic approach to the non-hyperbolic origin.
  const cases: { name: string; fixture: ModelFixture; expected: (x: number) => string }[] = [
    {
      name: "x' = x, y' = -y",
      fixture: { id: "escape", equations: { x: "x", y: "-y" }, window: { x: [-1, 1], y: [-1, 1] } },
      expected: () => "left-window",
    },
    {
      name: "x' = x^2, y' = -y",
      fixture: { id: "blow-up", equations: { x: "x^2", y: "-y" }, window: { x: [-1, 1], y: [-1, 1] } },
      expected: (x) => (x > 0 ? "blow-up" : "E1"),
    },
  ];
  for (const { name, fixture, expected } of cases) {
    it(`analyze(${name}).basins labels every cell as the closed form says`, () => {
      const { results } = run(withBasins(fixtureSpec(fixture), { resolution: 16, coarse: 16 }));
      const { n, names } = gridNames(results);
      const box = boxOf(results);
      // 16 is even: no cell centre lies on x = 0, where the closed forms change kind
      for (let j = 0; j < n; j++)
        for (let i = 0; i < n; i++) {
          const p = cellCentre(box, n, i, j);
          expect(names[j * n + i], `cell (${p})`).toBe(expected(p[0]));
        }
    });
  }
});

// ---------------------------------------------------------------- a stable cycle beyond a Hopf point; the feasible region

/**
 * Prey with logistic growth and a predator with a saturating (Holling type II) response, the
 * Rosenzweig–MacArthur model, with invented values. Its interior equilibrium N* = m/(a(b − m h))
 * is unstable, with a stable limit cycle around it, when N* < (K − 1/(a h))/2 (the paradox of
 * enrichment: Rosenzweig, Science 171 (1971) 385–387; the condition from memory): here
 * N* ≈ 1.88 < 2, close enough to the Hopf point that the cycle attracts slowly (multiplier ≈ 0.4
 * per period). The window is [0, 6] × [0, 4]; with bounds equal to it a trajectory that
 * overshoots P = 4 has left, with the predator's bound at 4.1 it is followed on.
 */
const RM_PARAMETERS = { r: 1, K: 5, a: 1, h: 1, b: 0.5, m: 0.3265 };
const RM_WINDOW: Record<string, [number, number]> = { N: [0, 6], P: [0, 4] };
const RM_WIDE: Record<string, [number, number]> = { N: [0, 6], P: [0, 4.1] };
const RM_EQUATIONS = { N: "r*N*(1 - N/K) - a*N*P/(1 + a*h*N)", P: "b*a*N*P/(1 + a*h*N) - m*P" };
/** The same right-hand side typed out in Python syntax for the scipy reference. */
const RM_PYTHON = ["r*N*(1 - N/K) - a*N*P/(1 + a*h*N)", "b*a*N*P/(1 + a*h*N) - m*P"];
/** Seeded random starts in the window for the reference: a few hundred, as the basin fractions' check needs. */
const RM_SAMPLES = 200;
/**
 * Two-sided 99.9 % normal quantile (common practice): a share estimated from RM_SAMPLES
 * independent starts differs from the true one by more than this many standard errors once in
 * a thousand runs.
 */
const SAMPLE_QUANTILE = 3.29;
/** The reference's last three crossings of the section agree this closely (state units): settled on the cycle. */
const SETTLED_TOL = 1e-7;
/** Its settled crossing lies this close (scaled) to keel's C1 on the same section: the same cycle. */
const SAME_CYCLE_CROSSING = 1e-5;

interface BoxFate {
  exits: ({ t: number; state: string; bound: "min" | "max" } | null)[];
  settled: boolean;
  crossing: number | null;
}

describe("basin map of a predator–prey cycle (Rosenzweig–MacArthur, invented values) against scipy", () => {
  const configs = { window: RM_WINDOW, wide: RM_WIDE };
  const runs: Record<string, { results: Results; kernel: BasinKernel }> = {};
  let starts: Point[] = [];
  let reference: BoxFate[] = [];
  beforeAll(async () => {
    for (const [name, bounds] of Object.entries(configs)) {
      const fixture: ModelFixture = {
        id: `rosenzweig-macarthur-${name}`,
        equations: RM_EQUATIONS,
        parameters: RM_PARAMETERS,
        window: RM_WINDOW,
        bounds,
      };
      runs[name] = await analyzeKeepingKernel(
        withBasins(fixtureSpec(fixture), { resolution: 256, coarse: 32 }),
      );
    }
    const box = boxOf(runs.window.results);
    const uniform = seededUniform(0xb5a1);
    starts = Array.from({ length: RM_SAMPLES }, () => [
      box.lo[0] + uniform() * box.width[0],
      box.lo[1] + uniform() * box.width[1],
    ]);
    const { r, K, a, h, b, m } = RM_PARAMETERS;
    const nStar = m / (a * (b - m * h));
    const pStar = (r * (1 - nStar / K) * (1 + a * h * nStar)) / a;
    const cycle = runs.window.results.cycles[0];
    reference = runReference<{ fates: BoxFate[] }>("box_fates.py", {
      states: ["N", "P"],
      rhs: RM_PYTHON,
      parameters: RM_PARAMETERS,
      boxes: [Object.values(RM_WINDOW), Object.values(RM_WIDE)],
      starts,
      horizon: 40 * cycle.period,
      chunk: 2 * cycle.period,
      maxStep: cycle.period / 40,
      section: { center: [nStar, pStar], sense: cycle.section.sense },
      settle: { crossings: 3, tol: SETTLED_TOL },
    }).fates;
  }, 600_000);

  it("analyze(rosenzweig-macarthur).cycles has one stable cycle, attracting slowly, and the basin map labels it", () => {
    for (const { results } of Object.values(runs)) {
      expect(results.cycles.map((c) => c.stability)).toEqual(["stable"]);
      const mu = results.cycles[0].floquetMultiplier;
      expect(mu).toBeGreaterThan(0.2);
      expect(mu).toBeLessThan(0.6);
      expect(results.basins.attractors).toEqual(["C1"]);
      expect(results.equilibria.map((e) => e.type)).toContain("unstable-focus");
    }
  });

  for (const name of ["window", "wide"] as const) {
    it(`analyze(rosenzweig-macarthur, bounds = ${name}).basins agrees with scipy's fates of ${RM_SAMPLES} random starts within errorBound`, () => {
      const { results, kernel } = runs[name];
      const box = boxOf(results);
      const cycle = results.cycles[0];
      const exitBox = name === "window" ? 0 : 1;
      const expected = reference.map((f) => {
        if (f.exits[exitBox]) return "left-window";
        // bounds = window: a start that left the window has left; wide: it was followed on
        if (!f.settled || f.crossing === null) return "undecided";
        const gap = Math.abs(f.crossing - cycle.section.point.N) / box.width[0];
        return gap < SAME_CYCLE_CROSSING ? "C1" : "another orbit";
      });
      const { n, names } = gridNames(results);
      const kernelLabels = new Int32Array(RM_SAMPLES);
      kernel(Float64Array.from(starts.flat()), kernelLabels);
      let mapOff = 0,
        kernelOff = 0,
        leftWindowOnly = 0;
      starts.forEach((p, k) => {
        const i = Math.min(n - 1, Math.floor(((p[0] - box.lo[0]) / box.width[0]) * n));
        const j = Math.min(n - 1, Math.floor(((p[1] - box.lo[1]) / box.width[1]) * n));
        const uncertain = isMapBoundary(names, n, i, j) || names[j * n + i] === "undecided";
        if (names[j * n + i] !== expected[k] && !uncertain) mapOff++;
        if (labelName(kernelLabels[k], results.basins.attractors) !== expected[k] && !uncertain) kernelOff++;
        if (reference[k].exits[0] && !reference[k].exits[1] && expected[k] === "C1") leftWindowOnly++;
      });
      const sample = fractionsOf(expected);
      const b = results.basins;
      const worst = Math.max(
        ...["C1", "left-window", "undecided"].map((label) => {
          const p = sample[label] ?? 0;
          const allowed =
            b.errorBound + SAMPLE_QUANTILE * Math.sqrt(Math.max(p * (1 - p), 1 / RM_SAMPLES) / RM_SAMPLES);
          return Math.abs((b.fractions[label] ?? 0) - p) - allowed;
        }),
      );
      console.info(
        `rosenzweig-macarthur (bounds ${name}): map ${JSON.stringify(b.fractions)}, errorBound ${b.errorBound.toExponential(2)}; ` +
          `scipy sample ${JSON.stringify(sample)}; ${mapOff} map and ${kernelOff} kernel labels differ off uncertain cells; ` +
          `${leftWindowOnly} starts leave the window, stay feasible and end on C1`,
      );
      expect(expected).not.toContain("another orbit");
      expect(expected).not.toContain("undecided");
      expect(mapOff).toBeLessThanOrEqual(FRACTION_ALLOWANCE_CELLS);
      expect(kernelOff).toBeLessThanOrEqual(FRACTION_ALLOWANCE_CELLS);
      // each share within errorBound of the sample's, beyond the sample's own error
      expect(worst).toBeLessThanOrEqual(0);
      expect(b.fractions.undecided ?? 0).toBeLessThan(1e-3);
      expect(b.fractions.C1).toBeGreaterThan(0.9);
      if (name === "wide") expect(leftWindowOnly).toBeGreaterThan(0);
    });
  }
});

/**
 * keel against the independent reference, quantity by quantity. Each difference is a
 * Disagreement (model, quantity, class, keel's value, the reference's value); what the reference
 * itself cannot decide (a borderline type, an undecided fate, an equilibrium within 1e-6 of an
 * edge) is skipped and counted, never scored against keel.
 *
 * Tolerances (window-scaled distances; relative differences):
 *   equilibria are paired within MATCH_DISTANCE; a paired position differs beyond POSITION_TOL;
 *   a fate's equilibrium is the reference's one when within TARGET_TOL;
 *   periods agree to PERIOD_TOL; breaks to BREAK_TOL of max(|value|, 1e-3 of the range).
 */
import type { KeelOutcome, KeelSummary, Point, ReferenceFate, ReferenceModel } from "./summary.js";

export const MATCH_DISTANCE = 1e-3;
export const POSITION_TOL = 1e-6;
export const TARGET_TOL = 1e-5;
export const PERIOD_TOL = 1e-5;
export const BREAK_TOL = 1e-3;

export const QUANTITIES = [
  "crash",
  "equilibrium-count",
  "equilibrium-position",
  "equilibrium-type",
  "fate-kind",
  "fate-target",
  "fate-kind (window definition)",
  "cycle-existence",
  "cycle-period",
  "cycle-stability",
  "break-location",
] as const;
export type Quantity = (typeof QUANTITIES)[number];

export interface Disagreement {
  model: string;
  quantity: Quantity;
  /** The kind of difference, e.g. "stable-node vs stable-focus" or "missing in keel". */
  class: string;
  keel: unknown;
  reference: unknown;
  where?: string;
}

export interface ModelComparison {
  model: string;
  disagreements: Disagreement[];
  /** How many of each quantity were compared (a skipped one is not). */
  compared: Partial<Record<Quantity, number>>;
  /** What the reference left undecided or borderline, by reason. */
  skipped: Record<string, number>;
}

const scaledDistance = (a: Point, b: Point, window: [number, number][]) =>
  Math.hypot((a[0] - b[0]) / (window[0][1] - window[0][0]), (a[1] - b[1]) / (window[1][1] - window[1][0]));

const relative = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-300);

class Tally {
  readonly out: ModelComparison;
  constructor(model: string) {
    this.out = { model, disagreements: [], compared: {}, skipped: {} };
  }
  compared(q: Quantity, n = 1): void {
    this.out.compared[q] = (this.out.compared[q] ?? 0) + n;
  }
  skip(reason: string): void {
    this.out.skipped[reason] = (this.out.skipped[reason] ?? 0) + 1;
  }
  add(quantity: Quantity, cls: string, keel: unknown, reference: unknown, where?: string): void {
    this.out.disagreements.push({ model: this.out.model, quantity, class: cls, keel, reference, where });
  }
}

/** Pairs equilibria nearest first, within MATCH_DISTANCE. */
function pairEquilibria(
  k: KeelSummary,
  r: ReferenceModel,
): { pairs: [number, number][]; keelLeft: number[]; refLeft: number[] } {
  const cands: [number, number, number][] = [];
  k.equilibria.forEach((e, i) =>
    r.equilibria.forEach((q, j) => {
      const d = scaledDistance(e.point, q.point, r.window);
      if (d < MATCH_DISTANCE) cands.push([d, i, j]);
    }),
  );
  cands.sort((a, b) => a[0] - b[0]);
  const usedK = new Set<number>(),
    usedR = new Set<number>();
  const pairs: [number, number][] = [];
  for (const [, i, j] of cands) {
    if (usedK.has(i) || usedR.has(j)) continue;
    usedK.add(i);
    usedR.add(j);
    pairs.push([i, j]);
  }
  return {
    pairs,
    keelLeft: k.equilibria.map((_, i) => i).filter((i) => !usedK.has(i)),
    refLeft: r.equilibria.map((_, j) => j).filter((j) => !usedR.has(j)),
  };
}

function nearEdge(p: Point, window: [number, number][]): boolean {
  return [0, 1].some((k) => {
    const w = window[k][1] - window[k][0];
    const gap = Math.min(Math.abs(p[k] - window[k][0]), Math.abs(p[k] - window[k][1])) / w;
    return gap > 1e-12 && gap < 1e-6;
  });
}

function compareEquilibria(t: Tally, k: KeelSummary, r: ReferenceModel): void {
  const { pairs, keelLeft, refLeft } = pairEquilibria(k, r);
  const missing = refLeft.filter((j) => r.equilibria[j].inside && !r.equilibria[j].nearEdge);
  const extra = keelLeft.filter((i) => !nearEdge(k.equilibria[i].point, r.region ?? r.window));
  refLeft.filter((j) => r.equilibria[j].nearEdge).forEach(() => t.skip("equilibrium near an edge"));
  t.compared("equilibrium-count");
  if (missing.length || extra.length)
    t.add(
      "equilibrium-count",
      missing.length && extra.length ? "misplaced" : missing.length ? "missing in keel" : "extra in keel",
      { count: k.equilibria.length, extra: extra.map((i) => k.equilibria[i].point) },
      {
        count: r.equilibria.filter((q) => q.inside).length,
        missing: missing.map((j) => r.equilibria[j].point),
      },
    );
  for (const [i, j] of pairs) {
    const e = k.equilibria[i],
      q = r.equilibria[j];
    t.compared("equilibrium-position");
    const d = scaledDistance(e.point, q.point, r.window);
    if (d > POSITION_TOL) t.add("equilibrium-position", "moved", e.point, q.point, e.id);
    if (q.borderline) {
      t.skip("borderline type");
      continue;
    }
    t.compared("equilibrium-type");
    if (e.type !== q.type) t.add("equilibrium-type", `${e.type} vs ${q.type}`, e.type, q.type, e.id);
  }
}

function fateKindClass(kf: KeelSummary["scenarios"][number], rf: ReferenceFate): string {
  return kf.kind === "undecided" ? `keel undecided (${kf.reason}) vs ${rf.kind}` : `${kf.kind} vs ${rf.kind}`;
}

function compareFate(
  t: Tally,
  k: KeelSummary,
  r: ReferenceModel,
  s: number,
  rf: ReferenceFate,
  kindQuantity: "fate-kind" | "fate-kind (window definition)",
): boolean {
  const kf = k.scenarios[s];
  if (rf.kind === "undecided") {
    t.skip(`reference undecided (${kindQuantity})`);
    return false;
  }
  t.compared(kindQuantity);
  if (kf.kind !== rf.kind) {
    t.add(kindQuantity, fateKindClass(kf, rf), kf, rf, kf.name);
    return false;
  }
  return true;
}

function compareScenarios(t: Tally, k: KeelSummary, r: ReferenceModel): void {
  r.scenarios.forEach((sc, s) => {
    compareFate(t, k, r, s, sc.fate, "fate-kind (window definition)");
    if (!compareFate(t, k, r, s, sc.feasibleFate, "fate-kind")) return;
    const kf = k.scenarios[s],
      rf = sc.feasibleFate;
    t.compared("fate-target");
    if (rf.kind === "equilibrium") {
      const d = scaledDistance(kf.target as Point, rf.point!, r.window);
      if (!(d <= TARGET_TOL)) t.add("fate-target", "another equilibrium", kf.target, rf.point, kf.name);
    } else if (rf.kind === "left-window" || rf.kind === "blow-up") {
      if (kf.state !== rf.state) t.add("fate-target", "another edge", kf.state, rf.state, kf.name);
    } else if (rf.kind === "cycle") {
      const c = k.cycles.find((q) => q.id === kf.target);
      t.compared("cycle-period");
      if (!c || !(relative(c.period, rf.period!) <= PERIOD_TOL))
        t.add("cycle-period", "scenario's cycle", c?.period ?? null, rf.period, kf.name);
      if (c && rf.stability && rf.stability !== "weak") {
        t.compared("cycle-stability");
        if (c.stability !== rf.stability)
          t.add("cycle-stability", `${c.stability} vs ${rf.stability}`, c.stability, rf.stability, kf.name);
      }
    }
  });
}

function compareCycles(t: Tally, k: KeelSummary, r: ReferenceModel): void {
  for (const c of r.cycles) {
    const kc = k.cycles.find((q) => q.id === c.id)!;
    t.compared("cycle-existence");
    if (!c.found) {
      t.add("cycle-existence", "keel's cycle not found by the reference", kc, null, c.id);
      continue;
    }
    t.compared("cycle-period");
    if (!(relative(kc.period, c.period!) <= PERIOD_TOL))
      t.add("cycle-period", "keel's cycle", kc.period, c.period, c.id);
    if (c.stability && c.stability !== "weak") {
      t.compared("cycle-stability");
      if (kc.stability !== c.stability)
        t.add("cycle-stability", `${kc.stability} vs ${c.stability}`, kc.stability, c.stability, c.id);
    }
  }
  // a cycle the reference reached from a scenario, absent from keel's list altogether
  for (const sc of r.scenarios) {
    const rf = sc.feasibleFate;
    if (rf.kind !== "cycle" || rf.period === undefined) continue;
    t.compared("cycle-existence");
    if (!k.cycles.some((q) => relative(q.period, rf.period!) <= 1e-3))
      t.add("cycle-existence", "reference's cycle not in keel's list", null, rf.period, sc.name);
  }
}

/**
 * Breaks closer than the tolerance are one: where an equilibrium's type is borderline for a moment
 * (the reference leaves it undecided), one change of outcome shows as two a hair apart. So is a
 * break whose bracket starts where the previous one's ends: the reference could not resolve it
 * (undecided values inside, as where a spiral near a Hopf point or a passage past a ghost outlasts
 * every horizon), so it may sit right at the previous break, and nothing it decided says otherwise.
 */
function merged<T extends { value: number; bracket?: [number, number] }>(
  list: T[],
  tol: (a: number, b: number) => number,
): T[] {
  const out: T[] = [];
  for (const b of [...list].sort((p, q) => p.value - q.value)) {
    const last = out[out.length - 1];
    const reach = last?.bracket?.[1] ?? last?.value ?? -Infinity;
    const from = b.bracket?.[0] ?? b.value;
    const adjoins = from - reach <= tol(from, reach);
    if (!last || (b.value - last.value > tol(b.value, last.value) && !adjoins)) out.push({ ...b });
    // one cluster: its bracket spans its members' (a break of keel's anywhere in it matches)
    else if (last.bracket && b.bracket)
      last.bracket = [last.bracket[0], Math.max(last.bracket[1], b.bracket[1])];
  }
  return out;
}

function compareStudies(t: Tally, k: KeelSummary, r: ReferenceModel): void {
  for (const rs of r.studies) {
    const ks = k.studies.find((q) => q.parameter === rs.parameter);
    const width = rs.range[1] - rs.range[0];
    const tol = (a: number, b: number) => BREAK_TOL * Math.max(Math.abs(a), Math.abs(b), 1e-3 * width);
    const near = (v: number, b: { value: number; bracket: [number, number] }) =>
      Math.abs(v - b.value) <= tol(v, b.value) ||
      (v >= b.bracket[0] - tol(v, v) && v <= b.bracket[1] + tol(v, v));
    const keelBreaks = merged(ks?.breaks ?? [], tol);
    const used = new Set<number>();
    for (const b of merged(rs.breaks, tol)) {
      t.compared("break-location");
      const j = keelBreaks.findIndex((q, i) => !used.has(i) && near(q.value, b));
      if (j >= 0) {
        used.add(j);
        continue;
      }
      const limit = ks?.limits.find(
        (l) => near(l.value, b) || (b.value >= l.bracket[0] && b.value <= l.bracket[1]),
      );
      // the reference could not decide its bracket's middle either: both leave the same place open
      if (limit && !b.resolved) continue;
      const cls = limit ? `missing in keel (a decision limit there: ${limit.cause})` : "missing in keel";
      t.add("break-location", cls, limit ?? null, b, `${rs.parameter} (${b.cause})`);
    }
    keelBreaks.forEach((q, i) => {
      if (used.has(i)) return;
      t.compared("break-location");
      const undecided = rs.undecided.some(([a, b]) => q.value >= a - tol(a, a) && q.value <= b + tol(b, b));
      if (rs.budgetSpent) t.skip("reference break budget spent");
      else
        t.add(
          "break-location",
          undecided
            ? "extra in keel (the reference undecided there)"
            : `extra in keel (${q.threshold ?? q.kind})`,
          q,
          null,
          rs.parameter,
        );
    });
  }
}

/** Every disagreement between keel's answer and the reference's for one model. */
export function compareModel(keel: KeelOutcome, ref: ReferenceModel | undefined): ModelComparison {
  const t = new Tally(keel.id);
  t.compared("crash");
  if (!keel.ok) {
    t.add("crash", "keel", keel.error, null);
    return t.out;
  }
  if (!ref || !ref.ok) {
    t.add("crash", "reference", null, ref?.error ?? "no answer");
    return t.out;
  }
  compareEquilibria(t, keel, ref);
  compareScenarios(t, keel, ref);
  compareCycles(t, keel, ref);
  compareStudies(t, keel, ref);
  return t.out;
}

/** Disagreements and comparisons per quantity over many models. */
export function totals(
  models: ModelComparison[],
): { quantity: Quantity; compared: number; disagreements: number }[] {
  return QUANTITIES.map((quantity) => ({
    quantity,
    compared: models.reduce((n, m) => n + (m.compared[quantity] ?? 0), 0),
    disagreements: models.reduce(
      (n, m) => n + m.disagreements.filter((d) => d.quantity === quantity).length,
      0,
    ),
  }));
}

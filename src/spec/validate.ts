import type { SpecIssue } from "../diagnostics/issue.js";
import { formatPath } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import type { KeelSpecInput } from "./schema.js";
import { IDENTIFIER, isReservedName } from "./names.js";

const own = (o: object, k: string) => Object.prototype.hasOwnProperty.call(o, k);

/** Cross-field rules zod's shape check cannot express. Returns every issue found. */
export function validateSpecRules(spec: KeelSpecInput): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const add = (code: string, path: (string | number)[], message: string) => issues.push({ code, path, message });

  if (spec.states.length !== 2) add("planar_only", ["states"], messages.planarOnly(spec.states.length));

  const firstUse = new Map<string, string>();
  const checkName = (name: string, path: (string | number)[]) => {
    if (!IDENTIFIER.test(name)) return add("invalid_name", path, messages.invalidIdentifier(name));
    if (isReservedName(name))
      return add("reserved_name", path, name === "t" ? messages.timeNameReserved() : messages.reservedName(name));
    const first = firstUse.get(name);
    if (first) return add("duplicate_name", path, messages.duplicateName(name, first));
    firstUse.set(name, formatPath(path));
  };
  spec.states.forEach((s, i) => checkName(s.name, ["states", i, "name"]));
  (spec.parameters ?? []).forEach((p, i) => checkName(p.name, ["parameters", i, "name"]));

  const stateNames = spec.states.map((s) => s.name);
  for (const [i, s] of spec.states.entries()) {
    if (!(s.min < s.max)) add("interval_order", ["states", i], messages.intervalOrder(s.min, s.max));
    if (!own(spec.equations, s.name)) add("missing_equation", ["equations"], messages.missingEquation(s.name));
  }
  for (const key of Object.keys(spec.equations)) {
    if (!stateNames.includes(key)) add("unknown_state", ["equations", key], messages.equationForUnknownState(key));
  }

  for (const [i, p] of (spec.parameters ?? []).entries()) {
    if (!p.range) continue;
    const [lo, hi] = p.range;
    if (!(lo < hi)) add("interval_order", ["parameters", i, "range"], messages.intervalOrder(lo, hi));
    else if (p.value < lo || p.value > hi)
      add("range_excludes_value", ["parameters", i, "range"], messages.rangeExcludesValue(p.value, lo, hi));
  }

  const window = spec.window;
  if (window) {
    for (const key of Object.keys(window)) {
      if (!stateNames.includes(key)) add("unknown_state", ["window", key], messages.windowUnknownState(key));
    }
    for (const s of spec.states) {
      if (!own(window, s.name)) {
        add("missing_window", ["window"], messages.windowMissingState(s.name));
        continue;
      }
      const [lo, hi] = window[s.name];
      if (!(lo < hi)) add("interval_order", ["window", s.name], messages.intervalOrder(lo, hi));
      else if (lo < s.min || hi > s.max)
        add("window_outside_bounds", ["window", s.name], messages.windowOutsideBounds(s.name, lo, hi, s.min, s.max));
    }
  }

  for (const [i, sc] of (spec.scenarios ?? []).entries()) {
    for (const key of Object.keys(sc.initial)) {
      if (!stateNames.includes(key)) add("unknown_state", ["scenarios", i, "initial", key], messages.initialUnknown(key));
    }
    for (const s of spec.states) {
      if (!own(sc.initial, s.name)) {
        add("missing_initial", ["scenarios", i, "initial"], messages.initialMissing(s.name));
        continue;
      }
      const v = sc.initial[s.name];
      const [lo, hi] = window && own(window, s.name) ? window[s.name] : [s.min, s.max];
      if (v < lo || v > hi)
        add("initial_outside_window", ["scenarios", i, "initial", s.name], messages.initialOutsideWindow(s.name, v, lo, hi));
    }
  }
  const basins = spec.analysis?.basins;
  if (basins) {
    const resolution = basins.resolution ?? 1024;
    const coarse = basins.coarse ?? 64;
    const ratio = resolution / coarse;
    if (!(Number.isInteger(ratio) && ratio >= 1 && (ratio & (ratio - 1)) === 0))
      add("basin_grid", ["analysis", "basins"], messages.basinGrid(resolution, coarse));
  }

  const ranged = new Set((spec.parameters ?? []).filter((p) => p.range).map((p) => p.name));
  const declared = new Set((spec.parameters ?? []).map((p) => p.name));
  const checkStudied = (name: string, path: (string | number)[]) => {
    if (!declared.has(name)) add("unknown_parameter", path, messages.unknownParameter(name));
    else if (!ranged.has(name)) add("parameter_without_range", path, messages.parameterWithoutRange(name));
  };
  (spec.analysis?.parameters ?? []).forEach((n, i) => checkStudied(n, ["analysis", "parameters", i]));
  (spec.analysis?.parameterPairs ?? []).forEach(([a, b], i) => {
    checkStudied(a, ["analysis", "parameterPairs", i, 0]);
    checkStudied(b, ["analysis", "parameterPairs", i, 1]);
    if (a === b) add("pair_repeats", ["analysis", "parameterPairs", i], messages.pairRepeats(a));
  });

  const stateSet = new Set(stateNames);
  const claimIds = new Map<string, number>();
  (spec.claims ?? []).forEach((c, i) => {
    const first = claimIds.get(c.id);
    if (first !== undefined) add("duplicate_name", ["claims", i, "id"], messages.duplicateName(c.id, `claims[${first}].id`));
    else claimIds.set(c.id, i);
    const checkPoint = (point: Record<string, number> | undefined, key: string) => {
      if (!point) return;
      for (const s of stateNames) if (!own(point, s)) add("missing_state", ["claims", i, key], messages.pointMissing(s));
      for (const k of Object.keys(point)) if (!stateSet.has(k)) add("unknown_state", ["claims", i, key, k], messages.initialUnknown(k));
    };
    if (c.kind === "equilibrium-type") checkPoint(c.near, "near");
    if (c.kind === "scenario-fate") {
      checkPoint(c.near, "near");
      if (!(spec.scenarios ?? []).some((sc) => sc.name === c.scenario)) add("unknown_scenario", ["claims", i, "scenario"], messages.unknownScenario(c.scenario));
      if (c.reaches === "cycle" && c.near) add("claim_form", ["claims", i, "near"], messages.claimNearWithCycle());
    }
    if (c.kind === "parameter-side" || c.kind === "threshold-value") checkStudied(c.parameter, ["claims", i, "parameter"]);
    if (c.kind === "condition-decides") {
      const allowed = ["coexistence", "all absent", ...subsetsOnly(stateNames)];
      if (!allowed.includes(c.attractor)) add("unknown_attractor", ["claims", i, "attractor"], messages.unknownAttractor(c.attractor, allowed));
    }
  });

  const scenarioNames = new Map<string, number>();
  for (const [i, sc] of (spec.scenarios ?? []).entries()) {
    const first = scenarioNames.get(sc.name);
    if (first !== undefined)
      add("duplicate_name", ["scenarios", i, "name"], messages.duplicateName(sc.name, `scenarios[${first}].name`));
    else scenarioNames.set(sc.name, i);
  }
  return issues;
}

/** '<state> only' phrases for every proper, non-empty subset of the states, in state order. */
function subsetsOnly(states: string[]): string[] {
  const out: string[] = [];
  for (let mask = 1; mask < (1 << states.length) - 1; mask++) {
    out.push(`${states.filter((_, k) => mask & (1 << k)).join(" and ")} only`);
  }
  return out;
}

import type { SpecIssue } from "../diagnostics/issue.js";
import { formatPath } from "../diagnostics/issue.js";
import { messages } from "../diagnostics/messages.js";
import type { ClaimSpec, KeelSpecInput } from "./schema.js";
import { IDENTIFIER, isReservedName } from "./names.js";
import { DEFAULT_BASIN_COARSE, DEFAULT_BASIN_RESOLUTION } from "./defaults.js";

/**
 * Cross-field rules zod's shape check cannot express: a list of small named rules, each from the
 * spec to the issues it finds, run in a fixed order so the issues print in the order of the file.
 */
type Path = (string | number)[];
type SpecRule = (spec: KeelSpecInput) => SpecIssue[];

const own = (o: object, k: string) => Object.prototype.hasOwnProperty.call(o, k);
const issue = (code: string, path: Path, message: string): SpecIssue => ({ code, path, message });
const stateNamesOf = (spec: KeelSpecInput) => spec.states.map((s) => s.name);

function planarOnly(spec: KeelSpecInput): SpecIssue[] {
  return spec.states.length === 2
    ? []
    : [issue("planar_only", ["states"], messages.planarOnly(spec.states.length))];
}

/** State and parameter names: valid identifiers, not reserved, each used once. */
function namesAreUsable(spec: KeelSpecInput): SpecIssue[] {
  const issues: SpecIssue[] = [];
  const firstUse = new Map<string, string>();
  const check = (name: string, path: Path) => {
    if (!IDENTIFIER.test(name))
      return issues.push(issue("invalid_name", path, messages.invalidIdentifier(name)));
    if (isReservedName(name)) {
      const message = name === "t" ? messages.timeNameReserved() : messages.reservedName(name);
      return issues.push(issue("reserved_name", path, message));
    }
    const first = firstUse.get(name);
    if (first) return issues.push(issue("duplicate_name", path, messages.duplicateName(name, first)));
    firstUse.set(name, formatPath(path));
  };
  spec.states.forEach((s, i) => check(s.name, ["states", i, "name"]));
  (spec.parameters ?? []).forEach((p, i) => check(p.name, ["parameters", i, "name"]));
  return issues;
}

/** Each state: min < max, and an equation. */
function statesAreComplete(spec: KeelSpecInput): SpecIssue[] {
  return spec.states.flatMap((s, i) => [
    ...(s.min < s.max ? [] : [issue("interval_order", ["states", i], messages.intervalOrder(s.min, s.max))]),
    ...(own(spec.equations, s.name)
      ? []
      : [issue("missing_equation", ["equations"], messages.missingEquation(s.name))]),
  ]);
}

function equationsAreForStates(spec: KeelSpecInput): SpecIssue[] {
  const states = stateNamesOf(spec);
  return Object.keys(spec.equations)
    .filter((key) => !states.includes(key))
    .map((key) => issue("unknown_state", ["equations", key], messages.equationForUnknownState(key)));
}

/** A parameter's range: lo < hi, and it contains the nominal value. */
function rangesHoldValues(spec: KeelSpecInput): SpecIssue[] {
  return (spec.parameters ?? []).flatMap((p, i): SpecIssue[] => {
    if (!p.range) return [];
    const [lo, hi] = p.range;
    const path = ["parameters", i, "range"];
    if (!(lo < hi)) return [issue("interval_order", path, messages.intervalOrder(lo, hi))];
    if (p.value < lo || p.value > hi)
      return [issue("range_excludes_value", path, messages.rangeExcludesValue(p.value, lo, hi))];
    return [];
  });
}

/** The window: only declared states, an interval for each, inside the state's bounds. */
function windowFitsStates(spec: KeelSpecInput): SpecIssue[] {
  const window = spec.window;
  if (!window) return [];
  const states = stateNamesOf(spec);
  const unknown = Object.keys(window)
    .filter((key) => !states.includes(key))
    .map((key) => issue("unknown_state", ["window", key], messages.windowUnknownState(key)));
  const perState = spec.states.flatMap((s): SpecIssue[] => {
    if (!own(window, s.name))
      return [issue("missing_window", ["window"], messages.windowMissingState(s.name))];
    const [lo, hi] = window[s.name];
    if (!(lo < hi)) return [issue("interval_order", ["window", s.name], messages.intervalOrder(lo, hi))];
    if (lo < s.min || hi > s.max) {
      const message = messages.windowOutsideBounds(s.name, lo, hi, s.min, s.max);
      return [issue("window_outside_bounds", ["window", s.name], message)];
    }
    return [];
  });
  return [...unknown, ...perState];
}

/** Each scenario's initial state: only declared states, a value for each, inside the window. */
function initialStatesFit(spec: KeelSpecInput): SpecIssue[] {
  const states = stateNamesOf(spec);
  const window = spec.window;
  return (spec.scenarios ?? []).flatMap((sc, i) => {
    const path = ["scenarios", i, "initial"];
    const unknown = Object.keys(sc.initial)
      .filter((key) => !states.includes(key))
      .map((key) => issue("unknown_state", [...path, key], messages.initialUnknown(key)));
    const perState = spec.states.flatMap((s): SpecIssue[] => {
      if (!own(sc.initial, s.name)) return [issue("missing_initial", path, messages.initialMissing(s.name))];
      const v = sc.initial[s.name];
      const [lo, hi] = window && own(window, s.name) ? window[s.name] : [s.min, s.max];
      if (v < lo || v > hi)
        return [
          issue(
            "initial_outside_window",
            [...path, s.name],
            messages.initialOutsideWindow(s.name, v, lo, hi),
          ),
        ];
      return [];
    });
    return [...unknown, ...perState];
  });
}

/** Adaptive refinement halves cells: the fine grid must be the coarse one times a power of two. */
function basinGridRefines(spec: KeelSpecInput): SpecIssue[] {
  const basins = spec.analysis?.basins;
  if (!basins) return [];
  const resolution = basins.resolution ?? DEFAULT_BASIN_RESOLUTION;
  const coarse = basins.coarse ?? DEFAULT_BASIN_COARSE;
  const ratio = resolution / coarse;
  if (Number.isInteger(ratio) && ratio >= 1 && (ratio & (ratio - 1)) === 0) return [];
  return [issue("basin_grid", ["analysis", "basins"], messages.basinGrid(resolution, coarse))];
}

/** A parameter named for a threshold search must be declared and have a range. */
function studiedParameterIssues(spec: KeelSpecInput, name: string, path: Path): SpecIssue[] {
  const named = (spec.parameters ?? []).filter((p) => p.name === name);
  if (!named.length) return [issue("unknown_parameter", path, messages.unknownParameter(name))];
  if (!named.some((p) => p.range))
    return [issue("parameter_without_range", path, messages.parameterWithoutRange(name))];
  return [];
}

function studiedParametersHaveRanges(spec: KeelSpecInput): SpecIssue[] {
  const single = (spec.analysis?.parameters ?? []).flatMap((name, i) =>
    studiedParameterIssues(spec, name, ["analysis", "parameters", i]),
  );
  const pairs = (spec.analysis?.parameterPairs ?? []).flatMap(([a, b], i) => [
    ...studiedParameterIssues(spec, a, ["analysis", "parameterPairs", i, 0]),
    ...studiedParameterIssues(spec, b, ["analysis", "parameterPairs", i, 1]),
    ...(a === b ? [issue("pair_repeats", ["analysis", "parameterPairs", i], messages.pairRepeats(a))] : []),
  ]);
  return [...single, ...pairs];
}

/** A point named by a claim gives a value for every state, and only for states. */
function claimPointIssues(
  spec: KeelSpecInput,
  point: Record<string, number> | undefined,
  path: Path,
): SpecIssue[] {
  if (!point) return [];
  const states = stateNamesOf(spec);
  return [
    ...states
      .filter((s) => !own(point, s))
      .map((s) => issue("missing_state", path, messages.pointMissing(s))),
    ...Object.keys(point)
      .filter((k) => !states.includes(k))
      .map((k) => issue("unknown_state", [...path, k], messages.initialUnknown(k))),
  ];
}

/** What one claim refers to (a point, a scenario, a parameter, an attractor) must exist. */
function claimReferenceIssues(spec: KeelSpecInput, claim: ClaimSpec, i: number): SpecIssue[] {
  const at = (...rest: Path): Path => ["claims", i, ...rest];
  switch (claim.kind) {
    case "equilibrium-type":
      return claimPointIssues(spec, claim.near, at("near"));
    case "scenario-fate": {
      const known = (spec.scenarios ?? []).some((sc) => sc.name === claim.scenario);
      return [
        ...claimPointIssues(spec, claim.near, at("near")),
        ...(known
          ? []
          : [issue("unknown_scenario", at("scenario"), messages.unknownScenario(claim.scenario))]),
        ...(claim.reaches === "cycle" && claim.near
          ? [issue("claim_form", at("near"), messages.claimNearWithCycle())]
          : []),
      ];
    }
    case "parameter-side":
    case "threshold-value":
      return studiedParameterIssues(spec, claim.parameter, at("parameter"));
    case "condition-decides": {
      const allowed = ["coexistence", "all absent", ...subsetsOnly(stateNamesOf(spec))];
      if (allowed.includes(claim.attractor)) return [];
      return [
        issue("unknown_attractor", at("attractor"), messages.unknownAttractor(claim.attractor, allowed)),
      ];
    }
    default:
      return [];
  }
}

/** Claims: ids used once, and every reference resolves. */
function claimsAreWellFormed(spec: KeelSpecInput): SpecIssue[] {
  const firstIndex = new Map<string, number>();
  return (spec.claims ?? []).flatMap((claim, i) => {
    const first = firstIndex.get(claim.id);
    if (first === undefined) firstIndex.set(claim.id, i);
    const duplicate =
      first === undefined
        ? []
        : [
            issue(
              "duplicate_name",
              ["claims", i, "id"],
              messages.duplicateName(claim.id, `claims[${first}].id`),
            ),
          ];
    return [...duplicate, ...claimReferenceIssues(spec, claim, i)];
  });
}

function scenarioNamesAreUnique(spec: KeelSpecInput): SpecIssue[] {
  const firstIndex = new Map<string, number>();
  return (spec.scenarios ?? []).flatMap((sc, i) => {
    const first = firstIndex.get(sc.name);
    if (first === undefined) {
      firstIndex.set(sc.name, i);
      return [];
    }
    return [
      issue(
        "duplicate_name",
        ["scenarios", i, "name"],
        messages.duplicateName(sc.name, `scenarios[${first}].name`),
      ),
    ];
  });
}

/** The rules, in the order their issues are reported. */
const SPEC_RULES: readonly SpecRule[] = [
  planarOnly,
  namesAreUsable,
  statesAreComplete,
  equationsAreForStates,
  rangesHoldValues,
  windowFitsStates,
  initialStatesFit,
  basinGridRefines,
  studiedParametersHaveRanges,
  claimsAreWellFormed,
  scenarioNamesAreUnique,
];

/** Runs every cross-field rule. Returns every issue found. */
export function validateSpecRules(spec: KeelSpecInput): SpecIssue[] {
  return SPEC_RULES.flatMap((rule) => rule(spec));
}

/** '<state> only' phrases for every proper, non-empty subset of the states, in state order. */
function subsetsOnly(states: string[]): string[] {
  const out: string[] = [];
  for (let mask = 1; mask < (1 << states.length) - 1; mask++) {
    out.push(`${states.filter((_, k) => mask & (1 << k)).join(" and ")} only`);
  }
  return out;
}

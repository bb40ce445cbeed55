import type { KeelSpecInput } from "./schema.js";
import type { NormalizedSpec } from "./types.js";

/** Fills every default once, recording which keys were defaulted so the dossier can list them. */
export function normalizeSpec(spec: KeelSpecInput, sha256: string): NormalizedSpec {
  const defaulted: string[] = [];
  const pick = <T>(value: T | undefined, fallback: T, path: string): T => {
    if (value === undefined) {
      defaulted.push(path);
      return fallback;
    }
    return value;
  };
  const window: Record<string, [number, number]> = {};
  if (!spec.window) defaulted.push("window");
  if (!spec.analysis) defaulted.push("analysis");
  for (const s of spec.states) {
    const w = spec.window?.[s.name];
    window[s.name] = w ? [w[0], w[1]] : [s.min, s.max];
  }
  const equations: Record<string, string> = {};
  for (const s of spec.states) equations[s.name] = spec.equations[s.name];
  return {
    id: spec.id,
    title: spec.title,
    authors: pick(spec.authors, [], "authors"),
    organisation: pick(spec.organisation, "", "organisation"),
    purpose: pick(spec.purpose, "", "purpose"),
    timeUnit: spec.time.unit,
    states: spec.states.map((s) => ({
      name: s.name,
      label: s.label ?? s.name,
      unit: s.unit ?? "",
      min: s.min,
      max: s.max,
      population: s.population ?? false,
    })),
    parameters: pick(spec.parameters, [], "parameters").map((p) => ({
      name: p.name,
      value: p.value,
      unit: p.unit ?? "",
      label: p.label ?? p.name,
      source: p.source ?? "not stated",
      range: p.range ? [p.range[0], p.range[1]] : null,
    })),
    equations,
    window,
    scenarios: pick(spec.scenarios, [], "scenarios").map((sc) => ({
      name: sc.name,
      label: sc.label ?? "",
      initial: Object.fromEntries(spec.states.map((s) => [s.name, sc.initial[s.name]])),
      horizon: sc.horizon,
    })),
    assumptions: pick(spec.assumptions, [], "assumptions").map((a) => ({
      text: a.text,
      condition: a.condition ?? null,
    })),
    cautions: pick(spec.cautions, [], "cautions"),
    claims: pick(spec.claims, [], "claims"),
    analysis: {
      basins: { ...(spec.analysis?.basins ?? {}) },
      parameters:
        spec.analysis?.parameters ?? (spec.parameters ?? []).filter((p) => p.range).map((p) => p.name),
      parameterPairs: (spec.analysis?.parameterPairs ?? []).map(([a, b]) => [a, b] as [string, string]),
    },
    defaulted,
    sha256,
  };
}

/** The spec after validation and normalisation: every default filled, nothing optional. */
export interface NormalizedState {
  name: string;
  label: string;
  unit: string;
  min: number;
  max: number;
  /** The spec declares the state a population (the dossier's presence words depend on it). */
  population: boolean;
}

export interface NormalizedParameter {
  name: string;
  value: number;
  unit: string;
  label: string;
  source: string;
  range: [number, number] | null;
}

export interface NormalizedScenario {
  name: string;
  label: string;
  initial: Record<string, number>;
  horizon: number;
}

export interface NormalizedAssumption {
  text: string;
  condition: string | null;
}

export interface NormalizedSpec {
  id: string;
  title: string;
  authors: string[];
  organisation: string;
  purpose: string;
  timeUnit: string;
  states: NormalizedState[];
  parameters: NormalizedParameter[];
  /** Equation text per state, in the order of `states`. */
  equations: Record<string, string>;
  window: Record<string, [number, number]>;
  scenarios: NormalizedScenario[];
  assumptions: NormalizedAssumption[];
  cautions: string[];
  claims: import("./schema.js").ClaimSpec[];
  /** Analysis settings the spec sets (only those given; the analysis fills the rest). */
  analysis: {
    basins: { resolution?: number; coarse?: number };
    /** Parameters to study: the spec's list, or every parameter with a range. */
    parameters: string[];
    parameterPairs: [string, string][];
  };
  /** JSON paths of keys that were absent and took their default, for the dossier. */
  defaulted: string[];
  /** SHA-256 of the canonical serialisation of the spec as written. */
  sha256: string;
}

/** A problem in the user's input: data, never an exception until the CLI boundary. */
export interface SpecIssue {
  /** Stable machine-readable code, e.g. "invalid_type", "unknown_name". */
  code: string;
  /** JSON path into the spec, e.g. ["parameters", 2, "value"]. */
  path: (string | number)[];
  message: string;
  /** For expression errors: the source text and the 1-based column of the fault. */
  source?: { text: string; column: number; length?: number };
}

/**
 * A numerical condition met during analysis (no convergence, escape, ...). Reported, not thrown.
 * Analysis records a code and the numbers and ids it concerns; report/words/diagnostics.ts words it.
 */
export type Diagnostic = {
  severity: "info" | "warning";
  stage: string;
  /** Set when the condition was met while solving at one value of a continued parameter. */
  at?: { parameter: string; value: number };
} & DiagnosticDetail;

export type DiagnosticDetail =
  | { code: "undecided-trajectories"; data: { undecided: number; total: number; horizon: number } }
  | {
      code: "test-function-sign-change-not-located";
      data: { event: string; branch: number; parameter: string; from: number; to: number };
    }
  | { code: "too-many-branches"; data: { parameter: string; maxBranches: number } }
  | { code: "unclassified-branch-point"; data: { parameter: string; value: number } }
  | {
      code: "bound-crossing-is-transcritical";
      data: { parameter: string; value: number; transcritical: number };
    }
  | {
      code: "special-point-unverified";
      data: { kind: string; parameter: string; value: number; residual: number; testResidual: number };
    }
  | { code: "no-capture-region"; data: { equilibrium: string } }
  | { code: "small-regions-omitted"; data: { count: number; minFraction: number; fraction: number } }
  | { code: "nullcline-absent"; data: { state: string } }
  | { code: "nullcline-non-zeros-omitted"; data: { state: string; count: number } }
  | {
      code: "sign-change-off-equilibrium" | "sign-jump-on-nullcline";
      data: { rate: string; nullcline: string; point: number[] };
    }
  | { code: "equilibrium-off-nullcline"; data: { equilibrium: string; nullcline: string } }
  | { code: "too-many-equilibria"; data: { max: number } }
  | { code: "equilibrium-set"; data: { set: string; kind: "curve" | "region" } }
  | { code: "outcome-search-budget"; data: { parameter: string; evaluations: number } };

export type DiagnosticCode = DiagnosticDetail["code"];

/** Thrown only at stage boundaries to carry every collected spec issue to the CLI. */
export class SpecError extends Error {
  readonly issues: SpecIssue[];
  constructor(issues: SpecIssue[]) {
    super(issues.map((i) => i.message).join("; "));
    this.name = "SpecError";
    this.issues = issues;
  }
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; issues: SpecIssue[] };

export function formatPath(path: (string | number)[]): string {
  let out = "";
  for (const part of path) {
    if (typeof part === "number") out += `[${part}]`;
    else if (/^[A-Za-z_$][A-Za-z0-9_$]*$/.test(part)) out += out ? `.${part}` : part;
    else out += `[${JSON.stringify(part)}]`;
  }
  return out || "(top level)";
}

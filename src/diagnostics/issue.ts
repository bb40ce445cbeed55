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

/** A numerical condition met during analysis (no convergence, escape, ...). Reported, not thrown. */
export interface Diagnostic {
  severity: "info" | "warning";
  stage: string;
  message: string;
}

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

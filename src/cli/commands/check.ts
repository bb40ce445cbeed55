import { prepareModel } from "../../pipeline.js";
import { CliExit, EXIT, inputError, makeProgress, readSpecFile, type CommonOptions } from "../io.js";
import { analyzeSupervised } from "../supervisor.js";
import { claimEvidenceWords, claimReferenceWords, stateTerms } from "../../report/words/index.js";

/**
 * Longest expression the summary prints in full: a derivative can be far longer than its equation
 * (a power tower of 400 levels: 600 000 characters), which helps no reader of a terminal.
 */
const SUMMARY_MAX_EXPRESSION_CHARS = 400;

const shown = (text: string) =>
  text.length <= SUMMARY_MAX_EXPRESSION_CHARS
    ? text
    : `(an expression of ${text.length} characters, not printed)`;

/** `keel check SPEC`: validate and print a model summary. */
export function runCheck(file: string): string {
  const prepared = prepareModel(readSpecFile(file));
  if (!prepared.ok) throw inputError(prepared.issues, file);
  const { spec, model } = prepared.value;
  const lines = [
    `${spec.id}: ${spec.title}`,
    `spec sha256 ${spec.sha256}`,
    `equations (rates per ${spec.timeUnit}):`,
    ...model.equations.map((e, i) => {
      const s = spec.states[i];
      const w = spec.window[s.name];
      return `  d${s.name}/dt = ${shown(e.text)}    window [${w[0]}, ${w[1]}]${s.unit ? " " + s.unit : ""}`;
    }),
    `parameters: ${spec.parameters.length ? spec.parameters.map((p) => `${p.name} = ${p.value}${p.unit ? " " + p.unit : ""}`).join(", ") : "none"}`,
    "Jacobian:",
    ...model.jacobian.map(
      (row, i) =>
        `  d(d${spec.states[i].name}/dt): ` +
        row.map((e, j) => `∂/∂${spec.states[j].name} = ${shown(e.text)}`).join("; "),
    ),
    `scenarios: ${spec.scenarios.map((s) => s.name).join(", ") || "none"}`,
    `assumptions: ${spec.assumptions.length} (${model.assumptionConditions.length} machine-checkable)`,
    "spec OK",
  ];
  return lines.join("\n");
}

/** `keel check --claims SPEC`: run the analysis and print each claim's verdict; exit 3 when any is contradicted. */
export async function runCheckClaims(
  file: string,
  options: CommonOptions,
): Promise<{ text: string; code: number }> {
  const text = readSpecFile(file);
  // refuse a spec without claims before the analysis runs, not after
  const prepared = prepareModel(text);
  if (!prepared.ok) throw inputError(prepared.issues, file);
  if (prepared.value.spec.claims.length === 0)
    throw new CliExit(EXIT.input, `error: ${file} states no claims (add a "claims" list to the spec)`);
  const output = await analyzeSupervised(text, options, makeProgress(options.quiet, options.clock));
  if (!output.ok) throw inputError(output.issues, file);
  const claims = output.value.results.claims;
  const states = stateTerms(prepared.value.spec.states);
  const lines = claims.map(
    (c) =>
      `${c.verdict.padEnd(12)} ${c.id}: ${claimEvidenceWords(c, states)} (see ${claimReferenceWords(c.where)})`,
  );
  const contradicted = claims.filter((c) => c.verdict === "contradicted").length;
  const undecided = claims.filter((c) => c.verdict === "undecided").length;
  lines.push(
    `${claims.length - contradicted - undecided} supported, ${contradicted} contradicted, ${undecided} undecided`,
  );
  return { text: lines.join("\n"), code: contradicted > 0 ? EXIT.contradicted : EXIT.ok };
}

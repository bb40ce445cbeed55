import { prepareModel } from "../../pipeline.js";
import { inputError, readSpecFile } from "../io.js";

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
      return `  d${s.name}/dt = ${e.text}    window [${w[0]}, ${w[1]}]${s.unit ? " " + s.unit : ""}`;
    }),
    `parameters: ${spec.parameters.length ? spec.parameters.map((p) => `${p.name} = ${p.value}${p.unit ? " " + p.unit : ""}`).join(", ") : "none"}`,
    "Jacobian:",
    ...model.jacobian.map((row, i) => `  d(d${spec.states[i].name}/dt): ` + row.map((e, j) => `∂/∂${spec.states[j].name} = ${e.text}`).join("; ")),
    `scenarios: ${spec.scenarios.map((s) => s.name).join(", ") || "none"}`,
    `assumptions: ${spec.assumptions.length} (${model.conditions.length} machine-checkable)`,
    "spec OK",
  ];
  return lines.join("\n");
}

import { join } from "node:path";
import { runAnalysis } from "./run.js";
import { serializeResults } from "../../report/archive/serialize.js";
import { inputError, makeProgress, readSpecFile, writeFileAtomic, type CommonOptions } from "../io.js";

export interface AnalyzeOptions extends CommonOptions {
  out?: string;
}

/** `keel analyze SPEC [--out DIR]`: write DIR/results.json atomically. Returns the path written. */
export async function runAnalyze(file: string, options: AnalyzeOptions): Promise<string> {
  const output = await runAnalysis(
    readSpecFile(file),
    options.jobs,
    makeProgress(options.quiet, options.clock),
    options.clock,
  );
  if (!output.ok) throw inputError(output.issues, file);
  const dir = options.out ?? join("out", output.value.spec.id);
  const path = join(dir, "results.json");
  writeFileAtomic(path, serializeResults(output.value.results));
  return path;
}

import { join } from "node:path";
import { runAnalysis } from "./run.js";
import { serializeResults } from "../../report/archive/serialize.js";
import {
  checkOutputFolder,
  inputError,
  makeProgress,
  readSpecFile,
  writeFileAtomic,
  type CommonOptions,
} from "../io.js";

export interface AnalyzeOptions extends CommonOptions {
  out?: string;
}

/** `keel analyze SPEC [--out DIR]`: write DIR/results.json atomically. Returns the path written. */
export async function runAnalyze(file: string, options: AnalyzeOptions): Promise<string> {
  const specText = readSpecFile(file);
  // the default folder out/<id> needs the id; "out" itself is checked now
  checkOutputFolder(options.out ?? "out");
  const output = await runAnalysis(
    specText,
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

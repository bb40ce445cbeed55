import { join } from "node:path";
import { analyzeSupervised } from "../supervisor.js";
import { serializeResults } from "../../report/archive/serialize.js";
import { checkOutputFolder, inputError, makeProgress, readSpecFile, type CommonOptions } from "../io.js";
import { declaredId, withOutputFolder } from "../out-folder.js";

export interface AnalyzeOptions extends CommonOptions {
  out?: string;
}

/** `keel analyze SPEC [--out DIR]`: write DIR/results.json atomically. Returns the path written. */
export async function runAnalyze(file: string, options: AnalyzeOptions): Promise<string> {
  const specText = readSpecFile(file);
  // the default folder out/<id> needs the id; "out" itself is checked now
  checkOutputFolder(options.out ?? "out");
  const id = declaredId(specText);
  const dir = options.out ?? join("out", id ?? "");
  // results.json alone is written, in place: the lock keeps a concurrent build from mixing in
  return withOutputFolder(dir, id, "in-place", async (folder) => {
    const output = await analyzeSupervised(specText, options, makeProgress(options.quiet, options.clock));
    if (!output.ok) throw inputError(output.issues, file);
    return folder.commit(new Map([["results.json", serializeResults(output.value.results)]]))[0];
  });
}

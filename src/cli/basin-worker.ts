import { instantiateBasinKernel, type BasinKernel } from "../analysis/basins/kernel.js";

/** Worker side of the basin pool: compiles each kernel source once, then labels batches. */
let cachedSource = "";
let cachedKernel: BasinKernel | null = null;

export default function labelBatch({ source, starts }: { source: string; starts: Float64Array }): Int32Array {
  if (source !== cachedSource || !cachedKernel) {
    cachedKernel = instantiateBasinKernel(source);
    cachedSource = source;
  }
  const out = new Int32Array(starts.length / 2);
  cachedKernel(starts, out);
  return out;
}

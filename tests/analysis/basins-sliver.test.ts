/**
 * A basin thinner than a coarse cell along the axes: in an obligate mutualism (invented values)
 * the basin of the origin (both absent) is bounded by the axes and the saddle's stable manifold,
 * a sliver along both axes that no coarse cell centre samples. Cells the stable manifold crosses
 * are refined whatever their labels, and count as uncertain, so the share is right within the
 * error bound. Reference: the sliver's area by Green's theorem on the manifold integrated by
 * scipy's DOP853 (tests/reference/mutualism_sliver.py).
 */
import { describe, expect, it } from "vitest";
import { runPipeline } from "../../src/pipeline.js";
import { findScipyPython, runReference } from "../fixtures/scipy.js";
import { MUTUALISM_PARAMETERS, mutualismSpec } from "../fixtures/mutualism.js";

const P = MUTUALISM_PARAMETERS;

describe.skipIf(findScipyPython() === null)(
  "basin map of a sliver along the axes (obligate mutualism)",
  () => {
    it("analyze(mutualism).basins gives the origin's sliver its Green's-theorem share within errorBound", () => {
      const out = runPipeline(
        mutualismSpec({ analysis: { basins: { resolution: 256, coarse: 16 }, parameters: [] } }),
      );
      if (!out.ok) throw new Error(JSON.stringify(out.issues));
      const r = out.value.results;
      const origin = r.equilibria.find((e) => e.point.P === 0 && e.point.A === 0)!;
      const saddle = r.equilibria.find((e) => e.type === "saddle")!;
      const { share } = runReference<{ share: number }>("mutualism_sliver.py", {
        p: P,
        saddle: [saddle.point.P, saddle.point.A],
        window: [8, 10],
      });
      // the sliver is thinner than a coarse cell (0.0575 of A's 10 at P = 8, a coarse cell 0.625)
      expect(share).toBeGreaterThan(0.01);
      expect(share).toBeLessThan(0.03);
      const b = r.basins;
      expect(b.errorBound).toBeLessThan(share);
      expect(Math.abs(b.fractions[origin.id] - share)).toBeLessThanOrEqual(b.errorBound);
    }, 120_000);
  },
);

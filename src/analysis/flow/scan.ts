import type { Model } from "../../model/types.js";
import type { EquilibriumResult } from "../phase/equilibria.js";
import { boundsOf, type Box } from "../numeric/window.js";
import { acceptOrbit, type OrbitSolution } from "./cycles.js";
import { returnMap, type Section } from "./section.js";
import {
  CYCLE_EDGE_BISECTIONS,
  CYCLE_MIN_EXTENT,
  CYCLE_SCAN_RATIO,
  SHOOT_ACCEPT_TOL,
  SHOOT_MAX_ITERATIONS,
  SHOOT_RESIDUAL_TOL,
} from "../constants.js";

/**
 * The cycle search on Poincaré sections, shared by the nominal analysis and the outcome at any
 * other parameter point: around every focus or centre, the return map P of its ray is sampled at
 * radii growing by CYCLE_SCAN_RATIO from CYCLE_MIN_EXTENT to the window's edge (while returns
 * exist; beyond it to the feasible region's edge while they still move outward), and every sign change of g = P(r) − r is solved for its fixed point. It needs no
 * trajectory to be followed to a cycle, so it costs the same near a Hopf point, where orbits
 * approach a cycle slowly, as anywhere. Around a centre whose return map is the identity at
 * every sample, one orbit of the family is solved. Where returns stop after an outward one, the
 * gap is bisected for a thin band of inward returns (sampleBeforeEdge). A cycle around a node
 * only, or nested with another within one ratio, is left to the trajectories.
 */

interface Sample {
  r: number;
  g: number;
  period: number;
}

/** Illinois (modified regula falsi) on g over a bracket with a sign change, each value one return. */
function solveBracket(section: Section, a: Sample, b: Sample): { r: number; period: number } | null {
  let fa = a.g,
    fb = b.g;
  let ra = a.r,
    rb = b.r;
  let period = a.period;
  let side = 0;
  for (let it = 0; it < SHOOT_MAX_ITERATIONS; it++) {
    const r = (ra * fb - rb * fa) / (fb - fa);
    const ret = returnMap(section, r, period, "solve");
    if (!ret) return null;
    const g = ret.r - r;
    period = ret.period;
    if (Math.abs(g) <= SHOOT_RESIDUAL_TOL || rb - ra <= Number.EPSILON * rb) return { r, period };
    if (Math.sign(g) === Math.sign(fb)) {
      rb = r;
      fb = g;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      ra = r;
      fa = g;
      if (side === 1) fb /= 2;
      side = 1;
    }
  }
  return null;
}

/**
 * Where returns stop after an outward one (g > 0 at `last`, none at `rFail`), a band of inward
 * returns may lie in between, thinner than one scan ratio: orbits between a stable cycle and the
 * separatrix beyond it, as the cycle nears a homoclinic or heteroclinic loop. Bisection on
 * "returns, and outward" finds one inward sample there (the bracket of that stable cycle, an
 * attractor an outcome must not miss), or gives up after CYCLE_EDGE_BISECTIONS returns. Inward
 * returns followed by none (an unstable cycle next to the separatrix) are not searched: such a
 * cycle is no attractor.
 */
function sampleBeforeEdge(section: Section, last: Sample, rFail: number): Sample | null {
  let lo = last.r,
    hi = rFail,
    period = last.period;
  for (let k = 0; k < CYCLE_EDGE_BISECTIONS; k++) {
    const r = 0.5 * (lo + hi);
    const ret = returnMap(section, r, period, "sample");
    if (!ret) hi = r;
    else if (ret.r - r > 0) {
      lo = r;
      period = ret.period;
    } else return { r, g: ret.r - r, period: ret.period };
  }
  return null;
}

/**
 * The samples of g outward from CYCLE_MIN_EXTENT, until a return fails or the window's edge
 * (rEdge); past it, on to the feasible region's edge (rLimit) while returns still move outward:
 * the orbits there tend to something beyond the window that trajectories reach all the same.
 */
function sampleReturns(section: Section, rEdge: number, rLimit: number, period0: number): Sample[] {
  const samples: Sample[] = [];
  let period = period0;
  for (let r = CYCLE_MIN_EXTENT * CYCLE_SCAN_RATIO; r < Math.max(rEdge, rLimit); r *= CYCLE_SCAN_RATIO) {
    const last = samples[samples.length - 1];
    if (r >= rEdge && !(last && last.g > SHOOT_RESIDUAL_TOL)) break;
    const ret = returnMap(section, r, period, "sample");
    if (!ret) {
      const last = samples[samples.length - 1];
      const inward = last && last.g > SHOOT_RESIDUAL_TOL ? sampleBeforeEdge(section, last, r) : null;
      if (inward) samples.push(inward);
      break;
    }
    samples.push({ r, g: ret.r - r, period: ret.period });
    period = ret.period;
  }
  return samples;
}

/** Solved orbits on the section of one focus or centre (forward time), innermost first; rejected candidates are dropped. */
export function scanSection(model: Model, box: Box, e: EquilibriumResult): OrbitSolution[] {
  const omega = Math.abs(e.eigenvalues[0]?.im ?? 0);
  // the linear flow turns the ray's points towards increasing second state when J21 > 0
  const turn = Math.sign(e.jacobian[1][0]);
  if (!(omega > 0) || turn === 0) return [];
  const center: [number, number] = [e.point[model.stateNames[0]], e.point[model.stateNames[1]]];
  const section: Section = { model, box, center, sense: turn as 1 | -1, direction: 1 };
  const rEdge = (box.hi[0] - center[0]) / box.width[0];
  const rLimit = (boundsOf(model).hi[0] - center[0]) / box.width[0];
  const samples = sampleReturns(section, rEdge, rLimit, (2 * Math.PI) / omega);
  const out: OrbitSolution[] = [];
  // a sample within SHOOT_RESIDUAL_TOL of a fixed point has no sign: the bracket is its neighbours
  const signed = samples.filter((s) => Math.abs(s.g) > SHOOT_RESIDUAL_TOL);
  for (let k = 0; k + 1 < signed.length; k++) {
    const [a, b] = [signed[k], signed[k + 1]];
    if (Math.sign(a.g) === Math.sign(b.g)) continue;
    const root = solveBracket(section, a, b);
    if (root) out.push(acceptOrbit(section, e.id, root.r, root.period));
  }
  const flat = samples.length > 0 && samples.every((s) => Math.abs(s.g) <= SHOOT_ACCEPT_TOL);
  if (e.type === "center" && flat) {
    const mid = samples[Math.floor(samples.length / 2)];
    out.push(acceptOrbit(section, e.id, mid.r, mid.period));
  }
  return out.filter((s) => s.ok);
}

import type { Results } from "../../analysis/types.js";
import { nameToTex } from "../../model/tex.js";
import { formatNumber, formatNumberHtml } from "../format.js";
import { edgeWords, pointWords, undecidedReasonWords } from "../words/index.js";
import { m, snapToZero, type ViewInput } from "./common.js";

type SeparatrixEnd = Results["separatrices"][number]["fate"];

function separatrixEndWords(input: ViewInput, end: SeparatrixEnd): string {
  switch (end.kind) {
    case "equilibrium":
    case "cycle":
      return `reaches ${end.target}`;
    case "left-window":
      return `leaves the feasible region through ${edgeWords(end.edge)} at ${pointWords(snapToZero(input.spec, end.point))}`;
    case "outside-window":
      return "points out of the window (not drawn)";
    default:
      return `undecided: ${undecidedReasonWords(end.reason)}`;
  }
}

function buildNullclinesView({ spec, results }: ViewInput) {
  const directionWords = { increasing: "increasing", decreasing: "decreasing", zero: "at rest" } as const;
  const [first, second] = spec.states.map((s) => s.name);
  const at = (xy: [number, number]) => pointWords(snapToZero(spec, { [first]: xy[0], [second]: xy[1] }), 4);
  return results.nullclines.map((n) => ({
    state: n.state,
    math: m(`\\frac{d${nameToTex(n.state)}}{dt} = 0`),
    pieces: n.pieces.map((piece) => ({
      kind:
        piece.onAxis && piece.axis
          ? `the line ${piece.axis.state} = ${formatNumber(piece.axis.value)}`
          : "curve",
      from: at(piece.points[0]),
      to: at(piece.points[piece.points.length - 1]),
      direction: `${piece.otherState} ${directionWords[piece.otherDirection]}`,
      vertices: piece.points.length,
    })),
    maxResidual: formatNumberHtml(n.maxResidual, 2),
  }));
}

/** Nullclines, sign regions, periodic orbits, separatrices and the time series of the phase-portrait section. */
export function buildPortraitView(input: ViewInput) {
  const { spec, results, figure } = input;
  const growth = (sign: string) => (sign === "+" ? "grows" : "declines");
  return {
    portrait: figure("portrait"),
    scenarios: results.scenarios.map((s) => ({ name: s.name, figure: figure(`timeseries-${s.name}`) })),
    cycles: results.cycles.map((c) => ({
      id: c.id,
      period: `${formatNumber(c.period, 6)} ${spec.timeUnit}`,
      stability: c.stability,
      multiplier: formatNumberHtml(c.floquetMultiplier, 6),
      around: c.around,
      extent: spec.states
        .map(
          (s) =>
            `${s.name}: ${formatNumber(c.extent[s.name][0], 5)} to ${formatNumber(c.extent[s.name][1], 5)}`,
        )
        .join("; "),
    })),
    separatrices: results.separatrices.map((x) => ({
      saddle: x.saddle,
      manifold: x.manifold === "stable" ? "stable (backward in time)" : "unstable (forward in time)",
      branch: x.side > 0 ? "+" : "−",
      end: separatrixEndWords(input, x.fate),
    })),
    regions: results.regions.map((r) => ({
      id: r.id,
      signs: spec.states.map((s) => `${s.name} ${growth(r.signs[s.name])}`).join(", "),
      point: pointWords(r.point, 4),
      area: formatNumber(100 * r.areaFraction, 3) + "%",
    })),
    nullclines: buildNullclinesView(input),
  };
}

/**
 * Population families of the crosscheck corpus. The models are the textbook ones (forms from
 * Murray, Mathematical Biology I, 3rd ed., §3.3 predator–prey with saturation, §3.5 competition,
 * §3.6 mutualism, §10.2 SIR with vital dynamics; Strogatz, Nonlinear Dynamics and Chaos, 2nd ed.,
 * §6.4 competition, §6.5 Lotka–Volterra centres), with invented, randomly drawn values. Windows are
 * fitted from carrying capacities and nullcline heights so the equilibria sit well inside.
 */
import { maxOver, param, scenarios, sig, studied, type Family, type FamilyModel } from "./draw.js";

const box = (
  names: string[],
  window: [number, number][],
  factor = 10,
): Pick<FamilyModel, "states" | "window"> => ({
  states: names.map((name, k) => ({ name, min: 0, max: sig(window[k][1] * factor) })),
  window: Object.fromEntries(names.map((n, k) => [n, [0, sig(window[k][1])] as [number, number]])),
});

/** Lotka–Volterra competition: coexistence, exclusion or bistability, by the competition coefficients. */
const competition: Family = (d) => {
  const r1 = d.range(0.5, 2),
    r2 = d.range(0.5, 2);
  const K1 = d.range(20, 200),
    K2 = d.range(20, 200);
  const a12 = d.range(0.3, 1.8) * (K1 / K2),
    a21 = d.range(0.3, 1.8) * (K2 / K1);
  const X = 1.25 * K1,
    Y = 1.25 * K2;
  const p = [
    param("r1", r1),
    param("r2", r2),
    param("K1", K1),
    param("K2", K2),
    param("a12", a12, 0.4),
    param("a21", a21, 0.4),
  ];
  return {
    title: "two competing populations",
    variant: "lotka-volterra",
    ...box(
      ["N1", "N2"],
      [
        [0, X],
        [0, Y],
      ],
    ),
    parameters: p,
    equations: { N1: "r1*N1*(1 - (N1 + a12*N2)/K1)", N2: "r2*N2*(1 - (N2 + a21*N1)/K2)" },
    scenarios: scenarios(d, 60 / Math.min(r1, r2), () => ({
      N1: d.range(0.02, 1) * X,
      N2: d.range(0.02, 1) * Y,
    })),
    studied: studied(d, d.pick(["a12", "a21"]), ["K1", "K2", "r1"]),
  };
};

/** Prey with logistic growth and a predator with a Holling type II or III response (Rosenzweig–MacArthur). */
function predatorPrey(type: 2 | 3): Family {
  return (d) => {
    const r = d.range(0.5, 2);
    const K = d.range(50, 200);
    const h = d.range(0.2, 1);
    const e = d.range(0.3, 0.8);
    // enrichment β = a h K (type II) or a h K² (type III); the predator's equilibrium prey level as a fraction of K
    const beta = type === 2 ? d.range(1.5, 6) : d.range(3, 30);
    const a = type === 2 ? beta / (h * K) : beta / (h * K * K);
    const phi = d.range(0.08, 0.9);
    const xs = phi * K;
    const resp = (x: number) => (type === 2 ? (a * x) / (1 + a * h * x) : (a * x * x) / (1 + a * h * x * x));
    const m = e * resp(xs);
    const Y = maxOver((x) => (r * x * (1 - x / K)) / resp(x), Math.max(xs / 2, K / 100), K);
    const X = 1.25 * K,
      W = 4 * Y;
    // above (e/h) no prey level feeds the predator: the range may reach near it, not past it
    const above = Math.max(0.05, Math.min(0.4, (0.98 * e) / (h * m) - 1));
    const response = type === 2 ? "a*N*P/(1 + a*h*N)" : "a*N^2*P/(1 + a*h*N^2)";
    return {
      title: `prey and predator with a type ${type === 2 ? "II" : "III"} response`,
      variant: `holling-${type}`,
      ...box(
        ["N", "P"],
        [
          [0, X],
          [0, W],
        ],
      ),
      parameters: [
        param("r", r),
        param("K", K),
        param("a", a),
        param("h", h),
        param("eff", e, 0.2),
        param("m", m, 0.4, above),
      ],
      equations: { N: `r*N*(1 - N/K) - ${response}`, P: `eff*${response} - m*P` },
      scenarios: scenarios(d, 300 / r, () => ({ N: d.range(0.1, 0.9) * K, P: d.range(0.1, 1) * Y })),
      studied: studied(d, "m", ["K", "r"]),
    };
  };
}

/** Lotka–Volterra mutualism: a stable coexistence while b12·b21 < 1, unbounded (finite-time) growth past it. */
const mutualism: Family = (d, k) => {
  const r1 = d.range(0.5, 2),
    r2 = d.range(0.5, 2);
  const K1 = d.range(20, 200),
    K2 = d.range(20, 200);
  const product = k % 4 === 0 ? d.range(0.85, 1.3) : d.range(0.1, 0.75);
  const share = d.range(0.2, 0.8);
  const b12 = Math.pow(product, share) * (K1 / K2),
    b21 = Math.pow(product, 1 - share) * (K2 / K1);
  const bounded = product < 1;
  const xs = bounded ? (K1 + b12 * K2) / (1 - product) : 2 * K1;
  const ys = bounded ? (K2 + b21 * K1) / (1 - product) : 2 * K2;
  const X = 1.3 * Math.max(xs, K1),
    Y = 1.3 * Math.max(ys, K2);
  return {
    title: "two mutualists",
    variant: bounded ? "bounded" : "unbounded",
    ...box(
      ["M1", "M2"],
      [
        [0, X],
        [0, Y],
      ],
    ),
    parameters: [
      param("r1", r1),
      param("r2", r2),
      param("K1", K1),
      param("K2", K2),
      param("b12", b12, 0.3),
      param("b21", b21, 0.2),
    ],
    equations: { M1: "r1*M1*(1 - M1/K1 + b12*M2/K1)", M2: "r2*M2*(1 - M2/K2 + b21*M1/K2)" },
    scenarios: scenarios(d, 60 / Math.min(r1, r2), () => ({
      M1: d.range(0.02, 0.7) * X,
      M2: d.range(0.02, 0.7) * Y,
    })),
    studied: studied(d, "b12", ["K1", "r2"]),
  };
};

/** Prey with a strong Allee effect (threshold A) and a type II predator: extinction, coexistence or cycles. */
const allee: Family = (d) => {
  const r = d.range(0.5, 2);
  const K = d.range(50, 200);
  const A = d.range(0.1, 0.35) * K;
  const h = d.range(0.2, 1);
  const e = d.range(0.3, 0.8);
  const a = d.range(1, 4) / (h * K);
  const xs = d.range(A / K + 0.05, 0.95) * K;
  const resp = (x: number) => (a * x) / (1 + a * h * x);
  const m = e * resp(xs);
  const Y = maxOver((x) => (r * (x / A - 1) * (1 - x / K) * x) / resp(x), A, K);
  const X = 1.25 * K,
    W = 3 * Math.max(Y, 1e-3 * K);
  return {
    title: "prey with an Allee threshold and a predator",
    variant: "allee-holling-2",
    ...box(
      ["N", "P"],
      [
        [0, X],
        [0, W],
      ],
    ),
    parameters: [
      param("r", r),
      param("K", K),
      param("A", A, 0.3),
      param("a", a),
      param("h", h),
      param("eff", e, 0.2),
      param("m", m, 0.3),
    ],
    equations: { N: "r*N*(N/A - 1)*(1 - N/K) - a*N*P/(1 + a*h*N)", P: "eff*a*N*P/(1 + a*h*N) - m*P" },
    scenarios: scenarios(d, 200 / r, () => ({
      N: d.range(0.05, 1) * K,
      P: d.range(0.05, 1) * Math.max(Y, 1e-3 * K),
    })),
    studied: studied(d, d.pick(["m", "A"]), ["K"]),
  };
};

/** Lotka–Volterra predator–prey: a centre, every interior orbit closed (a family of neutral cycles). */
const lotkaVolterra: Family = (d) => {
  const a = d.range(0.5, 2),
    b = d.range(0.01, 0.1),
    c = d.range(0.3, 1.5),
    dd = d.range(0.005, 0.05);
  const xs = c / dd,
    ys = a / b;
  // the conserved quantity H = d x − c ln x + b y − a ln y: each start's orbit stays on its level set
  const H = (x: number, y: number) => dd * x - c * Math.log(x) + b * y - a * Math.log(y);
  const starts = Array.from({ length: d.int(1, 3) }, () => ({
    x: xs * d.range(0.4, 1.8),
    y: ys * d.range(0.5, 1.6),
  }));
  const level = Math.max(...starts.map((s) => H(s.x, s.y)));
  const reach = (g: (v: number) => number, from: number) => {
    let hi = from;
    while (g(hi) < level) hi *= 1.5;
    let lo = from;
    for (let i = 0; i < 80; i++) {
      const mid = 0.5 * (lo + hi);
      if (g(mid) < level) lo = mid;
      else hi = mid;
    }
    return hi;
  };
  const X = 1.3 * reach((x) => H(x, ys), xs),
    Y = 1.3 * reach((y) => H(xs, y), ys);
  const p = [param("a", a), param("b", b), param("c", c), param("d", dd)];
  return {
    title: "Lotka–Volterra prey and predator (a centre)",
    variant: "centre",
    ...box(
      ["x", "y"],
      [
        [0, X],
        [0, Y],
      ],
    ),
    parameters: p,
    equations: { x: "x*(a - b*y)", y: "y*(d*x - c)" },
    scenarios: starts.map((s) => ({
      initial: { x: sig(s.x), y: sig(s.y) },
      horizon: sig(40 / Math.sqrt(a * c), 3),
    })),
    studied: studied(d, d.pick(["a", "c"]), ["b"]),
  };
};

/** SIR with births and deaths (fractions of a constant population): disease-free or endemic, by R0 = β/(γ + μ). */
const sir: Family = (d) => {
  const mu = d.log(0.02, 0.2);
  const gamma = d.range(0.1, 1);
  const R0 = d.range(0.6, 4);
  const beta = R0 * (gamma + mu);
  const p = [param("mu", mu, 0.3), param("gamma", gamma, 0.3), param("beta", beta, 0.5)];
  const start = () => {
    const I = d.log(1e-3, 0.3);
    return { S: d.range(0.2, 1 - I), I };
  };
  return {
    title: "susceptible–infectious with births and deaths",
    variant: "sir",
    states: [
      { name: "S", min: 0, max: 2 },
      { name: "I", min: 0, max: 2 },
    ],
    window: { S: [0, 1.2], I: [0, 1] },
    parameters: p,
    equations: { S: "mu*(1 - S) - beta*S*I", I: "beta*S*I - (gamma + mu)*I" },
    scenarios: scenarios(d, 80 / mu, start),
    studied: studied(d, "beta", ["gamma"]),
  };
};

export const POPULATION_FAMILIES: Record<string, Family> = {
  competition,
  "holling-2": predatorPrey(2),
  "holling-3": predatorPrey(3),
  mutualism,
  allee,
  "lotka-volterra": lotkaVolterra,
  sir,
};

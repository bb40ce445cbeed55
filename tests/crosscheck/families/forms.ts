/**
 * Non-population families of the crosscheck corpus: chemical oscillators (Strogatz, Nonlinear
 * Dynamics and Chaos, 2nd ed., Exercises 7.3.2 Sel'kov glycolysis and 8.2.10 / §7.3 the
 * Brusselator; Murray, Mathematical Biology II, 3rd ed., §2.4 Schnakenberg), polynomial systems
 * with several saddles (damped double- and triple-well oscillators, coupled switches), the Hopf
 * normal form with its threshold at μ = 0 (Strogatz §8.2, supercritical and subcritical),
 * borderline linearisations (stars, degenerate nodes, centres, near-degenerate nodes and foci, a
 * saddle-node at zero; Strogatz §5.2, §6.3) and trajectories that leave the window briefly
 * between steps (a linear focus whose first loop peaks just beyond an edge). Values invented.
 */
import { exact, param, scenarios, sig, studied, type Family, type FamilyModel } from "./draw.js";

const symmetric = (names: string[], half: number[], factor = 5): Pick<FamilyModel, "states" | "window"> => ({
  states: names.map((name, k) => ({ name, min: sig(-half[k] * factor), max: sig(half[k] * factor) })),
  window: Object.fromEntries(names.map((n, k) => [n, [sig(-half[k]), sig(half[k])] as [number, number]])),
});

const positive = (names: string[], top: number[], factor = 10): Pick<FamilyModel, "states" | "window"> => ({
  states: names.map((name, k) => ({ name, min: 0, max: sig(top[k] * factor) })),
  window: Object.fromEntries(names.map((n, k) => [n, [0, sig(top[k])] as [number, number]])),
});

/** Brusselator, Schnakenberg or Sel'kov: a stable equilibrium, or a stable cycle past a Hopf point. */
const chemical: Family = (d, k) => {
  const variant = ["brusselator", "schnakenberg", "selkov"][k % 3];
  if (variant === "brusselator") {
    const a = d.range(0.5, 2);
    const b = (1 + a * a) * d.range(0.6, 1.5);
    const past = Math.max(0, 1.3 * b - 1 - a * a);
    const X = 2 * a + 5 * past + 1,
      Y = (2 * 1.3 * b) / a + 5 * past + 1;
    return {
      title: "the Brusselator",
      variant,
      ...positive(["u", "v"], [X, Y]),
      parameters: [param("a", a, 0.2), param("b", b, 0.3)],
      equations: { u: "a - (b + 1)*u + u^2*v", v: "b*u - u^2*v" },
      scenarios: scenarios(d, 200, () => ({ u: d.range(0.05, 0.8) * X, v: d.range(0.05, 0.8) * Y })),
      studied: studied(d, "b", ["a"]),
    };
  }
  if (variant === "schnakenberg") {
    const a = d.range(0.05, 0.25),
      b = d.range(0.3, 1.5);
    const xs = a + b,
      ys = b / (xs * xs);
    const X = 2 * xs + 3,
      Y = 2 * ys + 4;
    return {
      title: "the Schnakenberg reaction",
      variant,
      ...positive(["u", "v"], [X, Y]),
      parameters: [param("a", a, 0.4), param("b", b, 0.25)],
      equations: { u: "a - u + u^2*v", v: "b - u^2*v" },
      scenarios: scenarios(d, 200, () => ({ u: d.range(0.05, 0.8) * X, v: d.range(0.05, 0.8) * Y })),
      studied: studied(d, "a", ["b"]),
    };
  }
  const a = d.range(0.02, 0.1),
    b = d.range(0.4, 0.9);
  const ys = b / (a + b * b);
  const X = Math.max(6, 2 * b + 3),
    Y = Math.max(7, 2 * ys + 3);
  return {
    title: "Sel'kov's glycolysis model",
    variant,
    ...positive(["u", "v"], [X, Y]),
    parameters: [param("a", a, 0.3), param("b", b, 0.2)],
    equations: { u: "-u + a*v + u^2*v", v: "b - a*v - u^2*v" },
    scenarios: scenarios(d, 300, () => ({ u: d.range(0.05, 0.6) * X, v: d.range(0.05, 0.6) * Y })),
    studied: studied(d, "a", ["b"]),
  };
};

/** Polynomial systems with several saddles: which well a start falls into, and saddle-nodes as a tilt grows. */
const polynomial: Family = (d, k) => {
  const variant = ["tilted-double-well", "coupled-switches", "triple-well"][k % 3];
  if (variant === "tilted-double-well") {
    const c = d.range(0.1, 0.6),
      tilt = d.range(-0.3, 0.3);
    return {
      title: "a damped, tilted double-well oscillator",
      variant,
      ...symmetric(["x", "y"], [2, 2]),
      parameters: [param("c", c, 0.3), exact("d", sig(tilt), [sig(tilt - 0.3), sig(tilt + 0.3)])],
      equations: { x: "y", y: "x - x^3 - c*y + d" },
      scenarios: scenarios(d, 120 / c, () => ({ x: d.range(-1.5, 1.5), y: d.range(-1, 1) })),
      studied: studied(d, "d", ["c"]),
    };
  }
  if (variant === "coupled-switches") {
    const a = d.range(-0.3, 0.3),
      b = d.range(-0.3, 0.3);
    return {
      title: "two coupled bistable switches (nine equilibria when uncoupled)",
      variant,
      ...symmetric(["x", "y"], [1.6, 1.6]),
      parameters: [
        exact("a", sig(a), [sig(a - 0.25), sig(a + 0.25)]),
        exact("b", sig(b), [sig(b - 0.25), sig(b + 0.25)]),
      ],
      equations: { x: "x - x^3 + a*y", y: "y - y^3 + b*x" },
      scenarios: scenarios(d, 60, () => ({ x: d.range(-1.4, 1.4), y: d.range(-1.4, 1.4) })),
      studied: studied(d, "a", ["b"]),
    };
  }
  // V'(x) = k x (x² − 1)(x² − 4): wells at 0 and ±2, saddles at ±1; starts of energy at most 2k stay within |x| < 2.6
  const kk = d.range(0.5, 2),
    c = d.range(0.1, 0.8);
  const V = (x: number) => kk * (x ** 6 / 6 - (5 * x ** 4) / 4 + 2 * x * x);
  const Y = 1.2 * Math.sqrt(2 * (2 * kk + (4 / 3) * kk));
  const start = () => {
    for (;;) {
      const x = d.range(-2.4, 2.4),
        y = d.range(-0.8, 0.8) * Y;
      if ((y * y) / 2 + V(x) <= 2 * kk) return { x, y };
    }
  };
  return {
    title: "a damped triple-well oscillator",
    variant,
    ...symmetric(["x", "y"], [2.6, sig(Y)]),
    parameters: [param("k", kk, 0.3), param("c", c, 0.4)],
    equations: { x: "y", y: "-k*x*(x^2 - 1)*(x^2 - 4) - c*y" },
    scenarios: scenarios(d, 120 / c, start),
    studied: studied(d, "c", ["k"]),
  };
};

/** The Hopf normal form in Cartesian form; its threshold sits at μ = 0 exactly, its cycle has period 2π/ω. */
const hopf: Family = (d, k) => {
  const variant = k % 2 === 0 ? "subcritical" : "supercritical";
  const w = d.range(0.5, 2);
  const mu = sig(d.pick([-1, 1]) * d.range(0.05, variant === "supercritical" ? 0.5 : 0.2), 3);
  const range: [number, number] =
    variant === "supercritical"
      ? [sig(-Math.max(d.range(0.1, 0.6), 1.2 * Math.abs(mu)), 3), sig(d.range(0.55, 0.7), 3)]
      : [-0.22, sig(d.range(0.21, 0.3), 3)];
  const cubic = variant === "supercritical" ? "- x*(x^2 + y^2)" : "+ x*(x^2 + y^2) - x*(x^2 + y^2)^2";
  const cubicY = variant === "supercritical" ? "- y*(x^2 + y^2)" : "+ y*(x^2 + y^2) - y*(x^2 + y^2)^2";
  const half = variant === "supercritical" ? 1.2 : 1.6;
  return {
    title: `the ${variant} Hopf normal form`,
    variant,
    ...symmetric(["x", "y"], [half, half]),
    parameters: [exact("mu", mu, range), param("w", w, 0.3)],
    equations: { x: `mu*x - w*y ${cubic}`, y: `w*x + mu*y ${cubicY}` },
    scenarios: scenarios(d, Math.min(600, 30 / Math.abs(mu)), () => {
      const r = d.range(0.05, 1) * half * 0.9,
        t = d.range(0, 2 * Math.PI);
      return { x: r * Math.cos(t), y: r * Math.sin(t) };
    }),
    studied: ["mu"],
  };
};

/** Linearisations on a borderline of the trace–determinant plane, and a hair's breadth off it. */
const borderline: Family = (d, k) => {
  const variant = ["star", "degenerate-node", "centre", "near-node", "near-focus", "saddle-node"][k % 6];
  const p = sig(-d.range(0.2, 1), 3);
  const box = symmetric(["x", "y"], [1, 1]);
  const start = () => ({ x: d.range(-0.8, 0.8), y: d.range(-0.8, 0.8) });
  const through = (v: number): [number, number] =>
    [sig(v * 2, 3), sig(-v * 0.8, 3)].sort((a, b) => a - b) as [number, number];
  const models: Record<string, () => Omit<FamilyModel, "title" | "variant" | "states" | "window">> = {
    star: () => ({
      parameters: [exact("p", p, through(p)), param("q", d.range(0.1, 0.5))],
      equations: { x: "p*x + q*y^2", y: "p*y" },
      scenarios: scenarios(d, 40 / -p, start),
      studied: ["p"],
    }),
    "degenerate-node": () => ({
      parameters: [exact("p", p, through(p))],
      equations: { x: "p*x + y", y: "p*y" },
      scenarios: scenarios(d, 60 / -p, start),
      studied: ["p"],
    }),
    centre: () => ({
      parameters: [param("w", d.range(0.5, 2), 0.3)],
      equations: { x: "-w*y", y: "w*x" },
      scenarios: scenarios(d, 40, () => {
        const r = d.range(0.1, 0.9),
          t = d.range(0, 2 * Math.PI);
        return { x: r * Math.cos(t), y: r * Math.sin(t) };
      }),
      studied: ["w"],
    }),
    // disc = 4 ε: a node for ε > 0, a focus for ε < 0, |ε|/p² from 1e-5 to 1e-3 (well above rounding)
    "near-node": () => ({
      parameters: [
        param("p", p, 0.2),
        exact("eps", sig(p * p * d.log(1e-5, 1e-3), 3), [0, sig(p * p * 2e-3, 3)]),
      ],
      equations: { x: "p*x + y", y: "eps*x + p*y" },
      scenarios: scenarios(d, 60 / -p, start),
      studied: ["p"],
    }),
    "near-focus": () => ({
      parameters: [
        param("p", p, 0.2),
        exact("eps", sig(-p * p * d.log(1e-5, 1e-3), 3), [sig(-p * p * 2e-3, 3), 0]),
      ],
      equations: { x: "p*x + y", y: "eps*x + p*y" },
      scenarios: scenarios(d, 60 / -p, start),
      studied: ["p"],
    }),
    // x' = s + x²: a saddle-node at s = 0, the current value; for s < 0 a node at −√−s and a saddle at +√−s
    "saddle-node": () => ({
      parameters: [exact("s", 0, [-0.25, sig(d.range(0.05, 0.25), 3)]), param("g", d.range(0.3, 1.5))],
      equations: { x: "s + x^2", y: "-g*y" },
      scenarios: scenarios(d, 200, () => ({ x: d.range(-0.9, -0.1), y: d.range(-0.8, 0.8) })),
      studied: ["s"],
    }),
  };
  return { title: `a borderline linearisation (${variant})`, variant, ...box, ...models[variant]() };
};

/**
 * A linear stable focus started at (r0, 0): y(t) = r0 e^{−αt} sin(ωt) peaks at t* = atan(ω/α)/ω. The
 * window's top edge sits a relative δ below (the trajectory pokes out for a moment, between the
 * integrator's steps) or above (it stays inside) that peak.
 */
const windowGraze: Family = (d, k) => {
  // the peak is computed from the values the spec holds (rounded), so the edge sits where intended
  const alpha = sig(d.range(0.05, 0.4)),
    w = sig(d.range(0.5, 2)),
    r0 = sig(d.range(0.5, 1));
  const delta = [-1e-5, -1e-4, -1e-3, 1e-3][k % 4];
  const ts = Math.atan(w / alpha) / w;
  const peak = r0 * Math.exp(-alpha * ts) * Math.sin(w * ts);
  const top = peak * (1 + delta);
  return {
    title: `a focus grazing the window's edge (δ = ${delta})`,
    variant: delta < 0 ? "brief-exit" : "stays-inside",
    // the feasible region is the window, so the edge is grazed whichever of the two a fate refers to
    states: [
      { name: "x", min: -1.2, max: 1.2 },
      { name: "y", min: -1.2, max: top },
    ],
    window: { x: [-1.2, 1.2], y: [-1.2, top] },
    parameters: [param("alpha", alpha, 0.1), exact("w", w, [sig(w * 0.9), sig(w * 1.1)])],
    equations: { x: "-alpha*x - w*y", y: "w*x - alpha*y" },
    scenarios: [{ initial: { x: r0, y: 0 }, horizon: sig(40 / alpha, 3) }],
    studied: ["alpha"],
  };
};

export const FORM_FAMILIES: Record<string, Family> = {
  chemical,
  polynomial,
  hopf,
  borderline,
  "window-graze": windowGraze,
};

"""Equilibria in the window and their types (part of the crosscheck reference; shares no code with keel).

Search: f on a 97 x 97 grid of the window (numpy); every cell whose corners bracket zero in both
components, every grid node where the scaled residual has a local minimum (tangencies, where no
sign changes), every root of the tangential component along a window edge on which the normal
component vanishes identically (an invariant axis, located by brentq), and the caller's extra
starts (the equilibria at a nearby parameter value) are handed to MINPACK's hybrid Powell method
(scipy.optimize.root, method "hybr"; Moré, Garbow & Hillstrom, User Guide for MINPACK-1, 1980)
with the exact Jacobian (dual numbers); roots are polished by Newton steps, deduplicated and kept
when inside the window.

Types: the trace-determinant classification of the linearisation (Strogatz, Nonlinear Dynamics
and Chaos, 2nd ed., §5.2 for linear systems, §6.3 for what the linearisation decides). Trace,
determinant and discriminant are compared with unit-free scales (a change of units J -> D J D^-1
leaves them unchanged): the spectral radius and the sizes of the terms that cancel. A quantity is
zero below ZERO of its scale, non-zero above NONZERO, and in between the case is borderline: the
type is then not a reference value (the two bounds sit either side of any sensible cut, so keel's
own cut, whatever it is, is not copied).
"""

import math

import numpy as np
from scipy.optimize import brentq, root

GRID = 96
EDGE_SAMPLES = 400
ROOT_RESIDUAL = 1e-9  # of each component's scale over the window
DEDUP = 1e-6  # scaled distance
WINDOW_SLACK = 1e-9  # scaled
NEAR_EDGE = 1e-6  # scaled: closer than this to an edge (not on it), being inside is a matter of rounding
ON_EDGE = 1e-12
INVARIANT = 1e-13  # |f_normal| / scale along a whole edge: the edge is invariant
ZERO = 1e-10
NONZERO = 1e-6
MAX_EQUILIBRIA = 50


def classify(J):
    """The type of the linearisation at an equilibrium, with a borderline flag."""
    (a, b), (c, d) = J
    tr, det = a + d, a * d - b * c
    disc = tr * tr - 4 * det
    ev = np.linalg.eigvals(np.array(J, float))
    rho = float(max(abs(ev))) if np.all(np.isfinite(ev)) else math.inf
    scales = {
        "trace": max(abs(a), abs(d), rho),
        "det": max(abs(a * d), abs(b * c), rho * rho),
    }
    scales["disc"] = max(tr * tr, 4 * scales["det"])
    values = {"trace": tr, "det": det, "disc": disc}

    def size(k):
        v, s = abs(values[k]), scales[k]
        if s == 0 or v <= ZERO * s:
            return "zero"
        return "nonzero" if v > NONZERO * s else "borderline"

    out = {
        "trace": tr,
        "determinant": det,
        "discriminant": disc,
        "eigenvalues": [[float(e.real), float(e.imag)] for e in sorted(ev, key=lambda e: (e.real, e.imag))],
        "borderline": False,
    }
    if not all(math.isfinite(v) for v in (a, b, c, d)):
        return {**out, "type": "non-finite", "stable": None, "borderline": True}
    norm = math.hypot(math.hypot(a, b), math.hypot(c, d))
    sd, st, sq = size("det"), size("trace"), size("disc")
    if norm == 0 or sd == "zero":
        return {**out, "type": "non-hyperbolic", "stable": None}
    if sd == "borderline":
        return {**out, "type": "non-hyperbolic", "stable": None, "borderline": True}
    if det < 0:
        return {**out, "type": "saddle", "stable": False}
    if st != "nonzero":
        return {**out, "type": "center", "stable": None, "borderline": st == "borderline"}
    side = "stable" if tr < 0 else "unstable"
    if sq == "nonzero":
        return {**out, "type": f"{side}-{'node' if disc > 0 else 'focus'}", "stable": tr < 0}
    scalar = max(abs(b), abs(c), abs(a - d)) <= ZERO * norm
    near_scalar = max(abs(b), abs(c), abs(a - d)) <= NONZERO * norm
    kind = "star" if scalar else "degenerate-node"
    return {
        **out,
        "type": f"{side}-{kind}",
        "stable": tr < 0,
        "borderline": sq == "borderline" or (near_scalar and not scalar),
    }


class Finder:
    """Equilibria of one model at one parameter point, in window-scaled coordinates internally."""

    def __init__(self, eqs, values, window, bounds):
        self.f = eqs.scalar(values)
        self.F = eqs.vector(values)
        self.J = eqs.jacobian(values)
        self.lo = np.array([window[0][0], window[1][0]], float)
        self.hi = np.array([window[0][1], window[1][1]], float)
        self.w = self.hi - self.lo
        self.bounds = bounds  # [[min, max], [min, max]]: the feasible region
        u = np.linspace(0.0, 1.0, GRID + 1)
        self.X, self.Y = np.meshgrid(self.lo[0] + self.w[0] * u, self.lo[1] + self.w[1] * u, indexing="ij")
        self.F0, self.F1 = self.F(self.X, self.Y)
        s = [np.nanmax(np.abs(np.where(np.isfinite(G), G, np.nan))) if np.isfinite(G).any() else 0.0 for G in (self.F0, self.F1)]
        self.scale = np.array([v if v > 0 and math.isfinite(v) else 1.0 for v in s])

    def residual(self, z):
        r = np.abs(np.array(self.f(0.0, z)) / self.scale)
        return float(np.max(r)) if np.all(np.isfinite(r)) else math.inf

    def _starts(self):
        F0, F1 = self.F0, self.F1
        out = []

        def brackets(G):
            corners = np.stack([G[:-1, :-1], G[1:, :-1], G[:-1, 1:], G[1:, 1:]])
            with np.errstate(invalid="ignore"):
                return (np.nanmin(corners, axis=0) <= 0) & (np.nanmax(corners, axis=0) >= 0) & np.all(np.isfinite(corners), axis=0)

        cells = np.argwhere(brackets(F0) & brackets(F1))
        for i, j in cells[:800]:
            out.append([(self.X[i, j] + self.X[i + 1, j]) / 2, (self.Y[i, j] + self.Y[i, j + 1]) / 2])
        with np.errstate(invalid="ignore"):
            R = np.maximum(np.abs(F0) / self.scale[0], np.abs(F1) / self.scale[1])
        R = np.where(np.isfinite(R), R, np.inf)
        inner = R[1:-1, 1:-1]
        ismin = (inner < 1e-2) & np.all(
            [inner <= R[1 + di : R.shape[0] - 1 + di, 1 + dj : R.shape[1] - 1 + dj] for di in (-1, 0, 1) for dj in (-1, 0, 1)],
            axis=0,
        )
        minima = [[self.X[i + 1, j + 1], self.Y[i + 1, j + 1]] for i, j in np.argwhere(ismin)]
        return out, minima

    def _edge_roots(self):
        """Roots on a window edge along which the normal component vanishes identically."""
        out = []
        s = np.linspace(0.0, 1.0, EDGE_SAMPLES + 1)
        for k in (0, 1):  # the state held fixed on the edge
            other = 1 - k
            for value in (self.lo[k], self.hi[k]):
                pts = np.empty((2, s.size))
                pts[k] = value
                pts[other] = self.lo[other] + self.w[other] * s
                G = self.F(pts[0], pts[1])
                normal, along = G[k], G[other]
                if not (np.all(np.isfinite(normal)) and np.max(np.abs(normal)) <= INVARIANT * self.scale[k]):
                    continue

                def g(t):
                    z = [0.0, 0.0]
                    z[k], z[other] = value, t
                    return self.f(0.0, z)[other]

                xs = pts[other]
                for a in range(s.size - 1):
                    ga, gb = along[a], along[a + 1]
                    if not (np.isfinite(ga) and np.isfinite(gb)):
                        continue
                    z = [0.0, 0.0]
                    z[k] = value
                    if ga == 0:
                        z[other] = xs[a]
                        out.append(list(z))
                    elif ga * gb < 0:
                        z[other] = brentq(g, xs[a], xs[a + 1], xtol=1e-15 * self.w[other], rtol=1e-15)
                        out.append(list(z))
                    elif 0 < a and abs(ga) < abs(along[a - 1]) and abs(ga) < abs(gb):
                        z[other] = xs[a]  # a local minimum of |f|: a tangency, polished below
                        out.append(list(z))
                if along[-1] == 0:
                    z = [0.0, 0.0]
                    z[k], z[other] = value, xs[-1]
                    out.append(z)
        return out

    def _solve(self, z0):
        lo, w, sc = self.lo, self.w, self.scale

        def G(u):
            return np.array(self.f(0.0, lo + w * u)) / sc

        def JG(u):
            return self.J(lo + w * u) * w[None, :] / sc[:, None]

        u0 = (np.asarray(z0, float) - lo) / w
        try:
            sol = root(G, u0, jac=JG, method="hybr", options={"xtol": 1e-14})
        except (ValueError, np.linalg.LinAlgError):
            return None
        u = sol.x
        if not np.all(np.isfinite(u)) or np.any(u < -0.5) or np.any(u > 1.5):
            return None
        return self._polish(lo + w * u)

    def _polish(self, z):
        z = np.array(z, float)
        for _ in range(8):
            f = np.array(self.f(0.0, z))
            J = self.J(z)
            if not (np.all(np.isfinite(f)) and np.all(np.isfinite(J))):
                return None
            try:
                step = np.linalg.solve(J, -f)
            except np.linalg.LinAlgError:
                break
            if not np.all(np.isfinite(step)):
                break
            trial = z + step
            if self.residual(trial) > self.residual(z) and self.residual(z) < ROOT_RESIDUAL * 1e-3:
                break
            z = trial
            if np.max(np.abs(step) / self.w) < 1e-15:
                break
        return z if self.residual(z) < ROOT_RESIDUAL else None

    def find(self, extra=()):
        found = []
        cells, minima = self._starts()
        cell = self.w / GRID
        starts = [(z, False) for z in list(extra) + self._edge_roots() + cells] + [(z, True) for z in minima]
        for z0, is_minimum in starts:
            # a residual minimum within a grid cell of a root found already is that root's own dip
            if is_minimum and any(np.all(np.abs(np.asarray(z0) - q) <= cell) for q in found):
                continue
            z = self._polish(z0) if self.residual(z0) < 1e-6 else None
            z = z if z is not None else self._solve(z0)
            if z is None:
                continue
            u = (z - self.lo) / self.w
            if np.any(u < -NEAR_EDGE) or np.any(u > 1 + NEAR_EDGE):
                continue
            # on a state bound (an axis) to rounding: put it there, as the presence pattern reads it
            for k in (0, 1):
                for b in self.bounds[k]:
                    if abs(z[k] - b) <= 1e-10 * self.w[k]:
                        t = z.copy()
                        t[k] = b
                        if self.residual(t) < ROOT_RESIDUAL:
                            z = t
            if any(np.max(np.abs(z - q) / self.w) < DEDUP for q in found):
                continue
            found.append(z)
            if len(found) > MAX_EQUILIBRIA:
                break
        return [self._describe(z) for z in sorted(found, key=lambda q: (q[0], q[1]))]

    def _describe(self, z):
        u = (z - self.lo) / self.w
        gap = min(float(np.min(u)), float(np.min(1 - u)))  # negative: outside
        c = classify(self.J(z).tolist())
        # stability by the signs alone (trace < 0 < determinant beyond rounding): where a parameter
        # study needs a side, the borderline band would shift a stability change by its width
        scale = max(abs(c["trace"]), abs(c["determinant"]) ** 0.5, 1e-300)
        signs = c["trace"] < -ZERO * scale and c["determinant"] > ZERO * scale * scale
        unstable = c["trace"] > ZERO * scale or c["determinant"] < -ZERO * scale * scale
        return {
            "stableBySign": bool(signs),
            "unstableBySign": bool(unstable),
            "point": [float(z[0]), float(z[1])],
            "inside": gap >= -WINDOW_SLACK,
            "nearEdge": ON_EDGE < abs(gap) < NEAR_EDGE,
            "residual": self.residual(z),
            "jacobian": self.J(z).tolist(),
            **c,
        }


def find_equilibria(eqs, values, window, bounds, region, extra=()):
    """Every equilibrium in the window and in the feasible region beyond it (the region both span):
    the window searched on its own grid, then the whole region with the window's roots as extra
    starts; "inside" then means inside the region."""
    in_window = Finder(eqs, values, window, bounds).find(extra)
    if region == window:
        return in_window
    return Finder(eqs, values, region, bounds).find(list(extra) + [e["point"] for e in in_window])

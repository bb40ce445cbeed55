"""Trajectories and their fates (part of the crosscheck reference; shares no code with keel).

Integration: Hairer's DOP853, the explicit Runge-Kutta pair of order 8(5,3) of Dormand and Prince
(Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed., §II.5 and §II.10),
as compiled into scipy (scipy.integrate.ode, "dop853"), rtol 1e-10 and atol 1e-12 of the window
width; where DOP853 reports stiffness, LSODA (Petzold's automatic stiff/non-stiff switching,
scipy.integrate.solve_ivp) takes over. Every accepted step is recorded.

A fate, from the recorded steps:
  left-window  the trajectory crossed a window edge at any time before the horizon, also between
               two steps: on each step the cubic Hermite interpolant (values and slopes at both
               ends) gives each component's extremum; a step whose extremum comes within
               EXIT_MARGIN of an edge is integrated again with dense output (solve_ivp DOP853,
               rtol 1e-12) and searched finely. The state whose edge was crossed first is named.
  blow-up      after the exit the solution becomes unbounded before the horizon: its scaled size
               passes FAR and its e-folding time |z|/|z'| shrinks to below BLOWUP_SHRINK of what it
               was on passing the first mark (a finite-time singularity, x' ~ x^p with p > 1); an
               exponential escape keeps its e-folding time and is a plain exit.
  equilibrium  at the horizon (or earlier, inside CONVERGED of a stable equilibrium), within
               NEAR_STABLE of a linearly stable equilibrium, or within NEAR_CONTRACTING of it with its
               quadratic Lyapunov function falling steadily over the last quarter of the steps; within NEAR_SADDLE of a saddle with the
               unstable component below SADDLE_UNSTABLE of the distance (a start on its stable
               manifold); within NEAR_SLOW of a non-hyperbolic or borderline equilibrium with the
               distance falling at every step of the last quarter (an algebraic approach) or already
               within AT_EQUILIBRIUM of it (on it to rounding); or
               section returns closing in geometrically on a stable focus (a slow spiral).
  cycle        section returns converging to a fixed point away from every equilibrium, or all
               equal to integration accuracy (a closed orbit); see xc_cycles.py.
  undecided    none of these by the horizon, doubled up to HORIZON_DOUBLINGS times.
The same trajectory is also judged against the feasible region (the states' min/max) instead of
the window: keel's window is a drawing region inside it, so the two definitions can differ.
"""

import math
import warnings

import numpy as np
from scipy.integrate import ode, solve_ivp
from scipy.linalg import solve_continuous_lyapunov
from scipy.optimize import brentq

import xc_cycles

RTOL = 1e-10
ATOL_OF_WIDTH = 1e-12
MAX_STEPS = 400_000
HORIZON_DOUBLINGS = 4  # keel's stated budget (16 horizons), the same rule: not its code
EXIT_SLACK = 1e-9  # scaled overshoot that counts as having left
EXIT_MARGIN = 1e-3  # scaled: a step whose Hermite extremum comes this near an edge is re-integrated densely
FAR = 1e6  # window widths
HUGE = 1e30  # window widths: far enough to have told a finite-time singularity from an exponential escape
BLOWUP_SHRINK = 1e-3
CONVERGED = 1e-9  # scaled distance to a stable equilibrium: arrived, stop integrating
NEAR_STABLE = 1e-3
NEAR_CONTRACTING = 0.05  # within this (scaled) a steady fall of the Lyapunov function decides
NEAR_SADDLE = 1e-3
SADDLE_UNSTABLE = 1e-6
NEAR_SLOW = 1e-2
AT_EQUILIBRIUM = 1e-12  # scaled: an end this near an equilibrium sits on it to rounding (no distance left to fall)


class Path:
    def __init__(self, t, y, status):
        self.t = np.asarray(t, float)
        self.y = np.asarray(y, float).reshape(-1, 2)
        self.status = status  # "horizon", "stopped", "failed", "non-finite"


def integrate(f, z0, horizon, atol, stop=None):
    """Accepted steps of DOP853 from z0 over [0, horizon]; stop(t, y) -> True ends it early."""
    ts, ys = [], []

    # scipy 1.17's dop853 takes a scalar atol only: integrate u = y / scale with atol 1, which
    # is the same error test, |err_k| <= atol_k + RTOL |y_k|, component by component
    scale = np.asarray(atol, float)

    def g(t, u):
        dy = f(t, u * scale)
        return [dy[0] / scale[0], dy[1] / scale[1]]

    def solout(t, u):
        if ts and t <= ts[-1]:
            return 0
        y = u * scale
        ts.append(t)
        ys.append([y[0], y[1]])
        if not (math.isfinite(y[0]) and math.isfinite(y[1])):
            return -1
        return -1 if stop is not None and stop(t, y) else 0

    r = ode(g).set_integrator("dop853", rtol=RTOL, atol=1.0, nsteps=MAX_STEPS)
    r.set_solout(solout)
    r.set_initial_value(list(np.asarray(z0, float) / scale), 0.0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        r.integrate(horizon)
    code = r.get_return_code()
    if code == -4:  # stiff: LSODA over the whole horizon instead
        return _integrate_lsoda(f, z0, horizon, atol, stop)
    last = ys[-1] if ys else z0
    if not (math.isfinite(last[0]) and math.isfinite(last[1])):
        status = "non-finite"
    elif code == 2:
        status = "stopped"
    elif code == 1 and ts and ts[-1] >= horizon * (1 - 1e-12):
        status = "horizon"
    else:
        status = "failed"
    return Path(ts, ys, status)


def _integrate_lsoda(f, z0, horizon, atol, stop):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        sol = solve_ivp(f, (0.0, horizon), list(z0), method="LSODA", rtol=RTOL, atol=list(atol))
    t, y = sol.t, sol.y.T
    if stop is not None:
        for k in range(len(t)):
            if stop(t[k], y[k]):
                return Path(t[: k + 1], y[: k + 1], "stopped")
    status = "horizon" if sol.success and t[-1] >= horizon * (1 - 1e-12) else "failed"
    if not np.all(np.isfinite(y[-1])):
        status = "non-finite"
    return Path(t, y, status)


def _hermite_extremes(path, F, box_lo, box_w):
    """Per step and component, the min and max of the cubic Hermite interpolant (scaled)."""
    t, y = path.t, path.y
    f0, f1 = F(y[:, 0], y[:, 1])
    fy = np.stack([f0, f1], axis=1)
    h = np.diff(t)[:, None]
    ya, yb, fa, fb = y[:-1], y[1:], fy[:-1], fy[1:]
    c1 = h * fa
    c2 = 3 * (yb - ya) - h * (2 * fa + fb)
    c3 = 2 * (ya - yb) + h * (fa + fb)
    lo, hi = np.minimum(ya, yb), np.maximum(ya, yb)
    interior = np.zeros_like(ya, dtype=bool)
    with np.errstate(all="ignore"):
        disc = c2 * c2 - 3 * c3 * c1
        for sign in (1.0, -1.0):
            s = np.where(np.abs(c3) > 1e-300, (-c2 + sign * np.sqrt(np.maximum(disc, 0))) / (3 * c3), -c1 / (2 * c2))
            ok = np.isfinite(s) & (s > 0) & (s < 1) & (disc >= 0)
            val = ya + c1 * s + c2 * s * s + c3 * s**3
            lo = np.where(ok & (val < lo), val, lo)
            hi = np.where(ok & (val > hi), val, hi)
            interior |= ok
    return (lo - box_lo) / box_w, (hi - box_lo) / box_w, interior


def _dense_step(f, t0, t1, y0, atol):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        sol = solve_ivp(f, (t0, t1), list(y0), method="DOP853", rtol=1e-12, atol=list(atol * 1e-2), dense_output=True)
    return sol.sol if sol.success else None


def first_exit(f, F, path, lo, hi, atol):
    """(time, state index) of the first crossing of the box [lo, hi] beyond EXIT_SLACK, or None."""
    w = hi - lo
    y = (path.y - lo) / w
    if len(path.t) < 2:
        return None
    smin, smax, interior = _hermite_extremes(path, F, lo, w)
    ends_out = (y[1:] < -EXIT_SLACK) | (y[1:] > 1 + EXIT_SLACK)
    near = interior & ((smin < EXIT_MARGIN) | (smax > 1 - EXIT_MARGIN))
    flagged = np.flatnonzero(np.any(ends_out, axis=1) | np.any(near, axis=1))
    for k in flagged:
        if np.any(ends_out[k]) and not np.any(interior[k]):
            comp = int(np.argmax(np.maximum(-EXIT_SLACK - y[k + 1], y[k + 1] - 1 - EXIT_SLACK)))
            return _locate(f, path, k, lo, w, atol, comp)
        dense = _dense_step(f, path.t[k], path.t[k + 1], path.y[k], atol)
        if dense is None:
            continue
        ts = np.linspace(path.t[k], path.t[k + 1], 257)
        u = (dense(ts).T - lo) / w
        out = (u < -EXIT_SLACK) | (u > 1 + EXIT_SLACK)
        hit = np.flatnonzero(np.any(out, axis=1))
        if hit.size:
            i = hit[0]
            comp = int(np.argmax(np.maximum(-EXIT_SLACK - u[i], u[i] - 1 - EXIT_SLACK)))
            return _bisect_time(dense, ts[max(i - 1, 0)], ts[i], lo, w, comp)
    return None


def _locate(f, path, k, lo, w, atol, comp):
    dense = _dense_step(f, path.t[k], path.t[k + 1], path.y[k], atol)
    if dense is None:
        return (float(path.t[k + 1]), comp)
    ts = np.linspace(path.t[k], path.t[k + 1], 257)
    u = (dense(ts).T - lo) / w
    out = np.flatnonzero(np.any((u < -EXIT_SLACK) | (u > 1 + EXIT_SLACK), axis=1))
    i = out[0] if out.size else len(ts) - 1
    comp = int(np.argmax(np.maximum(-EXIT_SLACK - u[i], u[i] - 1 - EXIT_SLACK)))
    return _bisect_time(dense, ts[max(i - 1, 0)], ts[i], lo, w, comp)


def _bisect_time(dense, a, b, lo, w, comp):
    """The time in [a, b] where state `comp` crosses its edge (beyond EXIT_SLACK), by brentq on the interpolant."""
    u = lambda t: (dense(t)[comp] - lo[comp]) / w[comp]  # noqa: E731
    edge = -EXIT_SLACK if u(b) < 0 else 1 + EXIT_SLACK
    ga, gb = u(a) - edge, u(b) - edge
    if ga == 0 or ga * gb > 0:
        return (float(b), comp)
    return (float(brentq(lambda t: u(t) - edge, a, b, xtol=1e-15 * max(1.0, abs(b)), rtol=1e-15)), comp)


def _blows_up(f, path, t_exit, lo, w):
    """Unbounded before the horizon, with a shrinking e-folding time (see the module note)."""
    u = np.hypot(*((path.y - lo) / w).T)
    after = path.t >= t_exit
    far = np.flatnonzero(after & (u > FAR))
    if far.size == 0:
        return False
    k0, k1 = far[0], len(path.t) - 1

    def efold(k):
        z = path.y[k]
        g = np.array(f(0.0, z)) / w
        return float(np.hypot(*((z - lo) / w)) / max(np.hypot(*g), 1e-300))

    ended_early = path.status in ("failed", "non-finite") or u[k1] > HUGE
    if not ended_early:
        return False
    if not math.isfinite(u[k1]) or not np.all(np.isfinite(path.y[k1])):
        k1 -= 1
    return k1 > k0 and efold(k1) < BLOWUP_SHRINK * efold(k0)


def _unstable_component(e, z, lo, w):
    """|unstable component| / distance of z from saddle e, in scaled coordinates."""
    J = np.array(e["jacobian"]) * w[None, :] / w[:, None]
    vals, vecs = np.linalg.eig(J)
    order = np.argsort(vals.real)
    V = vecs[:, order].real
    d = (np.asarray(z) - np.asarray(e["point"])) / w
    try:
        a, b = np.linalg.solve(V, d)
    except np.linalg.LinAlgError:
        return math.inf
    return abs(b) / max(np.hypot(*d), 1e-300)


class Judge:
    """Decides fates for one model at one parameter point."""

    def __init__(self, eqs, values, window, bounds, equilibria, precise=True):
        self.f = eqs.scalar(values)
        self.F = eqs.vector(values)
        self.J = eqs.jacobian(values)
        self.lo = np.array([window[0][0], window[1][0]], float)
        self.hi = np.array([window[0][1], window[1][1]], float)
        self.w = self.hi - self.lo
        self.flo = np.array([bounds[0][0], bounds[1][0]], float)
        self.fhi = np.array([bounds[0][1], bounds[1][1]], float)
        self.eq = [e for e in equilibria if e["inside"]]
        self.atol = ATOL_OF_WIDTH * self.w
        # precise: periodic orbits solved to 1e-10 (the nominal values); else only told apart (parameter samples)
        self.precise = precise
        self.stable = [np.array(e["point"]) for e in self.eq if e["stable"] is True and not e["borderline"]]

    def _dist(self, z, p):
        return float(np.hypot(*((np.asarray(z) - np.asarray(p)) / self.w)))

    def follow(self, start, horizon):
        w0, w1 = float(self.w[0]), float(self.w[1])
        l0, l1 = float(self.lo[0]), float(self.lo[1])
        sinks = [(float(p[0]), float(p[1])) for p in self.stable]
        near2, huge = CONVERGED * CONVERGED, HUGE

        def arrived(_t, y):  # plain floats: called at every step
            y0, y1 = float(y[0]), float(y[1])
            for p0, p1 in sinks:
                if ((y0 - p0) / w0) ** 2 + ((y1 - p1) / w1) ** 2 < near2:
                    return True
            return abs((y0 - l0) / w0) > huge or abs((y1 - l1) / w1) > huge

        # as keel documents for its fates: a trajectory still undecided at its horizon is followed
        # on, the horizon doubled up to HORIZON_DOUBLINGS times (a slow spiral or a slow passage
        # past a saddle is decided in the end)
        for doubling in range(HORIZON_DOUBLINGS + 1):
            path = integrate(self.f, start, horizon * 2**doubling, self.atol, arrived)
            window = self._judge(path, self.lo, self.hi)
            feasible = self._judge(path, self.flo, self.fhi) if np.all(np.isfinite(self.fhi - self.flo)) else window
            if feasible.get("reason") != "horizon":
                break
        return window, feasible, path

    def _judge(self, path, lo, hi):
        ex = first_exit(self.f, self.F, path, lo, hi, self.atol)
        if ex is not None:
            t_exit, comp = ex
            kind = "blow-up" if _blows_up(self.f, path, t_exit, self.lo, self.w) else "left-window"
            return {"kind": kind, "state": comp, "t": t_exit}
        if path.status == "non-finite":
            return {"kind": "undecided", "reason": "non-finite"}
        if path.status == "failed":
            return {"kind": "undecided", "reason": "integration-failed"}
        return self._at_end(path)

    def _at_end(self, path):
        z = path.y[-1]
        for i, e in enumerate(self.eq):
            d = self._dist(z, e["point"])
            if e["stable"] is True and not e["borderline"] and (d < NEAR_STABLE or self._contracting(path, e, d)):
                return {"kind": "equilibrium", "index": i, "point": e["point"], "approach": "linear"}
            if e["type"] == "saddle" and d < NEAR_SADDLE:
                if d < 1e-12 or _unstable_component(e, z, self.lo, self.w) < SADDLE_UNSTABLE:
                    return {"kind": "equilibrium", "index": i, "point": e["point"], "approach": "stable-manifold"}
            if (e["stable"] is None or e["borderline"]) and d < NEAR_SLOW and (d < AT_EQUILIBRIUM or self._closing_in(path, e["point"])):
                return {"kind": "equilibrium", "index": i, "point": e["point"], "approach": "algebraic"}
        cyc = xc_cycles.from_path(self, path)
        if cyc is not None:
            if cyc["kind"] == "spiral":
                i = cyc["index"]
                return {"kind": "equilibrium", "index": i, "point": self.eq[i]["point"], "approach": "spiral"}
            return {"kind": "cycle", **cyc}
        return {"kind": "undecided", "reason": "horizon"}

    def _contracting(self, path, e, d):
        """Near a stable equilibrium and closing in: its quadratic Lyapunov function V (J^T P + P J = -I,
        window-scaled; Khalil, Nonlinear Systems, 3rd ed., §4.3) falls at every step of the last quarter,
        to below a quarter of where that quarter began."""
        if d > NEAR_CONTRACTING or len(path.t) < 16:
            return False
        J = np.array(e["jacobian"]) * self.w[None, :] / self.w[:, None]
        try:
            P = solve_continuous_lyapunov(J.T, -np.eye(2))
        except (ValueError, np.linalg.LinAlgError):
            return False
        tail = (path.y[int(0.75 * len(path.t)) :] - np.asarray(e["point"])) / self.w
        V = np.einsum("ij,jk,ik->i", tail, P, tail)
        return bool(np.all(np.isfinite(V)) and np.all(np.diff(V) < 0) and V[-1] < 0.25 * V[0])

    def _closing_in(self, path, p):
        n = len(path.t)
        tail = path.y[int(0.75 * n) :]
        if len(tail) < 8 or path.t[-1] - path.t[int(0.75 * n)] <= 0:
            return False
        d = np.hypot(*((tail - np.asarray(p)) / self.w).T)
        return bool(np.all(np.diff(d) < 0))

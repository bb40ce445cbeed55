"""Periodic orbits by a Poincaré section (part of the crosscheck reference; shares no code with keel).

The section is the line through the trajectory's last point p, normal to the flow there (window-
scaled coordinates), crossed in the flow's direction within R_LOCAL of p (Hirsch, Smale & Devaney,
Differential Equations, Dynamical Systems and an Introduction to Chaos, 2nd ed., §10.3: a local
section and its first-return map). The last returns of the recorded trajectory are located on the
dense output of a re-integration of their steps (solve_ivp DOP853, rtol 1e-12), then:

  all returns equal to CLOSED        a closed orbit (a member of a family, or a converged cycle):
                                     the slope of the return map tells neutral, stable, unstable;
  gaps shrinking geometrically        the Aitken limit of the returns is a stable equilibrium: a
                                     spiral into it; else a periodic orbit the trajectory is
                                     approaching (stable);
  otherwise                           no decision.

The periodic orbit itself (its period, to about 1e-10) comes from the return map P on the section,
by the secant method on P(s) - s, each return integrated by solve_ivp DOP853 at rtol 1e-12 with
its crossing located as an event on the dense output; the multiplier is P'(s*) by central
differences (Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., §8.7).
"""

import math
import warnings

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

R_LOCAL = 0.25
CLOSED = 1e-7  # scaled: returns this close are one closed orbit to integration accuracy
FIXED_POINT = 1e-11  # scaled |P(s) - s| at the solved orbit
SLOPE_STEP = 1e-5
NEUTRAL = 1e-5  # |P' - 1| below this: the multiplier alone does not tell
FAMILY_PROBE = 1e-3
FAMILY_RESIDUAL = 1e-8
MIN_EXTENT = 1e-4  # scaled size of a genuine orbit
SECANT_ITERATIONS = 30


class Section:
    def __init__(self, judge, point):
        self.j = judge
        self.p = (np.asarray(point, float) - judge.lo) / judge.w
        fp = np.array(judge.f(0.0, point)) / judge.w
        norm = float(np.hypot(*fp))
        self.ok = norm > 0 and math.isfinite(norm)
        self.n = fp / norm if self.ok else np.array([1.0, 0.0])
        self.tau = np.array([-self.n[1], self.n[0]])

    def state(self, s):
        return self.j.lo + self.j.w * (self.p + s * self.tau)

    def g(self, z):
        return float(np.dot((np.asarray(z) - self.j.lo) / self.j.w - self.p, self.n))

    def position(self, z):
        return float(np.dot((np.asarray(z) - self.j.lo) / self.j.w - self.p, self.tau))

    def ret(self, s, period):
        """P(s): (position, return time, extent) of the first return after half a period, or None."""
        j = self.j
        z0 = self.state(s)

        def event(_t, z):
            return self.g(z)

        event.direction = 1
        rtol = 1e-12 if j.precise else 1e-10
        for span in (1.6, 3.2):
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                sol = solve_ivp(
                    j.f, (0.0, span * period), list(z0), method="DOP853", rtol=rtol,
                    atol=list(rtol * 1e-2 * j.w), events=event,
                )
            for t, z in zip(sol.t_events[0], sol.y_events[0]):
                u = (z - j.lo) / j.w
                if t > 0.5 * period and np.hypot(*(u - self.p)) < R_LOCAL:
                    extent = [[float(sol.y[k].min()), float(sol.y[k].max())] for k in (0, 1)]
                    return self.position(z), float(t), extent
            if sol.status == -1:
                return None
        return None


def _crossings(judge, sec, path):
    """Returns of the recorded path to the section, most recent first, located on dense output."""
    rtol = 1e-12 if judge.precise else 1e-10
    u = (path.y - judge.lo) / judge.w
    g = (u - sec.p) @ sec.n
    ks = np.flatnonzero((g[:-1] < 0) & (g[1:] >= 0))
    ks = [k for k in ks if k < len(g) - 2 and np.hypot(*(u[k] - sec.p)) < R_LOCAL]
    out = []
    for k in reversed(ks):
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            sol = solve_ivp(
                judge.f, (path.t[k], path.t[k + 1]), list(path.y[k]), method="DOP853", rtol=rtol,
                atol=list(rtol * 1e-2 * judge.w), dense_output=True,
            )
        if not sol.success:
            break
        ga, gb = sec.g(sol.sol(path.t[k])), sec.g(sol.sol(path.t[k + 1]))
        if ga * gb > 0:
            continue
        tc = brentq(lambda t: sec.g(sol.sol(t)), path.t[k], path.t[k + 1], xtol=1e-14, rtol=1e-14)
        out.append((sec.position(sol.sol(tc)), float(tc)))
        if len(out) == 4:
            break
    return out


def _stability(sec, s, period):
    a, b = sec.ret(s + SLOPE_STEP, period), sec.ret(s - SLOPE_STEP, period)
    if a is None or b is None:
        return None, None
    slope = (a[0] - b[0]) / (2 * SLOPE_STEP)
    if slope < 1 - NEUTRAL:
        return "stable", slope
    if slope > 1 + NEUTRAL:
        return "unstable", slope
    family = []
    for d in (FAMILY_PROBE, -FAMILY_PROBE):
        r = sec.ret(s + d, period)
        family.append(r is not None and abs(r[0] - (s + d)) < FAMILY_RESIDUAL)
    return ("neutral" if all(family) else "weak"), slope


def solve(sec, period, s0=0.0):
    """The periodic orbit through the section near s0: {period, stability, multiplier, point, extent} or None."""
    a = sec.ret(s0, period)
    if a is None:
        return None
    sa, Fa = s0, a[0] - s0
    best = (abs(Fa), s0, a)
    if abs(Fa) > FIXED_POINT:
        sb = a[0]
        for _ in range(SECANT_ITERATIONS):
            b = sec.ret(sb, period)
            if b is None:
                return None
            Fb = b[0] - sb
            if abs(Fb) < best[0]:
                best = (abs(Fb), sb, b)
            if abs(Fb) <= FIXED_POINT or Fb == Fa:
                break
            sa, Fa, sb = sb, Fb, sb - Fb * (sb - sa) / (Fb - Fa)
            if not math.isfinite(sb) or abs(sb) > R_LOCAL:
                return None
    residual, s, r = best
    if residual > 1e3 * FIXED_POINT:
        return None
    extent = r[2]
    size = [(e[1] - e[0]) / w for e, w in zip(extent, sec.j.w)]
    if max(size) < MIN_EXTENT:
        return None
    stability, slope = _stability(sec, s, r[1])
    return {
        "period": r[1],
        "stability": stability,
        "multiplier": slope,
        "point": [float(v) for v in sec.state(s)],
        "extent": extent,
        "residual": residual,
    }


NEAR_FOCUS = 0.05  # scaled: an end this near a stable equilibrium is no cycle of the quick test


def from_path(judge, path):
    """A cycle ({"kind": "cycle"...}) or a spiral onto a stable equilibrium ({"kind": "spiral", index}) or None."""
    if path.status != "horizon" or len(path.t) < 8:
        return None
    end = path.y[-1]
    sec = Section(judge, end)
    if not sec.ok:
        return None
    ret = _crossings(judge, sec, path)
    if len(ret) < 3:
        return None
    xs = [0.0] + [r[0] for r in ret]
    ts = [float(path.t[-1])] + [r[1] for r in ret]
    gaps = [abs(xs[k] - xs[k + 1]) for k in range(len(xs) - 1)][:3]
    period = ts[0] - ts[1]
    if max(gaps) < CLOSED:
        return _closed(judge, sec, period)
    if not (gaps[0] < gaps[1] < gaps[2]):
        return None
    spiral = _spiral(judge, sec, xs) if len(xs) >= 4 else None
    if spiral is not None:
        return {"kind": "spiral", "index": spiral}
    if not judge.precise:
        # a slow spiral into a stable focus also gives shrinking gaps: near one, leave it to a longer
        # horizon (the caller doubles it) to reach the focus
        if any(e["stable"] is True and judge._dist(end, e["point"]) < NEAR_FOCUS for e in judge.eq):
            return None
        # told apart only: gaps shrinking by a steady ratio towards a limit away from every equilibrium
        q = [gaps[0] / gaps[1], gaps[1] / gaps[2]]
        if max(q) < 1 and abs(q[0] - q[1]) < 0.5 * (1 - max(q)):
            return {"kind": "cycle", "stability": "stable", "period": period}
        return None
    orbit = solve(sec, period, 0.0)
    if orbit is None or orbit["stability"] not in ("stable", "weak"):
        return None
    return {"kind": "cycle", **orbit}


def _spiral(judge, sec, xs):
    """The equilibrium the returns close in on (distances shrinking by a steady ratio towards 0), or None.

    A stable one, or a weak focus the linearisation leaves open (borderline, centre) and whose trace
    is not positive beyond rounding, which the returns then show to attract slowly."""
    pts = [sec.state(x) for x in xs[:4]]
    for i, e in enumerate(judge.eq):
        if e["unstableBySign"] or not (e["stable"] is True or e["borderline"] or e["type"] == "center"):
            continue
        r = [judge._dist(z, e["point"]) for z in pts]
        if not (r[0] < r[1] < r[2] < r[3]):
            continue
        q = [r[0] / r[1], r[1] / r[2], r[2] / r[3]]
        # a steady contraction ratio, and towards 0: Aitken's extrapolation of the distances (exact
        # for a geometric sequence) must vanish, not settle at another point's distance from e
        den = r[0] - 2 * r[1] + r[2]
        limit = r[0] - (r[0] - r[1]) ** 2 / den if den != 0 else r[0]
        if max(q) < 1 and max(q) - min(q) < 0.5 * (1 - max(q)) and abs(limit) <= 0.25 * r[0]:
            return i
    return None


def _closed(judge, sec, period):
    if not judge.precise:
        # one return beside the closed orbit gives the multiplier; no family probe (a weak one is left undecided)
        r = sec.ret(SLOPE_STEP, period)
        if r is None:
            return None
        # returns all equal because the trajectory sits on an equilibrium are no orbit
        if max((e[1] - e[0]) / w for e, w in zip(r[2], judge.w)) < MIN_EXTENT:
            return None
        slope = r[0] / SLOPE_STEP
        stability = "stable" if slope < 1 - NEUTRAL else "unstable" if slope > 1 + NEUTRAL else "weak"
        return {"kind": "cycle", "stability": stability, "period": r[1]}
    orbit = solve(sec, period, 0.0)
    return None if orbit is None else {"kind": "cycle", **orbit}


def verify(judge, point, period):
    """keel's cycle checked: the periodic orbit through `point` (keel's section point), solved afresh."""
    sec = Section(judge, point)
    if not sec.ok:
        return None
    return solve(sec, period, 0.0)

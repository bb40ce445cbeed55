"""Outcome breaks along one parameter (part of the crosscheck reference; shares no code with keel).

The outcome at a parameter value is the set of attractors plus every scenario's fate, as keel's
design defines it (DESIGN.md, "outcome" and "break"): a stable equilibrium is named by the states
it keeps away from their lower bound and, among stable equilibria of the same pattern, by its place
in the order of the first state (only, lowest, highest, or k-th of n); a stable cycle counts as an
attractor when some scenario reaches it, or when a trajectory started next to an unstable focus or
node inside the region ends on it (a cycle around a source, found without any scenario). Two outcomes differ by a break when their equilibrium
attractors differ, when a scenario decided on both sides has different fates, or, with every
scenario decided on both sides, when one has a stable cycle and the other not. A fate undecided by
the horizon on one side is a limit of what was decided, never a break.

The range is sampled at SAMPLES + 1 evenly spaced values; each change between neighbours is
bisected on the outcome until the bracket is below LOCATE_TOL of the value (of a thousandth of the
range near zero), and the search goes on to the right of it for further changes in that interval.
"""

import numpy as np

from xc_equilibria import find_equilibria
from xc_flow import Judge

SAMPLES = 64
LOCATE_TOL = 1e-7
EVALUATION_BUDGET = 900
PRESENT = 1e-9  # of the window width: a state this near its lower bound is absent


class Study:
    def __init__(self, ctx, name, rng):
        self.ctx, self.name = ctx, name
        self.lo, self.hi = float(rng[0]), float(rng[1])
        self.cache = {}
        self.near = []  # (value, equilibrium points) evaluated so far, for extra starts

    def outcome(self, v):
        if v in self.cache:
            return self.cache[v]
        c = self.ctx
        values = dict(c.nominal)
        values[self.name] = v
        extra = []
        if self.near:
            nearest = min(self.near, key=lambda e: abs(e[0] - v))
            extra = nearest[1]
        eq = find_equilibria(c.eqs, values, c.window, c.bounds, c.region, extra)
        self.near.append((v, [e["point"] for e in eq]))
        judge = Judge(c.eqs, values, c.window, c.bounds, eq, precise=False)
        inside = judge.eq
        names = attractor_names(c, inside)
        fates = [judge.follow(sc["start"], sc["horizon"])[1] for sc in c.scenarios]
        keys = [fate_key(c, f, inside, names) for f in fates]
        searched = source_cycles(c, judge, inside)
        o = {
            "attractors": sorted(set(names.values())),
            "fates": keys,
            "cycle": any(f["kind"] == "cycle" and f["stability"] == "stable" for f in fates + searched),
            # a cycle whose multiplier is within NEUTRAL of 1 leaves the cycle's presence as an attractor open
            "decided": all(k is not None for k in keys)
            and not any(f["kind"] == "cycle" and f["stability"] != "stable" for f in fates + searched)
            and not any(f["kind"] == "undecided" for f in searched),
        }
        self.cache[v] = o
        return o

    def run(self):
        values = list(np.linspace(self.lo, self.hi, SAMPLES + 1))
        breaks, limits = [], []
        for a, b in zip(values[:-1], values[1:]):
            found, lim = self._interval(a, b)
            breaks += found
            limits += lim
            if len(self.cache) > EVALUATION_BUDGET:
                break
        return {
            "parameter": self.name,
            "range": [self.lo, self.hi],
            "breaks": breaks,
            "undecided": limits,
            "evaluations": len(self.cache),
            "budgetSpent": len(self.cache) > EVALUATION_BUDGET,
        }

    def _tol(self, a, b):
        return LOCATE_TOL * max(abs(a), abs(b), 1e-3 * (self.hi - self.lo))

    def _interval(self, a, b):
        found = []
        oa, ob = self.outcome(a), self.outcome(b)
        while change(oa, ob) != "same" and len(self.cache) <= EVALUATION_BUDGET:
            if change(oa, ob) != "break":
                return found, [[a, b]]  # a fate turns undecided in between: a limit, not a break
            lo, hi, olo, ohi = a, b, oa, ob
            resolved = True
            while hi - lo > self._tol(lo, hi):
                m = 0.5 * (lo + hi)
                om = self.outcome(m)
                if change(olo, om) == "break":
                    hi, ohi = m, om
                elif change(om, ohi) == "break":
                    lo, olo = m, om
                else:
                    resolved = False  # the middle is undecided against both sides
                    break
                if len(self.cache) > EVALUATION_BUDGET:
                    resolved = False
                    break
            found.append(
                {
                    "value": 0.5 * (lo + hi),
                    "bracket": [lo, hi],
                    "resolved": resolved,
                    "cause": cause(olo, ohi),
                    "below": describe(olo),
                    "above": describe(ohi),
                }
            )
            if hi >= b:
                break
            a, oa = hi, ohi
        return found, []


SOURCE_OFFSET = 1e-3  # of the window width: the start next to a source


def source_cycles(ctx, judge, inside):
    """Fates of trajectories started next to each unstable focus or node off the state bounds: a
    bounded one that ends on no equilibrium ends on a cycle around the source (Poincare-Bendixson;
    Strogatz, Nonlinear Dynamics and Chaos, 2nd ed., 7.3)."""
    horizon = max([sc["horizon"] for sc in ctx.scenarios] or [100.0])
    out = []
    for e in inside:
        if e["type"] not in ("unstable-focus", "unstable-node") or e["borderline"]:
            continue
        p = np.asarray(e["point"], float)
        if len(present(ctx, p)) < 2:
            continue
        start = [float(p[0] + SOURCE_OFFSET * ctx.width[0]), float(p[1])]
        out.append(judge.follow(start, horizon)[1])
    return out


def describe(o):
    return {"attractors": o["attractors"], "fates": o["fates"], "cycle": o["cycle"]}


def change(a, b):
    if a["attractors"] != b["attractors"]:
        return "break"
    for f, g in zip(a["fates"], b["fates"]):
        if f is not None and g is not None and f != g:
            return "break"
    if a["decided"] and b["decided"] and a["cycle"] != b["cycle"]:
        return "break"
    return "same" if a["fates"] == b["fates"] and a["cycle"] == b["cycle"] else "undecided"


def cause(a, b):
    if a["attractors"] != b["attractors"]:
        return "attractors"
    if any(f is not None and g is not None and f != g for f, g in zip(a["fates"], b["fates"])):
        return "fates"
    return "cycle"


def present(ctx, point):
    return [ctx.states[k] for k in (0, 1) if abs(point[k] - ctx.bounds[k][0]) > PRESENT * ctx.width[k]]


def attractor_names(ctx, eq):
    """Stable equilibria (by index into eq) named by presence pattern and place by the first state."""
    groups = {}
    for i, e in enumerate(eq):
        if e["stableBySign"]:
            groups.setdefault(",".join(present(ctx, e["point"])), []).append(i)
    names = {}
    for pattern, members in groups.items():
        members.sort(key=lambda i: eq[i]["point"][0])
        n = len(members)
        for k, i in enumerate(members):
            place = "only" if n == 1 else "lowest" if k == 0 else "highest" if k == n - 1 else f"{k + 1}/{n}"
            names[i] = f"equilibrium({pattern}){place}"
    return names


def fate_key(ctx, fate, eq, names):
    kind = fate["kind"]
    if kind == "equilibrium":
        i = fate["index"]
        if i in names:
            return "attractor " + names[i]
        return f"equilibrium {eq[i]['type']}({','.join(present(ctx, eq[i]['point']))})"
    if kind == "cycle":
        return "cycle"  # reached, so attracting from the start's side (or one of a family)
    if kind in ("left-window", "blow-up"):
        # a blow-up here always follows an exit (xc_flow.py): whether it comes before the horizon
        # is the horizon's doing, so the outcome is the exit, as the design's outcome counts it
        return f"left-window {ctx.states[fate['state']]}"
    return None

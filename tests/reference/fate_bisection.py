"""Independent reference for outcome breaks: where a trajectory's fate changes as one parameter varies.

Shares no code with keel. Reads one JSON object on stdin:
  states      [name, name]
  rhs         [expr, expr]  the right-hand side in Python syntax, typed out by the test
  parameters  {name: value} every parameter's value; `parameter` is the one varied
  parameter   name
  start       [x0, y0]
  horizon     integration time (long, so every fate is decided)
  attractors  [{"name": str, "point": [x, y]}]: a fate is the attractor the trajectory comes within
              `arrival` of (Euclidean, in state units; integration stops there), else "undecided"
  arrival     that distance
  mode        "bisect": bracket [lo, hi] whose ends have different decided fates; bisection on the
              fate until the bracket is narrower than `tol` times its magnitude
              "fates": the fate at each of `values`
Integration: scipy's DOP853 (Dormand and Prince's 8(5,3) pair), rtol 1e-10, atol 1e-12.
Prints {"value", "bracket", "left", "right", "evaluations"} or {"fates"}.
"""

import json
import math
import sys

import numpy as np
from scipy.integrate import solve_ivp

RTOL = 1e-10
ATOL = 1e-12


def make_rhs(spec, value):
    names = dict(spec["parameters"])
    names[spec["parameter"]] = value
    s0, s1 = spec["states"]
    # one compiled function, the parameters as its globals: Python's own parser reads the expressions
    source = f"def rhs(_t, z):\n    {s0}, {s1} = z\n    return [{spec['rhs'][0]}, {spec['rhs'][1]}]\n"
    env = {"__builtins__": {}, "exp": math.exp, "sqrt": math.sqrt, "log": math.log, **names}
    exec(compile(source, "<rhs>", "exec"), env)
    return env["rhs"]


def arrival_events(spec):
    """A terminal event per attractor: the trajectory came within `arrival` of it."""
    events = []
    for a in spec["attractors"]:
        px, py = a["point"]

        def event(_t, z, px=px, py=py):
            return math.hypot(z[0] - px, z[1] - py) - spec["arrival"]

        event.terminal = True
        events.append(event)
    return events


def fate(spec, value):
    sol = solve_ivp(
        make_rhs(spec, value),
        (0.0, spec["horizon"]),
        spec["start"],
        method="DOP853",
        rtol=RTOL,
        atol=ATOL,
        events=arrival_events(spec),
    )
    end = sol.y[:, -1]
    best, name = math.inf, "undecided"
    for a in spec["attractors"]:
        d = float(np.hypot(end[0] - a["point"][0], end[1] - a["point"][1]))
        if d < best:
            best, name = d, a["name"]
    # the terminal event stops exactly at `arrival`: allow rounding there
    return name if best <= spec["arrival"] * (1 + 1e-9) else "undecided"


def bisect(spec):
    lo, hi = spec["bracket"]
    left, right = fate(spec, lo), fate(spec, hi)
    if left == right or "undecided" in (left, right):
        raise SystemExit(f"bracket ends must have different decided fates: {left}, {right}")
    evaluations = 2
    while hi - lo > spec["tol"] * max(abs(lo), abs(hi)):
        mid = 0.5 * (lo + hi)
        f = fate(spec, mid)
        evaluations += 1
        if f == left:
            lo = mid
        elif f == right:
            hi = mid
        else:
            raise SystemExit(f"a third fate inside the bracket at {mid}: {f}")
    return {"value": 0.5 * (lo + hi), "bracket": [lo, hi], "left": left, "right": right, "evaluations": evaluations}


def main():
    spec = json.load(sys.stdin)
    if spec["mode"] == "bisect":
        out = bisect(spec)
    else:
        out = {"fates": [fate(spec, v) for v in spec["values"]]}
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()

"""Independent reference for basin maps: where sampled starts go, judged against nested boxes.

Shares no code with keel. Reads one JSON object on stdin:
  states      [name, name]
  rhs         [expr, expr]  the right-hand side in Python syntax, typed out by the test
  parameters  {name: value}
  boxes       [[[lo, hi], [lo, hi]], ...] nested boxes, innermost first (say the window, then the
              feasible region); the first exit from each is recorded, and integration stops at
              the exit from the last
  starts      [[x0, y0], ...]
  horizon     integration time, in stretches of `chunk` (a start that has settled stops early)
  maxStep     longest step: box edges are events found by sign changes between steps (on the
              dense output), so an excursion past an edge shorter than maxStep could be missed
  section     {"center": [cx, cy], "sense": +1 | -1}: the ray {y = cy, x > cx}, crossed with y
              increasing (+1) or decreasing (-1)
  settle      {"crossings": k, "tol": d}: a start that stays in the last box settles on a periodic
              orbit when its last k section crossings agree to within d (state units)
Integration: scipy's DOP853 (Dormand and Prince's 8(5,3) pair; Hairer, Norsett & Wanner, Solving
ODEs I, 2nd ed., II.5), rtol 1e-10, atol 1e-12 of each box width, events on the dense output.
Prints {"fates": [{"exits": [null | {"t", "state", "bound"}, ...], "settled": bool,
"crossing": x | null}]}: exits per box, and for a start that stayed in the last box, whether it
settled and where its last crossing lies.
"""

import json
import math
import sys
from multiprocessing import Pool

from scipy.integrate import solve_ivp

RTOL = 1e-10
ATOL_OF_WIDTH = 1e-12


def make_rhs(spec):
    s0, s1 = spec["states"]
    # one compiled function, the parameters as its globals: Python's own parser reads the expressions
    source = f"def rhs(_t, z):\n    {s0}, {s1} = z\n    return [{spec['rhs'][0]}, {spec['rhs'][1]}]\n"
    env = {"__builtins__": {}, "exp": math.exp, "sqrt": math.sqrt, "log": math.log, **spec["parameters"]}
    exec(compile(source, "<rhs>", "exec"), env)
    return env["rhs"]


def edge_events(box, terminal):
    """One event per side of the box, firing when the state leaves through it."""
    events = []
    for i in range(2):
        for bound, value in (("min", box[i][0]), ("max", box[i][1])):
            sign = 1.0 if bound == "min" else -1.0

            def event(_t, z, i=i, value=value, sign=sign):
                return sign * (z[i] - value)

            event.terminal = terminal
            event.direction = -1.0
            event.where = (i, bound)
            events.append(event)
    return events


def fate(spec, rhs, start):
    boxes = spec["boxes"]
    per_box = [edge_events(box, k == len(boxes) - 1) for k, box in enumerate(boxes)]
    cx, cy = spec["section"]["center"]

    def crossing(_t, z):
        return z[1] - cy

    crossing.direction = float(spec["section"]["sense"])
    events = [e for group in per_box for e in group] + [crossing]
    outer = boxes[-1]
    atol = [ATOL_OF_WIDTH * (outer[i][1] - outer[i][0]) for i in range(2)]
    exits = [None] * len(boxes)
    xs = []
    k = spec["settle"]["crossings"]
    t0, z0 = 0.0, list(start)
    # in stretches of `chunk`, so a start that has settled stops early (the events carry over)
    while t0 < spec["horizon"]:
        t1 = min(spec["horizon"], t0 + spec["chunk"])
        sol = solve_ivp(rhs, (t0, t1), z0, method="DOP853", rtol=RTOL, atol=atol, max_step=spec["maxStep"], events=events)
        at = 0
        for b, group in enumerate(per_box):
            for e in group:
                times = sol.t_events[at]
                at += 1
                if len(times) and (exits[b] is None or times[0] < exits[b]["t"]):
                    exits[b] = {"t": float(times[0]), "state": spec["states"][e.where[0]], "bound": e.where[1]}
        xs += [float(y[0]) for y in sol.y_events[-1] if y[0] > cx]
        if exits[-1] is not None or not sol.success:
            break
        if len(xs) >= k and max(xs[-k:]) - min(xs[-k:]) < spec["settle"]["tol"]:
            break
        t0, z0 = float(sol.t[-1]), list(sol.y[:, -1])
    settled = exits[-1] is None and len(xs) >= k and max(xs[-k:]) - min(xs[-k:]) < spec["settle"]["tol"]
    return {"exits": exits, "settled": settled, "crossing": xs[-1] if xs else None}


def _one(args):
    spec, start = args
    return fate(spec, make_rhs(spec), list(start))


def main():
    spec = json.load(sys.stdin)
    # starts are independent: two processes, results in input order
    with Pool(2) as pool:
        fates = pool.map(_one, [(spec, s) for s in spec["starts"]], chunksize=8)
    print(json.dumps({"fates": fates}))


if __name__ == "__main__":
    main()

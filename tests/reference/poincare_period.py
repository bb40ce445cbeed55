"""Independent reference for a limit cycle's period: successive crossings of a Poincare section.

Shares no code with keel. Reads one JSON object on stdin:
  rhs        [expr, expr]  the right-hand side in Python syntax over x, y and the parameters,
             typed out by the test
  parameters {name: value}
  start      [x0, y0]      a point whose trajectory tends to the cycle
  section    [xc, yc]      the section is the ray {y = yc, x > xc}, crossed with y increasing
  transient  time integrated first, so the orbit has settled on the cycle
  span       time after the transient over which the crossings are measured
Integration: scipy's DOP853 (Dormand and Prince's 8(5,3) pair), rtol 1e-12, atol 1e-14; each
crossing is located by solve_ivp's event root finder on the dense output.
Prints {"periods": [...], "points": [...]} (time between consecutive crossings, crossing x).
"""

import json
import math
import sys

from scipy.integrate import solve_ivp

RTOL = 1e-12
ATOL = 1e-14


def main():
    job = json.load(sys.stdin)
    env = {"__builtins__": {}, "exp": math.exp, "log": math.log, "sqrt": math.sqrt}
    env.update(job["parameters"])
    fx, fy = (compile(e, "<rhs>", "eval") for e in job["rhs"])

    def f(_t, u):
        env["x"], env["y"] = u
        return [eval(fx, env), eval(fy, env)]

    xc, yc = job["section"]

    def crossing(_t, u):
        return u[1] - yc

    crossing.direction = 1
    run = solve_ivp(f, (0, job["transient"] + job["span"]), job["start"], method="DOP853",
                    rtol=RTOL, atol=ATOL, events=crossing)
    hits = [(t, p[0]) for t, p in zip(run.t_events[0], run.y_events[0]) if p[0] > xc and t > job["transient"]]
    times = [t for t, _ in hits]
    points = [x for _, x in hits]
    periods = [b - a for a, b in zip(times, times[1:])]
    json.dump({"periods": periods, "points": points[1:]}, sys.stdout)


if __name__ == "__main__":
    main()

"""Reference for the ratio-dependent predator-prey model (tests/analysis/flow/singular-fate.test.ts):
x' = x (1 - x) - a x y / (x + y),  y' = y (-d + b x / (x + y)), whose field is 0/0 at the origin.

Reads {"a", "b", "d", "starts": [[x, y], ...], "horizon"} on stdin; for each start, integrates with
scipy's LSODA (rtol 1e-10, atol 1e-13) until x + y falls below REACHED (a terminal event) or the
horizon, and prints [{"reached": bool, "t": time}, ...]. Shares no code with keel.
"""

import json
import sys

from scipy.integrate import solve_ivp

REACHED = 1e-7


def main():
    data = json.load(sys.stdin)
    a, b, d = data["a"], data["b"], data["d"]

    def f(_t, z):
        x, y = z
        s = x + y
        return [x * (1 - x) - a * x * y / s, y * (-d + b * x / s)]

    def origin(_t, z):
        return z[0] + z[1] - REACHED

    origin.terminal = True
    out = []
    for start in data["starts"]:
        sol = solve_ivp(f, (0.0, data["horizon"]), start, method="LSODA", rtol=1e-10, atol=1e-13, events=origin)
        out.append({"reached": sol.status == 1, "t": float(sol.t[-1])})
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()

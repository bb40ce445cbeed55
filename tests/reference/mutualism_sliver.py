"""Reference for tests/analysis/basins-sliver.test.ts: the share of the window [0, P1] x [0, A1] in
the basin of the origin for the obligate mutualism
  P' = P (bP A / (1 + A) - dP - cP P),  A' = A (bA P / (1 + P) - dA - cA A).
That basin is bounded by the axes and the saddle's stable manifold, a sliver along both axes; its
area is the shoelace (Green's theorem) area of the polygon the axes, the window edges and the
manifold bound, the manifold integrated backward from the saddle along its stable eigenvector
(scipy DOP853, rtol 1e-12). Shares no code with keel.

Reads {"p": {...}, "saddle": [P, A], "window": [P1, A1]} on stdin; prints {"share": s}.
"""

import json
import sys

import numpy as np
from scipy.integrate import solve_ivp


def main():
    d = json.load(sys.stdin)
    p = d["p"]
    P1, A1 = d["window"]
    s0 = np.array(d["saddle"], float)

    def f(_t, z):
        P, A = z
        return [P * (p["bP"] * A / (1 + A) - p["dP"] - p["cP"] * P), A * (p["bA"] * P / (1 + P) - p["dA"] - p["cA"] * A)]

    def back(t, z):
        return [-v for v in f(t, z)]

    P, A = s0
    J = np.array(
        [
            [p["bP"] * A / (1 + A) - p["dP"] - 2 * p["cP"] * P, P * p["bP"] / (1 + A) ** 2],
            [A * p["bA"] / (1 + P) ** 2, p["bA"] * P / (1 + P) - p["dA"] - 2 * p["cA"] * A],
        ]
    )
    w, V = np.linalg.eig(J)
    v = V[:, np.argmin(w)]
    v = v / np.hypot(*v) * (1 if v[0] > 0 else -1)

    def branch(sign, stop):
        ev = lambda t, z: stop(z)
        ev.terminal = True
        sol = solve_ivp(back, (0, 1e5), s0 + sign * 1e-9 * v, method="DOP853", rtol=1e-12, atol=1e-15, events=ev, max_step=0.05)
        return sol.y.T

    to_edge = branch(1, lambda z: z[0] - P1)  # towards large P along the A axis' side
    to_top = branch(-1, lambda z: z[1] - A1)
    poly = [(0.0, 0.0), (P1, 0.0)] + [tuple(q) for q in to_edge[::-1]] + [tuple(q) for q in to_top] + [(0.0, A1)]
    x = np.array([q[0] for q in poly])
    y = np.array([q[1] for q in poly])
    area = 0.5 * abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))
    json.dump({"share": area / (P1 * A1)}, sys.stdout)


if __name__ == "__main__":
    main()

"""Independent reference for the stiff van der Pol oscillator: scipy's Radau IIA (order 5).

Shares no code with keel. Reads one JSON object on stdin:
  mu      the stiffness parameter of y1' = y2, y2' = mu (1 - y1^2) y2 - y1
  start   [y1, y2] at t = 0
  times   ascending output times
  rtol    relative tolerance; atol is rtol times 1e-2 (y1 is of order 2, y2 reaches mu-sized jumps)
Radau IIA is the implicit method of Hairer and Wanner, Solving ODEs II, 2nd ed., IV.8 (scipy's
Radau), given the exact Jacobian. Prints {"y": [[y1, y2], ...], "crossings": [...],
"evaluations": n}: the solution at each time, the times where y1 crosses 0 downwards (event root
finder on the dense output) and the number of right-hand side evaluations.
"""

import json
import sys

from scipy.integrate import solve_ivp


def main():
    job = json.load(sys.stdin)
    mu = float(job["mu"])
    times = [float(t) for t in job["times"]]
    rtol = float(job["rtol"])

    def rhs(_t, y):
        return [y[1], mu * (1 - y[0] ** 2) * y[1] - y[0]]

    def jac(_t, y):
        return [[0.0, 1.0], [-2 * mu * y[0] * y[1] - 1, mu * (1 - y[0] ** 2)]]

    def down(_t, y):
        return y[0]

    down.direction = -1
    sol = solve_ivp(
        rhs, (0.0, times[-1]), job["start"], method="Radau", jac=jac,
        rtol=rtol, atol=rtol * 1e-2, t_eval=times, events=down,
    )
    if sol.status != 0:
        raise SystemExit(f"Radau failed: {sol.message}")
    print(json.dumps({
        "y": [[float(a), float(b)] for a, b in zip(sol.y[0], sol.y[1])],
        "crossings": [float(t) for t in sol.t_events[0]],
        "evaluations": int(sol.nfev),
    }))


main()

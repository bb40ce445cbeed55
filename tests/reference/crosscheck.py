"""Independent reference for the differential crosscheck (tests/crosscheck/): shares no code with keel.

Reads on stdin one keel spec, a list of specs, or a list of {"spec": ..., "cycles": [...]} items
(cycles: keel's periodic orbits to verify, each {"id", "point": [x, y], "period"}), and prints
a JSON list with, for each spec:

  equilibria   every equilibrium in the window and the feasible region beyond it ("region", the
               span of both; xc_equilibria.py): point, type, borderline flag, stable flag,
               eigenvalues, whether it sits within 1e-6 of the region's edge
  scenarios    each scenario's fate against the window (the region keel's fates refer to) and
               against the feasible region (states' min/max), xc_flow.py; a cycle fate carries the
               orbit's period, stability and multiplier (xc_cycles.py)
  cycles       keel's cycles, each solved afresh from keel's section point: found or not, period,
               stability
  studies      for each studied parameter (spec.analysis.parameters, default every ranged one),
               the outcome breaks (xc_breaks.py)
  seconds      time taken

Run: python3 tests/reference/crosscheck.py [--no-studies] < specs.json
"""

import json
import math
import sys
import time
import traceback

import numpy as np

import xc_breaks
import xc_cycles
from xc_equilibria import find_equilibria
from xc_expr import Equations
from xc_flow import Judge


class Context:
    def __init__(self, spec):
        self.spec = spec
        self.eqs = Equations(spec)
        self.states = self.eqs.states
        self.nominal = dict(self.eqs.nominal)
        win = spec.get("window") or {}
        self.bounds = [[float(s["min"]), float(s["max"])] for s in spec["states"]]
        self.window = [[float(v) for v in win.get(n, b)] for n, b in zip(self.states, self.bounds)]
        self.width = [w[1] - w[0] for w in self.window]
        # keel follows trajectories in the feasible region and searches equilibria there and in
        # the window: the region both span
        self.region = [[min(w[0], b[0]), max(w[1], b[1])] for w, b in zip(self.window, self.bounds)]
        self.scenarios = [
            {"name": sc["name"], "start": [float(sc["initial"][n]) for n in self.states], "horizon": float(sc["horizon"])}
            for sc in spec.get("scenarios", [])
        ]
        ranged = [p["name"] for p in spec.get("parameters", []) if p.get("range")]
        self.studied = (spec.get("analysis") or {}).get("parameters", ranged)
        self.ranges = {p["name"]: p["range"] for p in spec.get("parameters", []) if p.get("range")}


def _fate_out(ctx, fate):
    out = {k: v for k, v in fate.items() if k not in ("index", "state")}
    if "state" in fate:
        out["state"] = ctx.states[fate["state"]]
    return out


def _clean(x):
    """NaN and infinities have no JSON form: null."""
    if isinstance(x, float):
        return x if math.isfinite(x) else None
    if isinstance(x, dict):
        return {k: _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, np.generic):
        return _clean(x.item())
    return x


def analyse(item, studies=True):
    spec = item.get("spec", item)
    t0 = time.time()
    ctx = Context(spec)
    eq = find_equilibria(ctx.eqs, ctx.nominal, ctx.window, ctx.bounds, ctx.region)
    judge = Judge(ctx.eqs, ctx.nominal, ctx.window, ctx.bounds, eq)
    scenarios = []
    for sc in ctx.scenarios:
        window, feasible, path = judge.follow(sc["start"], sc["horizon"])
        end = path.y[-1].tolist()
        scenarios.append(
            {
                "name": sc["name"],
                "fate": _fate_out(ctx, window),
                "feasibleFate": _fate_out(ctx, feasible),
                "end": end,
                "tEnd": float(path.t[-1]),
                "steps": int(len(path.t) - 1),
            }
        )
    cycles = []
    for c in item.get("cycles", []):
        orbit = xc_cycles.verify(judge, c["point"], c["period"])
        cycles.append({"id": c["id"], "found": orbit is not None, **(orbit or {})})
    out_studies = []
    if studies:
        for name in ctx.studied:
            out_studies.append(xc_breaks.Study(ctx, name, ctx.ranges[name]).run())
    return {
        "id": spec["id"],
        "ok": True,
        "states": ctx.states,
        "window": ctx.window,
        "bounds": ctx.bounds,
        "region": ctx.region,
        "equilibria": [e for e in eq],
        "scenarios": scenarios,
        "cycles": cycles,
        "studies": out_studies,
        "seconds": time.time() - t0,
    }


def main():
    data = json.load(sys.stdin)
    items = data if isinstance(data, list) else [data]
    studies = "--no-studies" not in sys.argv
    out = []
    for item in items:
        spec = item.get("spec", item)
        try:
            out.append(analyse(item, studies))
        except Exception as err:  # a reference failure is reported, not hidden: the comparison counts it
            out.append({"id": spec.get("id"), "ok": False, "error": f"{type(err).__name__}: {err}", "trace": traceback.format_exc()})
    json.dump(_clean(out), sys.stdout)


if __name__ == "__main__":
    main()

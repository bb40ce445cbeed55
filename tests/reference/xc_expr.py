"""Equations of a keel spec, read independently of keel (part of the crosscheck reference).

The infix text is parsed by Python's own parser after `^` becomes `**` (both bind tighter than
unary minus and group to the right, as in ordinary maths), then walked: only numbers, the declared
names, + - * / **, unary signs and calls of the functions keel accepts (src/spec/names.ts:
exp log sqrt abs min max sin cos tan tanh pow) are let through. Three evaluators come out:

  scalar(p)   f(z) -> [f0, f1] with plain floats (the integrators' right-hand side);
  vector(p)   the same on numpy arrays (grids);
  jacobian(p) J(z) by forward-mode automatic differentiation (dual numbers: exact to rounding,
              so a zero trace of a centre comes out as a rounding-level number, not a
              finite-difference error).

Non-real results (log of a negative number, 0/0, overflow) become NaN, as in IEEE arithmetic.
"""

import ast
import math

import numpy as np

FUNCTIONS = ("exp", "log", "sqrt", "abs", "min", "max", "sin", "cos", "tan", "tanh", "pow")
NAN = float("nan")


class SpecError(Exception):
    pass


class _Rewrite(ast.NodeTransformer):
    """Whitelist, rename names to internal slots, turn constants into floats and general powers into calls."""

    def __init__(self, slots):
        self.slots = slots

    def generic_visit(self, node):
        allowed = (ast.Expression, ast.BinOp, ast.UnaryOp, ast.Call, ast.Name, ast.Constant, ast.Load)
        allowed += (ast.Add, ast.Sub, ast.Mult, ast.Div, ast.Pow, ast.USub, ast.UAdd)
        if not isinstance(node, allowed):
            raise SpecError(f"not accepted: {type(node).__name__}")
        return super().generic_visit(node)

    def visit_Constant(self, node):
        if isinstance(node.value, bool) or not isinstance(node.value, (int, float)):
            raise SpecError(f"not a number: {node.value!r}")
        return ast.copy_location(ast.Constant(float(node.value)), node)

    def visit_Name(self, node):
        if node.id not in self.slots:
            raise SpecError(f"unknown name {node.id}")
        return ast.copy_location(ast.Name(self.slots[node.id], ast.Load()), node)

    def visit_Call(self, node):
        if not isinstance(node.func, ast.Name) or node.func.id not in FUNCTIONS or node.keywords:
            raise SpecError("only the accepted functions may be called")
        args = [self.visit(a) for a in node.args]
        return ast.copy_location(ast.Call(ast.Name("_" + node.func.id, ast.Load()), args, []), node)

    def visit_BinOp(self, node):
        node = self.generic_visit(node)
        if isinstance(node.op, ast.Pow):
            e = node.right
            integral = isinstance(e, ast.Constant) and float(e.value).is_integer() and abs(e.value) <= 64
            if not integral:  # a real power of a negative number is NaN, not complex
                return ast.copy_location(ast.Call(ast.Name("_pow", ast.Load()), [node.left, e], []), node)
        return node


def _parse(text, slots):
    tree = ast.parse(text.replace("^", "**"), mode="eval")
    return ast.fix_missing_locations(_Rewrite(slots).visit(tree))


# ── plain floats ──────────────────────────────────────────────────────────────────────────────


def _guard(fn):
    def call(*a):
        try:
            return fn(*a)
        except (ValueError, OverflowError, ZeroDivisionError):
            return NAN

    return call


def _fpow(a, b):
    try:
        r = a**b
    except (ZeroDivisionError, OverflowError):
        return NAN
    return r if isinstance(r, float) else NAN


SCALAR_NS = {
    "_exp": _guard(math.exp),
    "_log": _guard(math.log),
    "_sqrt": _guard(math.sqrt),
    "_abs": abs,
    "_min": min,
    "_max": max,
    "_sin": math.sin,
    "_cos": math.cos,
    "_tan": math.tan,
    "_tanh": math.tanh,
    "_pow": _fpow,
}

# ── numpy arrays ──────────────────────────────────────────────────────────────────────────────


def _vpow(a, b):
    with np.errstate(all="ignore"):
        return np.power(np.asarray(a, float), b)


VECTOR_NS = {
    "_exp": np.exp,
    "_log": np.log,
    "_sqrt": np.sqrt,
    "_abs": np.abs,
    "_min": lambda *a: np.minimum.reduce(np.broadcast_arrays(*a)),
    "_max": lambda *a: np.maximum.reduce(np.broadcast_arrays(*a)),
    "_sin": np.sin,
    "_cos": np.cos,
    "_tan": np.tan,
    "_tanh": np.tanh,
    "_pow": _vpow,
}

# ── dual numbers (value and gradient with respect to the two states) ──────────────────────────


class Dual:
    __slots__ = ("v", "d")

    def __init__(self, v, d=(0.0, 0.0)):
        self.v, self.d = v, d

    @staticmethod
    def lift(x):
        return x if isinstance(x, Dual) else Dual(float(x))

    def __add__(self, o):
        o = Dual.lift(o)
        return Dual(self.v + o.v, (self.d[0] + o.d[0], self.d[1] + o.d[1]))

    __radd__ = __add__

    def __sub__(self, o):
        o = Dual.lift(o)
        return Dual(self.v - o.v, (self.d[0] - o.d[0], self.d[1] - o.d[1]))

    def __rsub__(self, o):
        return Dual.lift(o) - self

    def __mul__(self, o):
        o = Dual.lift(o)
        return Dual(self.v * o.v, (self.d[0] * o.v + self.v * o.d[0], self.d[1] * o.v + self.v * o.d[1]))

    __rmul__ = __mul__

    def __truediv__(self, o):
        o = Dual.lift(o)
        if o.v == 0:
            return Dual(NAN, (NAN, NAN))
        q = self.v / o.v
        return Dual(q, ((self.d[0] - q * o.d[0]) / o.v, (self.d[1] - q * o.d[1]) / o.v))

    def __rtruediv__(self, o):
        return Dual.lift(o) / self

    def __neg__(self):
        return Dual(-self.v, (-self.d[0], -self.d[1]))

    def __pos__(self):
        return self

    def __pow__(self, o):
        if isinstance(o, Dual):
            return _dexp(o * _dlog(self))
        n = float(o)
        if n == 0:
            return Dual(1.0)
        try:
            v = self.v**n
            g = n * self.v ** (n - 1) if n != 1 else 1.0
        except (ZeroDivisionError, OverflowError):
            return Dual(NAN, (NAN, NAN))
        if isinstance(v, complex) or isinstance(g, complex):
            return Dual(NAN, (NAN, NAN))
        return Dual(v, (g * self.d[0], g * self.d[1]))

    def __rpow__(self, o):
        return _dexp(self * math.log(o)) if o > 0 else Dual(NAN, (NAN, NAN))


def _chain(f, df):
    def call(x):
        if not isinstance(x, Dual):
            return _guard(f)(x)
        try:
            v, g = f(x.v), df(x.v)
        except (ValueError, OverflowError, ZeroDivisionError):
            return Dual(NAN, (NAN, NAN))
        return Dual(v, (g * x.d[0], g * x.d[1]))

    return call


_dexp = _chain(math.exp, math.exp)
_dlog = _chain(math.log, lambda v: 1.0 / v)


def _dpick(pick):
    def call(*a):
        vals = [x.v if isinstance(x, Dual) else x for x in a]
        return a[vals.index(pick(vals))]

    return call


def _dpow(a, b):
    if isinstance(b, Dual) or isinstance(a, Dual):
        return Dual.lift(a) ** b
    return _fpow(a, b)


DUAL_NS = {
    "_exp": _dexp,
    "_log": _dlog,
    "_sqrt": _chain(math.sqrt, lambda v: 0.5 / math.sqrt(v)),
    "_abs": _chain(abs, lambda v: 1.0 if v > 0 else -1.0 if v < 0 else 0.0),
    "_min": _dpick(min),
    "_max": _dpick(max),
    "_sin": _chain(math.sin, math.cos),
    "_cos": _chain(math.cos, lambda v: -math.sin(v)),
    "_tan": _chain(math.tan, lambda v: 1.0 / math.cos(v) ** 2),
    "_tanh": _chain(math.tanh, lambda v: 1.0 - math.tanh(v) ** 2),
    "_pow": _dpow,
}


class Equations:
    """The spec's right-hand side, with parameter values bound at each call of a builder."""

    def __init__(self, spec):
        self.states = [s["name"] for s in spec["states"]]
        self.parameters = [p["name"] for p in spec.get("parameters", [])]
        self.nominal = {p["name"]: float(p["value"]) for p in spec.get("parameters", [])}
        slots = {n: f"_s{i}" for i, n in enumerate(self.states)}
        slots.update({n: f"_p{i}" for i, n in enumerate(self.parameters)})
        self.trees = [_parse(spec["equations"][n], slots) for n in self.states]
        self.code = [compile(t, f"<{n}>", "eval") for t, n in zip(self.trees, self.states)]

    def _env(self, ns, values):
        env = dict(ns)
        env["__builtins__"] = {}
        for i, n in enumerate(self.parameters):
            env[f"_p{i}"] = float(values.get(n, self.nominal[n]))
        return env

    def scalar(self, values):
        """f(t, z) as a list of two floats; NaN where the expression is not real."""
        env = self._env(SCALAR_NS, values)
        env["NAN"], env["_float"] = NAN, float
        u0, u1 = (ast.unparse(t.body) for t in self.trees)
        # one compiled function with the states as locals: the integrators call it millions of times
        src = (
            "def rhs(_t, z):\n"
            "    _s0 = _float(z[0]); _s1 = _float(z[1])\n"
            "    try:\n"
            f"        return [{u0}, {u1}]\n"
            "    except (ValueError, OverflowError, ZeroDivisionError):\n"
            "        return [NAN, NAN]\n"
        )
        exec(compile(src, "<rhs>", "exec"), env)
        return env["rhs"]

    def vector(self, values):
        env = self._env(VECTOR_NS, values)
        c0, c1 = self.code

        def rhs(x, y):
            env["_s0"], env["_s1"] = x, y
            with np.errstate(all="ignore"):
                f0 = np.broadcast_to(np.asarray(eval(c0, env), float), np.shape(x))
                f1 = np.broadcast_to(np.asarray(eval(c1, env), float), np.shape(x))
            return f0, f1

        return rhs

    def jacobian(self, values):
        env = self._env(DUAL_NS, values)
        c0, c1 = self.code

        def jac(z):
            env["_s0"], env["_s1"] = Dual(float(z[0]), (1.0, 0.0)), Dual(float(z[1]), (0.0, 1.0))
            rows = []
            for c in (c0, c1):
                try:
                    r = eval(c, env)
                except (ValueError, OverflowError, ZeroDivisionError):
                    r = Dual(NAN, (NAN, NAN))
                rows.append(list(r.d) if isinstance(r, Dual) else [0.0, 0.0])
            return np.array(rows)

        return jac

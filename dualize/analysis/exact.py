"""Exact rational arithmetic for decisions on an instance.

A claim such as "x = 1 is feasible" must hold for the instance as written, not
within a solver's tolerance: an instance infeasible by 1e-8 has no feasible
point, whatever a floating-point solver accepts.  The instance's decimals are
read as exact fractions (``numeric.instance``); here the IR is evaluated on
them with :class:`fractions.Fraction` entries (numpy object arrays), for the
operations that stay rational: sums, products, transposes, integer powers,
divisions, max/min, absolute values and the 1- and inf-norms.  Anything else
(exp, log, square roots, inverses) raises :class:`NotExact`, and the caller
then states no certificate that rests on it.

:func:`exact_affine_point` turns a floating-point point of a set of affine
constraints into an exact one: the point's entries are read as exact binary
fractions, the constraints active at it are solved exactly for a correction
(Gaussian elimination over the rationals), and every constraint is checked at
the result with no tolerance.  It is limited to :data:`MAX_ENTRIES` unknowns,
beyond which exact elimination would cost more than the rest of a run.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from fractions import Fraction
from typing import Any

import numpy as np
import sympy

from dualize.model import expr as ir

MAX_ENTRIES = 120
ACTIVE = Fraction(1, 10**7)  # relative closeness at which an inequality counts as active


class NotExact(Exception):  # noqa: N818 - a reason, not a failure of the program
    """The expression leaves the rationals (exp, log, sqrt, an inverse, a 2-norm)."""


def fractions_of(value: Any) -> np.ndarray:
    """Any number or nested list (floats read as their exact binary value) as an object
    array of Fractions."""
    arr = np.asarray(value, dtype=object)
    flat = [v if isinstance(v, Fraction) else Fraction(v) for v in arr.reshape(-1)]
    out = np.empty(len(flat), dtype=object)
    out[:] = flat
    return out.reshape(arr.shape)


def exact_2d(expr: ir.Expr, values: Mapping[str, Any], dims: Mapping[str, int]) -> np.ndarray:
    """``expr`` as a 2-D object array of Fractions."""
    handler = _HANDLERS.get(type(expr))
    if handler is None:
        raise NotExact(type(expr).__name__)
    return handler(expr, _Env(values, dims))


class _Env:
    def __init__(self, values: Mapping[str, Any], dims: Mapping[str, int]) -> None:
        self.values, self.dims = values, dims

    def __call__(self, expr: ir.Expr) -> np.ndarray:
        return exact_2d(expr, self.values, self.dims)

    def size(self, size: Any) -> int:
        """A symbolic size (``n``, ``m + 1``) as an integer, from the instance's sizes."""
        from dualize.model.sizes import size_of

        try:
            return size_of(size, self.dims)
        except KeyError as exc:
            raise NotExact(f"no size for {size}") from exc

    def shape(self, shape: ir.Shape) -> tuple[int, int]:
        return self.size(shape.rows), self.size(shape.cols)


def _rational(value: Any, dims: Mapping[str, int]) -> Fraction:
    value = value if isinstance(value, sympy.Basic) else sympy.Rational(value)
    free = sorted(value.free_symbols, key=lambda s: s.name)
    value = value.subs({s: int(dims[s.name]) for s in free}) if free else value
    if not value.is_Rational:
        raise NotExact(str(value))
    return Fraction(int(value.p), int(value.q))


def _filled(shape: tuple[int, int], value: Fraction) -> np.ndarray:
    out = np.empty(shape, dtype=object)
    out.fill(value)
    return out


def _symbol(e: ir.Symbol, env: _Env) -> np.ndarray:
    if e.name not in env.values:
        raise NotExact(f"no value for {e.name}")
    return fractions_of(env.values[e.name]).reshape(env.shape(e.sym_shape))


def _identity(n: int) -> np.ndarray:
    out = _filled((n, n), Fraction(0))
    for i in range(n):
        out[i, i] = Fraction(1)
    return out


def _scalar(arr: np.ndarray) -> Fraction:
    if arr.size != 1:
        raise NotExact("a scalar was expected")
    return arr.reshape(-1)[0]


def _matmul(e: ir.MatMul, env: _Env) -> np.ndarray:
    out = env(e.factors[0])
    for factor in e.factors[1:]:
        out = np.dot(out, env(factor))
    return out


def _power(e: ir.Power, env: _Env) -> np.ndarray:
    p = sympy.Rational(e.exponent)
    if p.q != 1:
        raise NotExact("a fractional power")
    base = env(e.base)
    if p.p < 0 and any(v == 0 for v in base.reshape(-1)):
        raise NotExact("a negative power of zero")
    return base ** int(p.p)


def _norm(e: ir.Norm, env: _Env) -> np.ndarray:
    flat = [abs(v) for v in env(e.arg).reshape(-1)]
    if e.p == "1":
        return _filled((1, 1), sum(flat, Fraction(0)))
    if e.p == "inf":
        return _filled((1, 1), max(flat, default=Fraction(0)))
    raise NotExact("a 2-norm")


def _apply(e: ir.Apply, env: _Env) -> np.ndarray:
    if e.func != "abs":
        raise NotExact(e.func)
    return np.abs(env(e.arg))


def _divide(e: ir.Divide, env: _Env) -> np.ndarray:
    left, right = env(e.left), env(e.right)
    if any(v == 0 for v in right.reshape(-1)):
        raise NotExact("a division by zero")
    return left / (right[0, 0] if right.shape == (1, 1) else right)


def _extremum(e: ir.Extremum, env: _Env) -> np.ndarray:
    left, right = np.broadcast_arrays(env(e.left), env(e.right))
    pick = max if e.kind == "max" else min
    out = np.empty(left.shape, dtype=object)
    for index in np.ndindex(left.shape):
        out[index] = pick(left[index], right[index])
    return out


def _diag(e: ir.Diag, env: _Env) -> np.ndarray:
    flat = env(e.arg).reshape(-1)
    out = _filled((len(flat), len(flat)), Fraction(0))
    for i, v in enumerate(flat):
        out[i, i] = v
    return out


_HANDLERS: dict[type, Callable[..., np.ndarray]] = {
    ir.Symbol: _symbol,
    ir.Number: lambda e, env: _filled((1, 1), _rational(e.value, env.dims)),
    ir.Ones: lambda e, env: _filled((env.size(e.n), 1), Fraction(1)),
    ir.Identity: lambda e, env: _identity(env.size(e.n)),
    ir.Zero: lambda e, env: _filled(env.shape(e.zero_shape), Fraction(0)),
    ir.Add: lambda e, env: sum((env(t) for t in e.terms[1:]), start=env(e.terms[0])),
    ir.Broadcast: lambda e, env: _filled(env.shape(e.target), _scalar(env(e.arg))),
    ir.MatMul: _matmul,
    ir.Scale: lambda e, env: _scalar(env(e.factor)) * env(e.arg),
    ir.Transpose: lambda e, env: env(e.arg).T,
    ir.Hadamard: lambda e, env: env(e.left) * env(e.right),
    ir.Divide: _divide,
    ir.Power: _power,
    ir.Apply: _apply,
    ir.Extremum: _extremum,
    ir.Norm: _norm,
    ir.SumAll: lambda e, env: _filled((1, 1), sum(env(e.arg).reshape(-1), Fraction(0))),
    ir.Diag: _diag,
    ir.Trace: lambda e, env: _filled((1, 1), sum(np.diagonal(env(e.arg)), Fraction(0))),
    ir.Block: lambda e, env: np.block([[env(b) for b in row] for row in e.rows]),
}

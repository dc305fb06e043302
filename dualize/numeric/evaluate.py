"""A numpy evaluator of the IR: the numeric twin of every symbolic result.

Every value is held as a 2-D array while evaluating (a column vector is
``(n, 1)``, a scalar ``(1, 1)``) so that matrix products, transposes and
broadcasts mean one thing only; the result is handed back as a float when it
is 1-by-1.  Dispatch is by node class with a strict fallback: a node this
module does not know raises ``TypeError`` instead of being skipped.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping

import numpy as np
import sympy

from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.model.sizes import size_of

Values = Mapping[str, "np.ndarray | float"]
Dims = Mapping[str, int]

__all__ = ["Dims", "Values", "evaluate", "evaluate_2d", "size_of"]


def shape_of(shape: ir.Shape, dims: Dims) -> tuple[int, int]:
    return size_of(shape.rows, dims), size_of(shape.cols, dims)


def as_column(value: np.ndarray | float, shape: tuple[int, int]) -> np.ndarray:
    """A stored value (float, 1-D vector or matrix) in the 2-D form of ``shape``."""
    arr = np.asarray(value, dtype=float)
    if arr.size != shape[0] * shape[1]:
        raise ValueError(f"value of {arr.shape} does not fit a {shape[0]}x{shape[1]} slot")
    return arr.reshape(shape)


def evaluate(expr: ir.Expr, values: Values, dims: Dims) -> np.ndarray | float:
    """The value of ``expr``: a float when it is a scalar, else a 2-D array."""
    out = evaluate_2d(expr, values, dims)
    if out.shape == (1, 1):
        return float(out[0, 0])
    return out


def evaluate_2d(expr: ir.Expr, values: Values, dims: Dims) -> np.ndarray:
    """The value of ``expr`` as a 2-D array, whatever its shape."""
    handler = _HANDLERS.get(type(expr))
    if handler is None:
        raise TypeError(f"evaluate: no rule for IR node {type(expr).__name__}")
    return handler(expr, _Env(values, dims))


class _Env:
    """What a handler needs: the values, the sizes, and recursion."""

    def __init__(self, values: Values, dims: Dims) -> None:
        self.values = values
        self.dims = dims

    def __call__(self, expr: ir.Expr) -> np.ndarray:
        return evaluate_2d(expr, self.values, self.dims)

    def size(self, size: sympy.Expr) -> int:
        return size_of(size, self.dims)

    def shape(self, shape: ir.Shape) -> tuple[int, int]:
        return shape_of(shape, self.dims)


def _number(value: sympy.Expr, dims: Dims) -> float:
    """A rational, or a polynomial in dimension symbols (``1'1 = n``), as a float."""
    value = sympy.Integer(value) if isinstance(value, int) else value
    if not getattr(value, "free_symbols", None):
        return float(value)
    free = sorted(value.free_symbols, key=lambda s: s.name)
    return float(value.subs({s: int(dims[s.name]) for s in free}))


def _symbol(e: ir.Symbol, env: _Env) -> np.ndarray:
    if e.name not in env.values:
        raise KeyError(f"no value for {e.name}")
    return as_column(env.values[e.name], env.shape(e.sym_shape))


def _scalar_of(arr: np.ndarray) -> float:
    if arr.size != 1:
        raise ValueError(f"expected a scalar, got an array of shape {arr.shape}")
    return float(arr.reshape(-1)[0])


def _matmul(e: ir.MatMul, env: _Env) -> np.ndarray:
    out = env(e.factors[0])
    for factor in e.factors[1:]:
        out = out @ env(factor)
    return out


def _norm(e: ir.Norm, env: _Env) -> np.ndarray:
    flat = env(e.arg).reshape(-1)
    order = {"1": 1, "2": 2, "inf": np.inf}[e.p]
    return np.array([[np.linalg.norm(flat, ord=order)]])


def _divide(e: ir.Divide, env: _Env) -> np.ndarray:
    left, right = env(e.left), env(e.right)
    if right.shape == (1, 1):
        return left / right[0, 0]
    return left / right


def _power(e: ir.Power, env: _Env) -> np.ndarray:
    """Integer powers everywhere; fractional powers on x >= 0 only (nan below), as
    convex analysis defines x^p for non-integer p (and as cvxpy's power does)."""
    base = env(e.base)
    p = sympy.Rational(e.exponent)
    with np.errstate(divide="ignore", invalid="ignore"):
        if p.q == 1:
            return base ** float(p.p) if p.p < 0 else base ** int(p.p)
        return np.where(base >= 0, np.power(np.abs(base), float(p)), np.nan)


def _apply(e: ir.Apply, env: _Env) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore"):
        return lookup(e.func).numpy.callable()(env(e.arg))


def _extremum(e: ir.Extremum, env: _Env) -> np.ndarray:
    pick = np.maximum if e.kind == "max" else np.minimum
    return pick(env(e.left), env(e.right))


def _diag(e: ir.Diag, env: _Env) -> np.ndarray:
    return np.diag(env(e.arg).reshape(-1))


def _inverse(e: ir.Inverse, env: _Env) -> np.ndarray:
    return np.linalg.inv(env(e.arg))


def _block(e: ir.Block, env: _Env) -> np.ndarray:
    return np.block([[env(b) for b in row] for row in e.rows])


def _broadcast(e: ir.Broadcast, env: _Env) -> np.ndarray:
    return np.full(env.shape(e.target), _scalar_of(env(e.arg)))


def _scale(e: ir.Scale, env: _Env) -> np.ndarray:
    return _scalar_of(env(e.factor)) * env(e.arg)


_HANDLERS: dict[type, Callable[..., np.ndarray]] = {
    ir.Symbol: _symbol,
    ir.Number: lambda e, env: np.array([[_number(e.value, env.dims)]]),
    ir.Ones: lambda e, env: np.ones((env.size(e.n), 1)),
    ir.Identity: lambda e, env: np.eye(env.size(e.n)),
    ir.Zero: lambda e, env: np.zeros(env.shape(e.zero_shape)),
    ir.Add: lambda e, env: sum((env(t) for t in e.terms[1:]), start=env(e.terms[0])),
    ir.Broadcast: _broadcast,
    ir.MatMul: _matmul,
    ir.Scale: _scale,
    ir.Transpose: lambda e, env: env(e.arg).T,
    ir.Hadamard: lambda e, env: env(e.left) * env(e.right),
    ir.Divide: _divide,
    ir.Power: _power,
    ir.Apply: _apply,
    ir.Extremum: _extremum,
    ir.Norm: _norm,
    ir.SumAll: lambda e, env: np.array([[float(np.sum(env(e.arg)))]]),
    ir.Diag: _diag,
    ir.Trace: lambda e, env: np.array([[float(np.trace(env(e.arg)))]]),
    ir.Inverse: _inverse,
    ir.PseudoInverse: lambda e, env: np.linalg.pinv(env(e.arg)),
    ir.Block: _block,
}

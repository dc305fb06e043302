"""Coefficient extraction by linearity, over our own IR.

For a block variable x (a vector, or a scalar) these functions write an
expression as

* ``affine``: e = A x + c (A has as many columns as x has entries),
* ``quadratic``: a scalar e = x' Q x + g' x + r,
* ``trace_linear``: a scalar e = <G, X> + c for a matrix variable X,

by walking the expression tree with the rules of linear algebra
(d/dx of u' M x is M' u; elementwise products become diagonal matrices), never
by symbolic differentiation of matrix expressions.  Each returns None when the
expression is not of that form in x: the caller then tries another rule.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from dualize.duality import build as b
from dualize.model.expr import (
    Add,
    Broadcast,
    Diag,
    Divide,
    Expr,
    Hadamard,
    MatMul,
    Norm,
    Power,
    Scale,
    SumAll,
    Symbol,
    Trace,
    Transpose,
    depends_on,
)


@dataclass(frozen=True)
class Affine:
    """e = lin x + const; ``None`` stands for a zero part."""

    lin: Expr | None
    const: Expr | None


@dataclass(frozen=True)
class Quadratic:
    """e = x' Q x + g' x + r; ``None`` stands for a zero part (Q need not be symmetric)."""

    Q: Expr | None
    g: Expr | None
    r: Expr | None


def _free(e: Expr, x: Symbol) -> bool:
    return not depends_on(e, {x.name})


def _add_opt(*parts: Expr | None) -> Expr | None:
    present = [p for p in parts if not b.is_zero(p)]
    return b.add(*present) if present else None


def _mul_opt(*factors: Expr | None) -> Expr | None:
    if any(f is None or b.is_zero(f) for f in factors):
        return None
    return b.mul(*factors)  # type: ignore[arg-type]


def affine(e: Expr, x: Symbol) -> Affine | None:
    """e = A x + c, for e a column (or scalar) and x a vector or scalar variable."""
    if _free(e, x):
        return Affine(None, e)
    if e == x:
        return Affine(b.Identity(x.shape.rows) if not x.shape.is_scalar else b.num(1), None)
    if e.shape.cols != 1 and not x.shape.is_scalar:
        return None  # rows and matrices are handled through their transposes or traces
    handler = _AFFINE_RULES.get(type(e))
    return handler(e, x) if handler else None


def _affine_add(e: Add, x: Symbol) -> Affine | None:
    parts = [affine(t, x) for t in e.terms]
    if any(p is None for p in parts):
        return None
    return Affine(_add_opt(*(p.lin for p in parts)), _add_opt(*(p.const for p in parts)))


def _affine_scale(e: Scale, x: Symbol) -> Affine | None:
    c, a = e.factor, e.arg
    if _free(c, x):
        inner = affine(a, x)
        if inner is None:
            return None
        return Affine(_scale_opt(c, inner.lin), _scale_opt(c, inner.const))
    if _free(a, x):
        coef = affine(c, x)  # scalar: c = r x + c0, r a row
        if coef is None:
            return None
        return Affine(_mul_opt(a, coef.lin), _scale_opt(coef.const, a))
    return None


def _scale_opt(c: Expr | None, e: Expr | None) -> Expr | None:
    if c is None or e is None or b.is_zero(c) or b.is_zero(e):
        return None
    return b.scale(c, e) if not e.shape.is_scalar else b.mul_scalars(c, e)


def _affine_hadamard(e: Hadamard, x: Symbol) -> Affine | None:
    left, right = e.left, e.right
    if not _free(left, x):
        left, right = right, left
    if not _free(left, x):
        return None
    inner = affine(right, x)
    if inner is None:
        return None
    lin = _mul_opt(b.diag(left), inner.lin)
    const = b.hadamard(left, inner.const) if inner.const is not None else None
    return Affine(lin, const)


def _affine_divide(e: Divide, x: Symbol) -> Affine | None:
    if not _free(e.right, x):
        return None
    return affine(b.hadamard(e.left, b.power(e.right, sympy.Integer(-1))), x)


def _affine_broadcast(e: Broadcast, x: Symbol) -> Affine | None:
    inner = affine(e.arg, x)
    if inner is None:
        return None
    ones = b.Ones(e.shape.rows)
    return Affine(_mul_opt(ones, inner.lin), b.broadcast(inner.const, e.shape)
                  if inner.const is not None else None)


def _affine_transpose(e: Transpose, x: Symbol) -> Affine | None:
    pushed = b.transpose(e.arg)
    return None if isinstance(pushed, Transpose) else affine(pushed, x)


def _affine_sum(e: SumAll, x: Symbol) -> Affine | None:
    return affine(b.sum_all(e.arg), x) if not e.arg.shape.is_scalar else affine(e.arg, x)


def _affine_matmul(e: MatMul, x: Symbol) -> Affine | None:
    factors = e.factors
    dependent = [i for i, f in enumerate(factors) if not _free(f, x)]
    if len(dependent) != 1:
        return None
    i = dependent[0]
    if e.shape.is_scalar and i == 0 and factors[0].shape.rows == 1 and len(factors) > 1:
        flipped = flip(e)
        return None if flipped == e else affine(flipped, x)
    head, f, tail = factors[:i], factors[i], factors[i + 1 :]
    if tail:
        rest = b.mul(*tail)
        if isinstance(f, Diag):
            return affine(b.mul(*head, b.hadamard(f.arg, rest)) if head else
                          b.hadamard(f.arg, rest), x)
        if f.shape.cols == 1 and rest.shape.is_scalar:
            return affine(b.scale(rest, b.mul(*head, f) if head else f), x)
        return None
    inner = affine(f, x)
    if inner is None:
        return None
    left = b.mul(*head) if head else None
    if left is None:
        return inner
    return Affine(_mul_opt(left, inner.lin), _mul_opt(left, inner.const))


def _affine_trace(e: Trace, x: Symbol) -> Affine | None:
    return None


_AFFINE_RULES = {
    Add: _affine_add,
    Scale: _affine_scale,
    Hadamard: _affine_hadamard,
    Divide: _affine_divide,
    Broadcast: _affine_broadcast,
    Transpose: _affine_transpose,
    SumAll: _affine_sum,
    MatMul: _affine_matmul,
    Trace: _affine_trace,
}


def flip(e: MatMul) -> Expr:
    """A scalar chain read backwards: u'M v = v'M'u."""
    return b.mul(*(b.transpose(f) for f in reversed(e.factors)))


# -- quadratic ---------------------------------------------------------------


def quadratic(e: Expr, x: Symbol) -> Quadratic | None:
    """A scalar e as x' Q x + g' x + r, or None when e is not quadratic in x."""
    if _free(e, x):
        return Quadratic(None, None, e)
    lin = affine(e, x)
    if lin is not None:
        return Quadratic(None, _opt_t(lin.lin), lin.const)
    handler = _QUAD_RULES.get(type(e))
    return handler(e, x) if handler else None


def _opt_t(e: Expr | None) -> Expr | None:
    return None if e is None else b.transpose(e)


def quad_sum(parts: list[Quadratic | None]) -> Quadratic | None:
    if any(p is None for p in parts):
        return None
    return Quadratic(
        _add_opt(*(p.Q for p in parts)),
        _add_opt(*(p.g for p in parts)),
        _add_opt(*(p.r for p in parts)),
    )


def _quad_add(e: Add, x: Symbol) -> Quadratic | None:
    return quad_sum([quadratic(t, x) for t in e.terms])


def _quad_scale(e: Scale, x: Symbol) -> Quadratic | None:
    c, a = e.factor, e.arg
    if _free(a, x):
        c, a = a, c
    if _free(c, x):
        q = quadratic(a, x)
        if q is None:
            return None
        return Quadratic(_scale_opt(c, q.Q), _scale_opt(c, q.g), _scale_opt(c, q.r))
    return product_of_affines(c, a, x)


def product_of_affines(u: Expr, v: Expr, x: Symbol) -> Quadratic | None:
    """(r1 x + c1)(r2 x + c2) for two scalars affine in x."""
    au, av = affine(u, x), affine(v, x)
    if au is None or av is None:
        return None
    return inner_of_affines(au, av)


def inner_of_affines(u: Affine, v: Affine) -> Quadratic:
    """u' v with u = A x + a, v = B x + c: x'A'B x + (A'c + B'a)' x + a'c."""
    Q = _mul_opt(_opt_t(u.lin), v.lin)
    g = _add_opt(_mul_opt(_opt_t(u.lin), v.const), _mul_opt(_opt_t(v.lin), u.const))
    r = _mul_opt(_opt_t(u.const), v.const)
    return Quadratic(Q, g, r)


def _quad_power(e: Power, x: Symbol) -> Quadratic | None:
    if e.exponent != 2 or not e.shape.is_scalar:
        return None
    base = e.base
    if isinstance(base, Norm) and base.p == "2":
        return _quad_inner(base.arg, base.arg, x)
    return product_of_affines(base, base, x)


def _quad_inner(u: Expr, v: Expr, x: Symbol) -> Quadratic | None:
    if u.shape.cols != 1:
        return None
    au, av = affine(u, x), affine(v, x)
    if au is None or av is None:
        return None
    return inner_of_affines(au, av)


def _quad_matmul(e: MatMul, x: Symbol) -> Quadratic | None:
    """A scalar chain: split into a row part and a column part around x."""
    factors = e.factors
    dependent = [i for i, f in enumerate(factors) if not _free(f, x)]
    if len(dependent) == 1:
        return _quad_weighted(e, dependent[0], x)
    if len(dependent) != 2:
        return None
    i = dependent[0]
    left = b.mul(*factors[: i + 1])
    right = b.mul(*factors[i + 1 :])
    if left.shape.rows != 1:
        return None
    return _quad_inner(b.transpose(left), right, x)


def _quad_weighted(e: MatMul, i: int, x: Symbol) -> Quadratic | None:
    """w' f(x) with f elementwise quadratic: distribute the weight inside."""
    factors = e.factors
    if i != len(factors) - 1:
        flipped = flip(e)
        if flipped == e or not isinstance(flipped, MatMul):
            return None
        return _quad_weighted(flipped, len(flipped.factors) - 1, x) if _free(
            b.mul(*flipped.factors[:-1]), x) else None
    w = b.mul(*factors[:-1])
    return weighted(w, factors[-1], x)


def weighted(w: Expr, f: Expr, x: Symbol) -> Quadratic | None:
    """The scalar w f (w a row free of x, f a column) as a quadratic in x."""
    if isinstance(f, Add):
        return quad_sum([weighted(w, t, x) for t in f.terms])
    if isinstance(f, Scale):
        if _free(f.factor, x):
            q = weighted(w, f.arg, x)
            return None if q is None else Quadratic(
                _scale_opt(f.factor, q.Q), _scale_opt(f.factor, q.g), _scale_opt(f.factor, q.r))
        if _free(f.arg, x):
            return quadratic(b.scale(f.factor, b.mul(w, f.arg)), x)
        return None
    if isinstance(f, Hadamard):  # w (l .* r) = (diag(w') l)' r
        return _quad_inner(b.mul(b.diag(b.transpose(w)), f.left), f.right, x)
    if isinstance(f, Power) and f.exponent == 2:  # w (u .^ 2) = (diag(w') u)' u
        return _quad_inner(b.mul(b.diag(b.transpose(w)), f.base), f.base, x)
    if isinstance(f, MatMul) and _free(f.factors[0], x) and len(f.factors) > 1:
        return weighted(b.mul(w, f.factors[0]), b.mul(*f.factors[1:]), x)
    lin = affine(f, x)
    if lin is None:
        return None
    return Quadratic(None, _opt_t(_mul_opt(w, lin.lin)), _mul_opt(w, lin.const))


def _quad_sumall(e: SumAll, x: Symbol) -> Quadratic | None:
    arg = e.arg
    if arg.shape.cols != 1:
        return None
    return weighted(b.transpose(b.Ones(arg.shape.rows)), arg, x)


_QUAD_RULES = {
    Add: _quad_add,
    Scale: _quad_scale,
    Power: _quad_power,
    MatMul: _quad_matmul,
    SumAll: _quad_sumall,
}


def hessian(q: Quadratic, x: Symbol) -> Expr | None:
    """H = Q + Q' (so that e = 1/2 x' H x + g' x + r)."""
    if q.Q is None:
        return None
    return b.add(q.Q, b.transpose(q.Q))


# -- matrix variables: linear functionals <G, X> -------------------------------


def trace_linear(e: Expr, X: Symbol) -> Affine | None:
    """A scalar e as <G, X> + c (``lin`` holds G) for a matrix variable X."""
    if _free(e, X):
        return Affine(None, e)
    if isinstance(e, Add):
        parts = [trace_linear(t, X) for t in e.terms]
        if any(p is None for p in parts):
            return None
        return Affine(_add_opt(*(p.lin for p in parts)), _add_opt(*(p.const for p in parts)))
    if isinstance(e, Scale) and not _free(e.factor, X) and _free(e.arg, X):
        return trace_linear(b.scale(e.arg, e.factor), X)
    if isinstance(e, Scale) and _free(e.factor, X):
        inner = trace_linear(e.arg, X)
        return None if inner is None else Affine(_scale_opt(e.factor, inner.lin),
                                                 _scale_opt(e.factor, inner.const))
    if isinstance(e, Trace):
        return _trace_of(e.arg, X)
    if isinstance(e, MatMul) and e.shape.is_scalar:
        return _trace_of(e, X)  # a scalar chain is its own trace
    if isinstance(e, SumAll) and not isinstance(e.arg, Hadamard):
        return trace_linear(b.sum_all(e.arg), X)
    if isinstance(e, SumAll) and isinstance(e.arg, Hadamard):
        h = e.arg
        other = h.right if h.left == X else h.left if h.right == X else None
        if other is not None and _free(other, X):
            return Affine(other, None)
    return None


def _trace_of(M: Expr, X: Symbol) -> Affine | None:
    if _free(M, X):
        return Affine(None, Trace(M))
    if isinstance(M, Add):
        return trace_linear(b.add(*(Trace(t) for t in M.terms)), X)
    if isinstance(M, Scale) and _free(M.factor, X):
        inner = _trace_of(M.arg, X)
        return None if inner is None else Affine(_scale_opt(M.factor, inner.lin),
                                                 _scale_opt(M.factor, inner.const))
    factors = M.factors if isinstance(M, MatMul) else (M,)
    dependent = [i for i, f in enumerate(factors) if not _free(f, X)]
    if len(dependent) != 1:
        return None
    i = dependent[0]
    f = factors[i]
    P = b.mul(*factors[:i]) if i else None
    R = b.mul(*factors[i + 1 :]) if i + 1 < len(factors) else None
    if f == X:
        # trace(P X R) = trace(R P X) = <(R P)', X>
        RP = _mul_chain(R, P, X)
        return Affine(b.transpose(RP), None)
    if isinstance(f, Transpose) and f.arg == X:
        return Affine(_mul_chain(R, P, X), None)
    if isinstance(f, Hadamard):
        return _trace_hadamard(P, f, R, X)
    return None


def _trace_hadamard(P: Expr | None, f: Hadamard, R: Expr | None, X: Symbol) -> Affine | None:
    """trace(P (D .* X) R) = <(R P)' .* D, X> for D free of X.

    Entry by entry, trace(P (D .* X) R) = sum_ij (R P)_ji D_ij X_ij.  With a row
    u' = P and a column v = R this is <diag(u) D diag(v), X>, and with P and R the
    ones vectors (sum(D .* X)) it is <D, X>: the elementwise product with data is
    a linear functional of X.
    """
    D = f.left if f.right == X else f.right if f.left == X else None
    if D is None or not _free(D, X):
        return None
    if P is None and R is None:
        return None  # a matrix, not a scalar: no functional
    if P is not None and R is not None and P.shape.rows == 1 and R.shape.cols == 1:
        u, v = b.transpose(P), R
        G = b.mul(*(m for m in (_diag_unless_ones(u), D, _diag_unless_ones(v)) if m is not None))
        return Affine(G, None)
    return Affine(b.hadamard(b.transpose(_mul_chain(R, P, X)), D), None)


def _diag_unless_ones(u: Expr) -> Expr | None:
    from dualize.model.expr import Ones

    return None if isinstance(u, Ones) else b.diag(u)


def _mul_chain(R: Expr | None, P: Expr | None, X: Symbol) -> Expr:
    parts = [p for p in (R, P) if p is not None]
    return b.mul(*parts) if parts else b.Identity(X.shape.rows)

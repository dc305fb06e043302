"""IR expressions as cvxpy expressions, for the independent numeric reference.

cvxpy only accepts what its curvature rules can certify, so the building
blocks the language recognises are mapped to the atoms that certify them:
``x' * P * x`` with P data to ``quad_form``, ``||e||^2`` and ``e' * e`` to
``sum_squares``, ``e .* log(e)`` to ``-entr(e)``, ``log(sum(exp(e)))`` to
``log_sum_exp``.  Any subexpression free of variables is evaluated with numpy
first (so inverses and pseudo-inverses of data are plain constants).  Every
value is 2-D, as in the numpy evaluator; a node without a rule raises
``TypeError``.  cvxpy is imported inside the functions, never at module load.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from typing import Any

import numpy as np

from dualize.model import expr as ir
from dualize.model.functions import EXP, LOG, lookup
from dualize.numeric.evaluate import Dims, Values, evaluate_2d, size_of

CvxExpr = Any


class _Ctx:
    """The translation context: cvxpy variables, data values, sizes."""

    def __init__(self, variables: Mapping[str, CvxExpr], values: Values, dims: Dims) -> None:
        import cvxpy as cp

        self.cp = cp
        self.variables = variables
        self.values = values
        self.dims = dims
        self.names = frozenset(variables)

    def __call__(self, expr: ir.Expr) -> CvxExpr:
        return _translate(expr, self)

    def varies(self, expr: ir.Expr) -> bool:
        return ir.depends_on(expr, self.names)


def to_cvxpy(expr: ir.Expr, variables: Mapping[str, CvxExpr], values: Values,
             dims: Dims) -> CvxExpr:
    """``expr`` as a cvxpy expression (2-D), with ``variables`` by name."""
    return _Ctx(variables, values, dims)(expr)


def scalar(e: CvxExpr) -> CvxExpr:
    """A 1-by-1 cvxpy expression as a true scalar."""
    import cvxpy as cp

    e = cp.Constant(e) if isinstance(e, (np.ndarray, float, int)) else e
    return e[0, 0] if e.shape == (1, 1) else e


def _translate(expr: ir.Expr, ctx: _Ctx) -> CvxExpr:
    if not ctx.varies(expr):
        return ctx.cp.Constant(evaluate_2d(expr, ctx.values, ctx.dims))
    for recognise in _RECOGNISERS:
        hit = recognise(expr, ctx)
        if hit is not None:
            return hit
    handler = _HANDLERS.get(type(expr))
    if handler is None:
        raise TypeError(f"to_cvxpy: no rule for IR node {type(expr).__name__}")
    return handler(expr, ctx)


def _peel(e: ir.Expr) -> tuple[list[ir.Expr], ir.Expr]:
    """Scalar factors around a row or column: Scale(k, Transpose(Scale(j, u))) -> [k, j], u'."""
    coefs: list[ir.Expr] = []
    while isinstance(e, ir.Scale) or (isinstance(e, ir.Transpose)
                                      and isinstance(e.arg, ir.Scale)):
        if isinstance(e, ir.Scale):
            coefs.append(e.factor)
            e = e.arg
        else:
            coefs.append(e.arg.factor)
            e = ir.Transpose(e.arg.arg)
    return coefs, e


def pushed_transpose(e: ir.Expr) -> ir.Expr:
    """``e`` with transposes pushed to the leaves, so (G'y + q)' and y'G + q' compare equal."""
    if isinstance(e, ir.Transpose):
        return _transpose_of(e.arg)
    if isinstance(e, ir.Add):
        return ir.Add(tuple(pushed_transpose(t) for t in e.terms))
    if isinstance(e, ir.MatMul):
        return ir.MatMul(tuple(pushed_transpose(f) for f in e.factors))
    if isinstance(e, ir.Scale):
        return ir.Scale(e.factor, pushed_transpose(e.arg))
    return e


def _transpose_of(e: ir.Expr) -> ir.Expr:
    if isinstance(e, ir.Transpose):
        return pushed_transpose(e.arg)
    if isinstance(e, ir.Add):
        return ir.Add(tuple(_transpose_of(t) for t in e.terms))
    if isinstance(e, ir.MatMul):
        return ir.MatMul(tuple(_transpose_of(f) for f in reversed(e.factors)))
    if isinstance(e, ir.Scale):
        return ir.Scale(e.factor, _transpose_of(e.arg))
    if e.shape.is_scalar or (isinstance(e, ir.Symbol) and "symmetric" in e.facts):
        return e
    if isinstance(e, ir.Diag | ir.Identity):
        return e
    return ir.Transpose(e)


def _quad_form(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    """k u' M1 ... Mj u with k and every M data, or k u' u: a quadratic form cvxpy certifies.

    Scalar factors written on the row or the column (``1/2 * x' * P * x`` resolves
    to a scaled row vector) are pulled out; the middle product P is symmetrized
    (u'Pu = u'(P + P')/2 u), so cvxpy certifies convexity when P is PSD.
    """
    if not isinstance(expr, ir.MatMul) or len(expr.factors) < 2:
        return None
    head_coefs, first = _peel(expr.factors[0])
    tail_coefs, last = _peel(expr.factors[-1])
    coefs, middle = head_coefs + tail_coefs, expr.factors[1:-1]
    if last.shape.cols != 1 or pushed_transpose(first) != pushed_transpose(ir.Transpose(last)):
        return None
    if any(ctx.varies(f) for f in (*middle, *coefs)):
        return None
    k = float(np.prod([evaluate_2d(c, ctx.values, ctx.dims)[0, 0] for c in coefs]))
    u = ctx(last)
    if not middle:
        return _as_2d(ctx.cp, k * ctx.cp.sum_squares(u))
    p = evaluate_2d(ir.MatMul(middle) if len(middle) > 1 else middle[0], ctx.values, ctx.dims)
    return _as_2d(ctx.cp, k * _semidefinite_form(ctx.cp, u, (p + p.T) / 2))


SEMIDEFINITE_TOL = 1e-9


def _form_over_scalar(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    """u'Pu / h with P positive semidefinite data and h a varying scalar: the
    quadratic-over-linear function ||L'u||^2 / h (P = L L'), jointly convex for h > 0
    (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.1.5)."""
    if not (isinstance(expr, ir.Divide) and expr.shape.is_scalar and ctx.varies(expr.right)
            and isinstance(expr.left, ir.MatMul) and len(expr.left.factors) >= 2):
        return None
    head_coefs, first = _peel(expr.left.factors[0])
    tail_coefs, last = _peel(expr.left.factors[-1])
    coefs, middle = head_coefs + tail_coefs, expr.left.factors[1:-1]
    if last.shape.cols != 1 or pushed_transpose(first) != pushed_transpose(ir.Transpose(last)):
        return None
    if coefs or any(ctx.varies(f) for f in middle):
        return None
    u = ctx(last)
    if middle:
        p = evaluate_2d(ir.MatMul(middle) if len(middle) > 1 else middle[0], ctx.values,
                        ctx.dims)
        w, v = np.linalg.eigh((p + p.T) / 2)
        scale = max(1.0, float(np.max(np.abs(w)))) if w.size else 1.0
        if w.size and w[0] < -SEMIDEFINITE_TOL * scale:
            return None
        u = (np.sqrt(np.clip(w, 0.0, None))[:, None] * v.T) @ u
    return _as_2d(ctx.cp, ctx.cp.quad_over_lin(u, scalar(ctx(expr.right))))


def _semidefinite_form(cp: Any, u: CvxExpr, p: np.ndarray) -> CvxExpr:
    """u'Pu as +-||L'u||^2 when P is semidefinite up to rounding, else quad_form.

    A Gram matrix such as diag(y) X X' diag(y) is PSD in exact arithmetic but
    its computed eigenvalues can dip to -1e-16, which cvxpy's own PSD test
    rejects; factoring P = V diag(w) V' with the rounding clipped keeps the
    form certifiable.
    """
    w, v = np.linalg.eigh(p)
    scale = max(1.0, float(np.max(np.abs(w)))) if w.size else 1.0
    if w.size and w[0] >= -SEMIDEFINITE_TOL * scale:
        return cp.sum_squares((np.sqrt(np.clip(w, 0.0, None))[:, None] * v.T) @ u)
    if w.size and w[-1] <= SEMIDEFINITE_TOL * scale:
        return -cp.sum_squares((np.sqrt(np.clip(-w, 0.0, None))[:, None] * v.T) @ u)
    return cp.quad_form(u, p)


def _squared_norm(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    if isinstance(expr, ir.Power) and expr.exponent == 2 and isinstance(expr.base, ir.Norm) \
            and expr.base.p == "2":
        return _as_2d(ctx.cp, ctx.cp.sum_squares(ctx(expr.base.arg)))
    return None


def _neg_entropy(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    """e .* log(e) (either order) is -entr(e), convex."""
    if not isinstance(expr, ir.Hadamard):
        return None
    for a, b in ((expr.left, expr.right), (expr.right, expr.left)):
        if isinstance(b, ir.Apply) and b.func == LOG.name and _same(b.arg, a):
            return -ctx.cp.entr(ctx(a))
        if isinstance(b, ir.Apply) and b.func == LOG.name and _same(b.arg, _negated(a)):
            return ctx.cp.entr(ctx(b.arg))  # a log(-a) = -(-a) log(-a) = entr(-a)
        if (isinstance(b, ir.Apply) and b.func == LOG.name and isinstance(b.arg, ir.Divide)
                and _same(b.arg.left, a) and b.arg.right.shape == a.shape):
            return ctx.cp.rel_entr(ctx(a), ctx(b.arg.right))  # a log(a/q), jointly convex
    return None


def _negated(e: ir.Expr) -> ir.Expr:
    import sympy

    return ir.Scale(ir.Number(sympy.Integer(-1)), e)


def _same(a: ir.Expr, c: ir.Expr) -> bool:
    from dualize.duality.normal import tidy

    return a == c or tidy(a) == tidy(c)


def _softplus(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    """log(1 + exp(g)) entrywise is cvxpy's logistic(g), convex."""
    if not (isinstance(expr, ir.Apply) and expr.func == "log" and isinstance(expr.arg, ir.Add)
            and len(expr.arg.terms) == 2):
        return None
    for one, e in (expr.arg.terms, reversed(expr.arg.terms)):
        ones = isinstance(one, ir.Ones) or (isinstance(one, ir.Number) and one.value == 1) or (
            isinstance(one, ir.Broadcast) and isinstance(one.arg, ir.Number)
            and one.arg.value == 1)
        if ones and isinstance(e, ir.Apply) and e.func == "exp":
            return ctx.cp.logistic(ctx(e.arg))
    return None


def _entropy_product(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    """log(u)' u or u' log(u) (a vector inner product) is sum(-entr(u)), convex."""
    if not isinstance(expr, ir.MatMul) or len(expr.factors) != 2:
        return None
    first, last = expr.factors
    if not isinstance(first, ir.Transpose) or last.shape.cols != 1:
        return None
    for a, b in ((first.arg, last), (last, first.arg)):
        if isinstance(a, ir.Apply) and a.func == LOG.name and a.arg == b:
            return _as_2d(ctx.cp, -ctx.cp.sum(ctx.cp.entr(ctx(b))))
    return None


def _log_sum_exp(expr: ir.Expr, ctx: _Ctx) -> CvxExpr | None:
    if isinstance(expr, ir.Apply) and expr.func == LOG.name and isinstance(expr.arg, ir.SumAll) \
            and isinstance(expr.arg.arg, ir.Apply) and expr.arg.arg.func == EXP.name:
        return _as_2d(ctx.cp, ctx.cp.log_sum_exp(ctx(expr.arg.arg.arg)))
    return None


def _as_2d(cp: Any, e: CvxExpr) -> CvxExpr:
    return cp.reshape(e, (1, 1), order="F") if e.shape == () else e


_RECOGNISERS: tuple[Callable[[ir.Expr, _Ctx], CvxExpr | None], ...] = (
    _quad_form, _squared_norm, _neg_entropy, _entropy_product, _log_sum_exp, _softplus,
    _form_over_scalar,
)


def _symbol(e: ir.Symbol, ctx: _Ctx) -> CvxExpr:
    return ctx.variables[e.name]


def _matmul(e: ir.MatMul, ctx: _Ctx) -> CvxExpr:
    out = ctx(e.factors[0])
    for factor in e.factors[1:]:
        out = out @ ctx(factor)
    return out


def _scale(e: ir.Scale, ctx: _Ctx) -> CvxExpr:
    factor, arg = ctx(e.factor), ctx(e.arg)
    if not ctx.varies(e.factor) or not ctx.varies(e.arg):
        return scalar(factor) * arg
    return ctx.cp.multiply(scalar(factor), arg)


def _hadamard(e: ir.Hadamard, ctx: _Ctx) -> CvxExpr:
    return ctx.cp.multiply(ctx(e.left), ctx(e.right))


def _divide(e: ir.Divide, ctx: _Ctx) -> CvxExpr:
    if ctx.varies(e.right):
        numerator = e.left
        if not ctx.varies(numerator):
            num = evaluate_2d(numerator, ctx.values, ctx.dims)
            return ctx.cp.multiply(num, ctx.cp.inv_pos(ctx(e.right)))
        raise ValueError("a quotient by a variable expression is not certifiably convex")
    denominator = evaluate_2d(e.right, ctx.values, ctx.dims)
    if denominator.shape == (1, 1):
        return ctx(e.left) / float(denominator[0, 0])
    return ctx.cp.multiply(ctx(e.left), 1.0 / denominator)


def _power(e: ir.Power, ctx: _Ctx) -> CvxExpr:
    base = ctx(e.base)
    if e.exponent == 1:
        return base
    if e.exponent == 2:
        return ctx.cp.square(base)
    return ctx.cp.power(base, float(e.exponent))


def _apply(e: ir.Apply, ctx: _Ctx) -> CvxExpr:
    function = lookup(e.func)
    outer, inner = function.reference_affine
    arg = ctx(e.arg) if inner == 1.0 else inner * ctx(e.arg)
    value = getattr(ctx.cp, function.reference)(arg)
    return value if outer == 1.0 else outer * value


def _extremum(e: ir.Extremum, ctx: _Ctx) -> CvxExpr:
    pick = ctx.cp.maximum if e.kind == "max" else ctx.cp.minimum
    return pick(ctx(e.left), ctx(e.right))


def _norm(e: ir.Norm, ctx: _Ctx) -> CvxExpr:
    order = {"1": 1, "2": 2, "inf": "inf"}[e.p]
    flat = ctx.cp.vec(ctx(e.arg), order="F")
    return _as_2d(ctx.cp, ctx.cp.norm(flat, order))


def _broadcast(e: ir.Broadcast, ctx: _Ctx) -> CvxExpr:
    rows, cols = size_of(e.target.rows, ctx.dims), size_of(e.target.cols, ctx.dims)
    return scalar(ctx(e.arg)) * np.ones((rows, cols))


def _diag(e: ir.Diag, ctx: _Ctx) -> CvxExpr:
    return ctx.cp.diag(ctx.cp.vec(ctx(e.arg), order="F"))


def _block(e: ir.Block, ctx: _Ctx) -> CvxExpr:
    return ctx.cp.bmat([[ctx(b) for b in row] for row in e.rows])


def _add(e: ir.Add, ctx: _Ctx) -> CvxExpr:
    out = ctx(e.terms[0])
    for term in e.terms[1:]:
        out = out + ctx(term)
    return out


def _data_only(e: ir.Expr, ctx: _Ctx) -> CvxExpr:
    raise ValueError(f"{type(e).__name__} of a variable expression has no convex form")


_HANDLERS: dict[type, Callable[..., CvxExpr]] = {
    ir.Symbol: _symbol,
    ir.Add: _add,
    ir.Broadcast: _broadcast,
    ir.MatMul: _matmul,
    ir.Scale: _scale,
    ir.Transpose: lambda e, ctx: ctx(e.arg).T,
    ir.Hadamard: _hadamard,
    ir.Divide: _divide,
    ir.Power: _power,
    ir.Apply: _apply,
    ir.Extremum: _extremum,
    ir.Norm: _norm,
    ir.SumAll: lambda e, ctx: _as_2d(ctx.cp, ctx.cp.sum(ctx(e.arg))),
    ir.Diag: _diag,
    ir.Trace: lambda e, ctx: _as_2d(ctx.cp, ctx.cp.trace(ctx(e.arg))),
    ir.Inverse: _data_only,
    ir.PseudoInverse: _data_only,
    ir.Block: _block,
}

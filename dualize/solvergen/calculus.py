"""Symbolic first derivatives over the IR, for the generated dual solvers.

A solver needs the gradient of the dual objective, the Jacobians of the dual
constraints and a Hessian-vector product.  sympy's matrix calculus is not
reliable on our expressions (see the project notes), so this module
differentiates the IR itself, in forward mode and in matrix form: the
Jacobian of a scalar or vector expression ``e`` with respect to a vector
variable ``v`` is an IR expression of shape ``len(e) x len(v)``.  Row and
column vectors are treated alike (flattened); a matrix-valued expression is
differentiated as its entries stacked row by row (``Vec``), and a product
``L F R`` whose factor ``F`` depends on the variable as ``kron(L, R') d vec(F)``
(``Kron``), which covers outer products such as ``u 1'`` and ``1 v'`` (the
transport kind) and elementwise functions of them.  The transpose of a matrix
that depends on the variable is differentiated only inside a product whose value
is a vector (``vec(L F' R) = kron(R', L) vec(F)`` there); elsewhere it, like every
node without a rule, raises :class:`NotDifferentiable` with the reason, never a
silent wrong answer.

A max or min has a derivative rule only on request (``piecewise``): the derivative
of the side it takes, entry by entry (``Picks``; the left side at ties).  That is the
gradient wherever no tie occurs; the caller asks for it only for a function it knows
to be continuously differentiable as a whole (a dual smooth by Danskin's theorem, see
``duality.smoothness``), where the one-sided derivatives at a tie agree.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.model.ops import is_zero
from dualize.solvergen.ir_rewrite import (
    Kron,
    LogSumExp,
    Picks,
    Softmax,
    Vec,
    is_scalar,
    is_vector_like,
    length,
    matmul,
    normalize,
    outer,
    scale,
    total,
)

MINUS = ir.Number(sympy.Integer(-1))


class NotDifferentiable(Exception):
    """The expression has no derivative rule here (nonsmooth, or a matrix in the variable)."""


@dataclass(frozen=True)
class _Target:
    symbol: ir.Symbol
    piecewise: bool = False

    @property
    def size(self) -> sympy.Expr:
        return length(self.symbol.shape)


def jacobian(expr: ir.Expr, var: ir.Symbol, piecewise: bool = False) -> ir.Expr:
    """d expr / d var, an IR expression of shape len(expr) x len(var), normalized;
    ``piecewise`` differentiates a max or min by the side it takes (see the module doc)."""
    return normalize(_jac(normalize(expr), _Target(var, piecewise)))


def gradient(expr: ir.Expr, var: ir.Symbol, piecewise: bool = False) -> ir.Expr:
    """The gradient of a scalar expression, shaped like ``var``."""
    if not is_scalar(expr):
        raise NotDifferentiable("a gradient needs a scalar expression")
    jac = jacobian(expr, var, piecewise)
    return jac if is_scalar(var) else normalize(ir.Transpose(jac))


def _zero(expr: ir.Expr, target: _Target) -> ir.Expr:
    return ir.Zero(ir.Shape(length(expr.shape), target.size))


def _jac(expr: ir.Expr, target: _Target) -> ir.Expr:
    if not ir.depends_on(expr, {target.symbol.name}):
        return _zero(expr, target)
    rule = _RULES.get(type(expr))
    if rule is None:
        raise NotDifferentiable(f"no derivative rule for {type(expr).__name__}")
    return rule(expr, target)


def _symbol(expr: ir.Symbol, target: _Target) -> ir.Expr:
    if expr.name != target.symbol.name:
        return _zero(expr, target)
    return ir.Number(sympy.Integer(1)) if is_scalar(expr) else ir.Identity(target.size)


def _add(expr: ir.Add, target: _Target) -> ir.Expr:
    return ir.Add(tuple(_jac(t, target) for t in expr.terms))


def _scale(expr: ir.Scale, target: _Target) -> ir.Expr:
    parts: list[ir.Expr] = [scale(expr.factor, _jac(expr.arg, target))]
    if ir.depends_on(expr.factor, {target.symbol.name}):
        parts.append(outer(_column(expr.arg), _jac(expr.factor, target)))
    return ir.Add(tuple(parts))


def _column(expr: ir.Expr) -> ir.Expr:
    """An expression as a column: rows transposed, matrices stacked row by row."""
    if expr.shape.rows == 1 and expr.shape.cols != 1:
        return ir.Transpose(expr)
    if not (is_scalar(expr) or is_vector_like(expr)):
        return Vec(expr)
    return expr


def _transpose(expr: ir.Transpose, target: _Target) -> ir.Expr:
    if not (is_scalar(expr.arg) or is_vector_like(expr.arg)):
        raise NotDifferentiable(
            f"the transpose of a matrix that depends on {target.symbol.name}")
    return _jac(expr.arg, target)


def _broadcast(expr: ir.Broadcast, target: _Target) -> ir.Expr:
    return outer(ir.Ones(length(expr.target)), _jac(expr.arg, target))


def _sum_all(expr: ir.SumAll, target: _Target) -> ir.Expr:
    inner = _jac(expr.arg, target)
    if is_scalar(expr.arg):
        return inner
    return matmul(ir.Transpose(ir.Ones(length(expr.arg.shape))), inner)


def _diag_times(weights: ir.Expr, jac: ir.Expr) -> ir.Expr:
    """diag(weights) @ jac, with scalar weights as a scale."""
    if is_scalar(weights):
        return scale(weights, jac)
    return matmul(ir.Diag(_column(weights)), jac)


def _hadamard(expr: ir.Hadamard, target: _Target) -> ir.Expr:
    left, right = expr.left, expr.right
    return ir.Add((
        _diag_times(right, _jac(left, target)),
        _diag_times(left, _jac(right, target)),
    ))


def _divide(expr: ir.Divide, target: _Target) -> ir.Expr:
    num, den = expr.left, expr.right
    first = _diag_times(ir.Power(den, sympy.Integer(-1)), _jac(num, target))
    if not ir.depends_on(den, {target.symbol.name}):
        return first
    ratio = ir.Divide(num, ir.Power(den, sympy.Integer(2)))
    second = _jac(den, target)
    if is_scalar(den) and not is_scalar(num):
        term = outer(_column(ratio), second)
    else:
        term = _diag_times(ratio, second)
    return ir.Add((first, scale(ir.Number(sympy.Integer(-1)), term)))


def _power(expr: ir.Power, target: _Target) -> ir.Expr:
    exponent = sympy.Rational(expr.exponent)
    base = expr.base
    two = ir.Number(sympy.Integer(2))
    if exponent == 2 and isinstance(base, ir.Norm) and base.p == "2" and _clipped(base.arg):
        # ||min(u, 0)||^2 (or max) is continuously differentiable: its gradient in u
        # is 2 min(u, 0), although min(u, 0) itself has a kink.
        return matmul(ir.Transpose(scale(two, _column(base.arg))),
                      _jac(_clipped(base.arg), target))
    if exponent == 2 and _clipped(base):
        return _diag_times(scale(two, base), _jac(_clipped(base), target))
    slope = scale(ir.Number(exponent), ir.Power(base, exponent - 1))
    return _diag_times(slope, _jac(base, target))


def _clipped(expr: ir.Expr) -> ir.Expr | None:
    """u when ``expr`` is min(u, 0) or max(u, 0) (either order), else None."""
    if not isinstance(expr, ir.Extremum):
        return None
    for side, other in ((expr.left, expr.right), (expr.right, expr.left)):
        if _is_zero(other):
            return side
    return None


def _is_zero(expr: ir.Expr) -> bool:
    return is_zero(expr.arg if isinstance(expr, ir.Broadcast) else expr)


def _apply(expr: ir.Apply, target: _Target) -> ir.Expr:
    arg = expr.arg
    derivative = lookup(expr.func).derivative
    if derivative is None:
        raise NotDifferentiable(f"{expr.func} is not differentiable everywhere")
    return _diag_times(derivative(arg, expr), _jac(arg, target))


def _norm(expr: ir.Norm, target: _Target) -> ir.Expr:
    if expr.p != "2":
        raise NotDifferentiable(f"the {expr.p}-norm is not differentiable")
    unit = ir.Divide(_column(expr.arg), expr)
    return matmul(ir.Transpose(unit), _jac(expr.arg, target))


def _extremum(expr: ir.Extremum, target: _Target) -> ir.Expr:
    """d max(l, r) = d r + diag(picks l) (d l - d r), likewise for min."""
    if not target.piecewise:
        raise NotDifferentiable(f"a {expr.kind} is not differentiable everywhere")
    left, right = expr.left, expr.right
    if length(left.shape) != length(right.shape):
        raise NotDifferentiable(f"a {expr.kind} of a scalar and a vector")
    jl, jr = _jac(left, target), _jac(right, target)
    step = _diag_times(Picks(expr.kind, left, right), ir.Add((jl, scale(MINUS, jr))))
    return ir.Add((jr, step))


def _log_sum_exp(expr: LogSumExp, target: _Target) -> ir.Expr:
    return matmul(ir.Transpose(Softmax(_column(expr.arg))), _jac(expr.arg, target))


def _inverse(expr: ir.Inverse, target: _Target) -> ir.Expr:
    if not is_scalar(expr.arg):
        raise NotDifferentiable("the inverse of a matrix that depends on the multipliers")
    return _power(ir.Power(expr.arg, sympy.Integer(-1)), target)


def _matmul(expr: ir.MatMul, target: _Target) -> ir.Expr:
    """Product rule on a chain; each dependent factor must be a vector."""
    parts: list[ir.Expr] = []
    factors = expr.factors
    for i, factor in enumerate(factors):
        if ir.depends_on(factor, {target.symbol.name}):
            parts.append(_chain_term(factors[:i], factor, factors[i + 1:], target))
    return ir.Add(tuple(parts))


def _chain_term(
    left: tuple[ir.Expr, ...], factor: ir.Expr, right: tuple[ir.Expr, ...], target: _Target
) -> ir.Expr:
    if factor.shape.cols == 1 and factor.shape.rows != 1:
        if not right or is_scalar(total(right)):
            inner = _jac(factor, target)
            head = matmul(*left, inner) if left else inner
            return scale(total(right), head) if right else head
    elif factor.shape.rows == 1:
        if not left or is_scalar(total(left)):
            inner = _jac(factor, target)
            head = matmul(ir.Transpose(total(right)), inner) if right else inner
            return scale(total(left), head) if left else head
    return _kron_term(left, factor, right, target)


def _kron_term(
    left: tuple[ir.Expr, ...], factor: ir.Expr, right: tuple[ir.Expr, ...], target: _Target
) -> ir.Expr:
    """d vec(L F R) = kron(L, R') d vec(F), an outer product or a matrix factor; for a
    transposed matrix in a product whose value is a vector, vec(L F' R) = kron(R', L) vec(F)
    (a vector's entries are in one order whichever way it stands)."""
    head = total(left) if left else ir.Identity(factor.shape.rows)
    tail = total(right) if right else ir.Identity(factor.shape.cols)
    whole = ir.Shape(head.shape.rows, tail.shape.cols)
    if isinstance(factor, ir.Transpose) and not is_vector_like(factor) and (
            whole.is_scalar or whole.rows == 1 or whole.cols == 1):
        return matmul(Kron(ir.Transpose(tail), head), _jac(factor.arg, target))
    return matmul(Kron(head, ir.Transpose(tail)), _jac(factor, target))


_RULES = {
    ir.Symbol: _symbol,
    ir.Add: _add,
    ir.Scale: _scale,
    ir.Transpose: _transpose,
    ir.Broadcast: _broadcast,
    ir.SumAll: _sum_all,
    ir.Hadamard: _hadamard,
    ir.Divide: _divide,
    ir.Power: _power,
    ir.Apply: _apply,
    ir.Norm: _norm,
    ir.MatMul: _matmul,
    ir.Inverse: _inverse,
    ir.Extremum: _extremum,
    LogSumExp: _log_sum_exp,
}

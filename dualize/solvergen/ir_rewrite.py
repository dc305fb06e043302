"""Rewrites of IR expressions that the numeric code printer relies on.

Five extra nodes live here, private to code generation: ``LogSumExp`` (so that
``log(1' exp(u))`` is printed as a stable library call rather than an overflow),
``Softmax`` (its gradient), ``Picks`` (which side a max or min takes, for the
piecewise derivative of a dual that is smooth as a whole), and ``Vec`` and ``Kron``
for the Jacobians of matrix-valued expressions: a matrix is differentiated as its
entries stacked row by row (``Vec``, numpy's order), and the product rule on ``L F R``
gives ``kron(L, R') d vec(F)`` (``Kron``; J. Magnus and H. Neudecker, Matrix
Differential Calculus, 1999, chapter 2, from memory, there with columns stacked).
``vec(u 1')`` has the Jacobian ``kron(I, 1)`` in ``u`` and ``vec(1 v')`` the
Jacobian ``kron(1, I)`` in ``v``; a product ``kron(A, B) vec(X)`` is rewritten to
``vec(A X B')`` so that no Kronecker product is formed where it is applied.  ``normalize`` pushes
transposes to the leaves, flattens product chains, lifts scalars out of chains
and distributes chains over sums, so that every product ends in the vector it is
applied to: that is what lets the printer evaluate ``X' (X w)`` instead of ``(X' X) w``.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import sympy

from dualize.model import expr as ir
from dualize.model.functions import EXP, LOG
from dualize.model.ops import is_zero


@dataclass(frozen=True)
class LogSumExp(ir.Expr):
    """log(sum(exp(arg))), recognised so that it is evaluated without overflow."""

    arg: ir.Expr
    span: object = None

    @property
    def shape(self) -> ir.Shape:
        return ir.SCALAR


@dataclass(frozen=True)
class Softmax(ir.Expr):
    """exp(arg) / sum(exp(arg)), the gradient of LogSumExp."""

    arg: ir.Expr
    span: object = None

    @property
    def shape(self) -> ir.Shape:
        return self.arg.shape


@dataclass(frozen=True)
class Picks(ir.Expr):
    """1 where max(left, right) (or min, by ``kind``) takes ``left``, else 0, entry by
    entry; ties take ``left``.  The selection a piecewise derivative follows."""

    kind: str
    left: ir.Expr
    right: ir.Expr
    span: object = None

    @property
    def shape(self) -> ir.Shape:
        return self.left.shape


@dataclass(frozen=True)
class Vec(ir.Expr):
    """The entries of a matrix stacked row by row into a column (numpy's ``reshape(-1)``)."""

    arg: ir.Expr
    span: object = None

    @property
    def shape(self) -> ir.Shape:
        return ir.Shape(length(self.arg.shape), sympy.Integer(1))


@dataclass(frozen=True)
class Kron(ir.Expr):
    """The Kronecker product: entry ((i, j), (k, l)) is left[i, k] * right[j, l], pairs
    numbered row by row, so that ``vec(L F R) = kron(L, R') vec(F)`` under ``Vec``."""

    left: ir.Expr
    right: ir.Expr
    span: object = None

    @property
    def shape(self) -> ir.Shape:
        left, right = self.left.shape, self.right.shape
        return ir.Shape(sympy.expand(left.rows * right.rows),
                        sympy.expand(left.cols * right.cols))


ONE = ir.Number(sympy.Integer(1))


def is_scalar(expr: ir.Expr) -> bool:
    return expr.shape.is_scalar


def is_vector_like(expr: ir.Expr) -> bool:
    """A column or a row vector (not a scalar)."""
    shape = expr.shape
    return not shape.is_scalar and (shape.rows == 1 or shape.cols == 1)


def length(shape: ir.Shape) -> sympy.Expr:
    return sympy.expand(shape.rows * shape.cols)


def scale(factor: ir.Expr, arg: ir.Expr) -> ir.Expr:
    return ir.Scale(factor, arg)


def matmul(*factors: ir.Expr) -> ir.Expr:
    return ir.MatMul(tuple(factors)) if len(factors) > 1 else factors[0]


def total(factors: tuple[ir.Expr, ...]) -> ir.Expr:
    return matmul(*factors)


def outer(column: ir.Expr, row: ir.Expr) -> ir.Expr:
    """column @ row, with a scalar on either side as a scale."""
    if is_scalar(row):
        return ir.Scale(row, column)
    if is_scalar(column):
        return ir.Scale(column, row)
    return ir.MatMul((column, row))


def normalize(expr: ir.Expr) -> ir.Expr:
    """Rewrite bottom-up until nothing changes (a few passes at most)."""
    for _ in range(12):
        new = _pass(expr)
        if new == expr:
            return new
        expr = new
    return expr


def _pass(expr: ir.Expr) -> ir.Expr:
    if isinstance(expr, ir.Block):
        return expr
    children = {}
    for name in ("arg", "left", "right", "base", "factor"):
        value = getattr(expr, name, None)
        if isinstance(value, ir.Expr):
            children[name] = _pass(value)
    for name in ("terms", "factors"):
        value = getattr(expr, name, None)
        if isinstance(value, tuple):
            children[name] = tuple(_pass(v) for v in value)
    rebuilt = replace(expr, **children) if children else expr
    rule = _RULES.get(type(rebuilt))
    return rule(rebuilt) if rule else rebuilt


def _is_number(expr: ir.Expr, value: int | None = None) -> bool:
    return isinstance(expr, ir.Number) and (value is None or expr.value == value)


def _zero_like(expr: ir.Expr) -> ir.Expr:
    return ir.Number(sympy.Integer(0)) if is_scalar(expr) else ir.Zero(expr.shape)


def _add(expr: ir.Add) -> ir.Expr:
    counts: dict[ir.Expr, sympy.Expr] = {}
    for term in _flat_terms(expr.terms):
        coeff, base = _split_coefficient(term)
        counts[base] = counts.get(base, sympy.Integer(0)) + coeff
    terms = tuple(_with_coefficient(c, b) for b, c in counts.items() if c != 0)
    numbers = [t for t in terms if isinstance(t, ir.Number)]
    if len(numbers) > 1:
        rest = tuple(t for t in terms if not isinstance(t, ir.Number))
        terms = (*rest, ir.Number(sympy.expand(sum(n.value for n in numbers))))
    if not terms:
        return _zero_like(expr)
    return terms[0] if len(terms) == 1 else ir.Add(terms)


def _flat_terms(terms: tuple[ir.Expr, ...]) -> list[ir.Expr]:
    out: list[ir.Expr] = []
    for term in terms:
        if isinstance(term, ir.Add):
            out.extend(_flat_terms(term.terms))
        elif not is_zero(term):
            out.append(term)
    return out


def _split_coefficient(term: ir.Expr) -> tuple[sympy.Expr, ir.Expr]:
    if isinstance(term, ir.Scale) and isinstance(term.factor, ir.Number):
        return term.factor.value, term.arg
    if isinstance(term, ir.Number) and term.value.is_Rational:
        return term.value, ONE
    return sympy.Integer(1), term


def _with_coefficient(coeff: sympy.Expr, base: ir.Expr) -> ir.Expr:
    if base == ONE:
        return ir.Number(coeff)
    return base if coeff == 1 else ir.Scale(ir.Number(coeff), base)


def _scale(expr: ir.Scale) -> ir.Expr:
    factor, arg = expr.factor, expr.arg
    if is_zero(factor) or is_zero(arg):
        return _zero_like(arg)
    if _is_number(factor, 1):
        return arg
    if isinstance(factor, ir.Number) and isinstance(arg, ir.Number):
        return ir.Number(sympy.expand(factor.value * arg.value))
    if isinstance(arg, ir.Scale) and isinstance(factor, ir.Number):
        if isinstance(arg.factor, ir.Number):
            return ir.Scale(ir.Number(factor.value * arg.factor.value), arg.arg)
    if is_scalar(arg) and isinstance(arg, ir.Number) and not isinstance(factor, ir.Number):
        return ir.Scale(arg, factor)
    return expr


def _transpose(expr: ir.Transpose) -> ir.Expr:
    arg = expr.arg
    if is_scalar(arg) or isinstance(arg, ir.Diag | ir.Identity):
        return arg
    if isinstance(arg, ir.Symbol) and "symmetric" in arg.facts | _SYMMETRIC_IMPLIED(arg):
        return arg
    if isinstance(arg, ir.Transpose):
        return arg.arg
    if isinstance(arg, ir.MatMul):
        return ir.MatMul(tuple(ir.Transpose(f) for f in reversed(arg.factors)))
    if isinstance(arg, ir.Add):
        return ir.Add(tuple(ir.Transpose(t) for t in arg.terms))
    if isinstance(arg, ir.Scale):
        return ir.Scale(arg.factor, ir.Transpose(arg.arg))
    if isinstance(arg, ir.Zero):
        return ir.Zero(arg.shape.transposed())
    if isinstance(arg, ir.Inverse):
        return ir.Inverse(ir.Transpose(arg.arg))
    if isinstance(arg, Kron):
        return Kron(ir.Transpose(arg.left), ir.Transpose(arg.right))
    return expr


def _SYMMETRIC_IMPLIED(symbol: ir.Symbol) -> frozenset[str]:  # noqa: N802 - reads as a set
    return frozenset({"symmetric"}) if symbol.facts & {"psd", "pd"} else frozenset()


def _matmul(expr: ir.MatMul) -> ir.Expr:
    factors: list[ir.Expr] = []
    scalars: list[ir.Expr] = []
    for factor in expr.factors:
        _collect_factor(factor, factors, scalars)
    if any(is_zero(f) for f in factors):
        return ir.Zero(expr.shape)
    factors = [f for f in factors if not isinstance(f, ir.Identity)] or factors[:1]
    factors = _kron_products(_merge_diagonals(factors))
    core = _distribute(factors) if factors else ONE
    core = _diagonal_to_elementwise(core)
    for scalar in reversed(scalars):
        core = ir.Scale(scalar, core)
    return core


def _collect_factor(factor: ir.Expr, factors: list[ir.Expr], scalars: list[ir.Expr]) -> None:
    if isinstance(factor, ir.MatMul):
        for inner in factor.factors:
            _collect_factor(inner, factors, scalars)
    elif isinstance(factor, ir.Scale):
        scalars.append(factor.factor)
        _collect_factor(factor.arg, factors, scalars)
    elif is_scalar(factor):
        scalars.append(factor)
    else:
        factors.append(factor)


def _distribute(factors: list[ir.Expr]) -> ir.Expr:
    for i, factor in enumerate(factors):
        if isinstance(factor, ir.Add):
            return ir.Add(tuple(
                ir.MatMul((*factors[:i], term, *factors[i + 1:])) for term in factor.terms
            ))
    return ir.MatMul(tuple(factors)) if len(factors) > 1 else factors[0]


def _merge_diagonals(factors: list[ir.Expr]) -> list[ir.Expr]:
    """diag(a) diag(b) is diag(a .* b)."""
    out: list[ir.Expr] = []
    for factor in factors:
        if out and isinstance(out[-1], ir.Diag) and isinstance(factor, ir.Diag):
            out[-1] = ir.Diag(ir.Hadamard(out[-1].arg, factor.arg))
        else:
            out.append(factor)
    return out


def _kron_products(factors: list[ir.Expr]) -> list[ir.Expr]:
    """kron(A, B) vec(X) is vec(A X B'), and vec(X)' kron(A, B) is vec(A' X B)': the
    Kronecker product is never formed where it is applied to a stacked matrix."""
    for i in range(len(factors) - 1):
        head, tail = factors[i], factors[i + 1]
        if isinstance(head, Kron) and isinstance(tail, Vec):
            left, right, inner = head.left, head.right, tail.arg
            if (left.shape.cols, right.shape.cols) == (inner.shape.rows, inner.shape.cols):
                product = Vec(ir.MatMul((left, inner, ir.Transpose(right))))
                return [*factors[:i], product, *factors[i + 2:]]
        if isinstance(head, ir.Transpose) and isinstance(head.arg, Vec) and \
                isinstance(tail, Kron):
            left, right, inner = tail.left, tail.right, head.arg.arg
            if (left.shape.rows, right.shape.rows) == (inner.shape.rows, inner.shape.cols):
                product = Vec(ir.MatMul((ir.Transpose(left), inner, right)))
                return [*factors[:i], ir.Transpose(product), *factors[i + 2:]]
    return factors


def _vec(expr: Vec) -> ir.Expr:
    """A vector stacked is itself (a row becomes a column); scalars and zeros come out."""
    arg = expr.arg
    if is_scalar(arg) or arg.shape.cols == 1:
        return arg
    if arg.shape.rows == 1:
        return ir.Transpose(arg)
    if isinstance(arg, ir.Zero):
        return ir.Zero(expr.shape)
    if isinstance(arg, ir.Scale):
        return ir.Scale(arg.factor, Vec(arg.arg))
    return expr


def _kron(expr: Kron) -> ir.Expr:
    """Scales come out; ones with ones and identity with identity are one of a kind."""
    left, right = expr.left, expr.right
    if is_zero(left) or is_zero(right):
        return ir.Zero(expr.shape)
    for side, other in ((left, right), (right, left)):
        if is_scalar(side):
            return ir.Scale(side, other)
    if isinstance(left, ir.Scale):
        return ir.Scale(left.factor, Kron(left.arg, right))
    if isinstance(right, ir.Scale):
        return ir.Scale(right.factor, Kron(left, right.arg))
    if isinstance(left, ir.Identity) and isinstance(right, ir.Identity):
        return ir.Identity(expr.shape.rows)
    if isinstance(left, ir.Ones) and isinstance(right, ir.Ones):
        return ir.Ones(expr.shape.rows)
    if isinstance(left, ir.Transpose) and isinstance(right, ir.Transpose) and \
            isinstance(left.arg, ir.Ones) and isinstance(right.arg, ir.Ones):
        return ir.Transpose(ir.Ones(expr.shape.cols))
    return expr


def _diagonal_to_elementwise(expr: ir.Expr) -> ir.Expr:
    """diag(d) @ (vector tail) is d .* tail; (row head) @ diag(d) is (d .* head')'."""
    if not isinstance(expr, ir.MatMul):
        return expr
    factors = expr.factors
    for i, factor in enumerate(factors):
        if not isinstance(factor, ir.Diag):
            continue
        tail = factors[i + 1:]
        if tail and total(tail).shape.cols == 1:
            return matmul(*factors[:i], ir.Hadamard(factor.arg, total(tail)))
        head = factors[:i]
        if head and total(head).shape.rows == 1:
            row = ir.Transpose(ir.Hadamard(factor.arg, ir.Transpose(total(head))))
            return matmul(row, *tail)
    return expr


def _hadamard(expr: ir.Hadamard) -> ir.Expr:
    left, right = expr.left, expr.right
    if is_zero(left) or is_zero(right):
        return ir.Zero(expr.shape)
    for one, other in ((left, right), (right, left)):
        if isinstance(one, ir.Power) and one.exponent == -1 and one.base == other:
            return ir.Ones(length(expr.shape)) if not is_scalar(expr) else ONE
        if isinstance(one, ir.Ones):
            return other
        if isinstance(one, ir.Broadcast):
            return ir.Scale(one.arg, other)
        if is_scalar(one) and not is_scalar(other):
            return ir.Scale(one, other)
    return expr


def _power(expr: ir.Power) -> ir.Expr:
    if expr.exponent == 1:
        return expr.base
    if isinstance(expr.base, ir.Number) and expr.base.value.is_Rational and expr.exponent > 0:
        if sympy.Rational(expr.exponent).q == 1:
            return ir.Number(expr.base.value ** expr.exponent)
    return expr


def _apply(expr: ir.Apply) -> ir.Expr:
    return expr


def _log(expr: ir.Apply) -> ir.Expr:
    """log(sum(exp(u))) in either spelling becomes LogSumExp(u)."""
    arg = expr.arg
    if expr.func != LOG.name:
        return expr
    inner = None
    if isinstance(arg, ir.SumAll):
        inner = arg.arg
    elif isinstance(arg, ir.MatMul) and len(arg.factors) == 2:
        head, tail = arg.factors
        if head == ir.Transpose(ir.Ones(tail.shape.rows)) or (
            isinstance(head, ir.Transpose) and isinstance(head.arg, ir.Ones)
        ):
            inner = tail
    if isinstance(inner, ir.Apply) and inner.func == EXP.name:
        return LogSumExp(inner.arg)
    return expr


def _inverse(expr: ir.Inverse) -> ir.Expr:
    if is_scalar(expr.arg):
        return ir.Power(expr.arg, sympy.Integer(-1))
    return expr


def _diag(expr: ir.Diag) -> ir.Expr:
    if isinstance(expr.arg, ir.Ones):
        return ir.Identity(expr.arg.n)
    return expr


_RULES = {
    ir.Add: _add,
    ir.Scale: _scale,
    ir.Transpose: _transpose,
    ir.MatMul: _matmul,
    ir.Hadamard: _hadamard,
    ir.Power: _power,
    ir.Apply: _log,
    ir.Inverse: _inverse,
    ir.Diag: _diag,
    Vec: _vec,
    Kron: _kron,
}

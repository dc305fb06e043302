"""IR constructors for the operators, with shape checks and the IR's conventions.

The derivation engine relies on these conventions exactly: a scalar times
anything is ``Scale``; matrix products are flat ``MatMul`` chains of non-scalar
factors; ``a - b`` is ``Add((a, Scale(-1, b)))``; a scalar meeting a non-scalar
in an elementwise operation is ``Broadcast`` (``Zero`` for the literal 0);
two number literals fold into one exact ``Number``.
"""

from __future__ import annotations

import sympy

from dualize.model import rules as M
from dualize.model.expr import (
    Add,
    Broadcast,
    Divide,
    Expr,
    Hadamard,
    MatMul,
    Number,
    Scale,
    Shape,
    Transpose,
    Zero,
)
from dualize.model.scope import Scope
from dualize.syntax.span import Span

MINUS_ONE = sympy.Integer(-1)


def number(value: sympy.Expr, span: Span | None) -> Number:
    return Number(value, span=span)


def is_zero(e: Expr | None) -> bool:
    """The one zero test: a Zero block, the number 0, or an absent term (None)."""
    return e is None or isinstance(e, Zero) or (isinstance(e, Number) and e.value == 0)


def broadcast(e: Expr, target: Shape) -> Expr:
    """A scalar spread over ``target``; the literal 0 becomes Zero."""
    if e.shape == target:
        return e
    if isinstance(e, Number) and e.value == 0:
        return Zero(target, span=e.span)
    return Broadcast(e, target, span=e.span)


def conform(a: Expr, b: Expr, what: str, scope: Scope, span: Span) -> tuple[Expr, Expr]:
    """Both operands at one shape, broadcasting a scalar side; else a shape mismatch."""
    if a.shape == b.shape:
        return a, b
    if a.shape.is_scalar:
        return broadcast(a, b.shape), b
    if b.shape.is_scalar:
        return a, broadcast(b, a.shape)
    raise scope.fail(M.SHAPE_MISMATCH, span, what=what, left=f"a {a.shape}",
                     right=f"a {b.shape}")


def negate(e: Expr, span: Span | None) -> Expr:
    if isinstance(e, Number):
        return number(-e.value, span)
    return Scale(Number(MINUS_ONE, span=span), e, span=span)


def add(a: Expr, b: Expr, scope: Scope, span: Span) -> Expr:
    if isinstance(a, Number) and isinstance(b, Number):
        return number(a.value + b.value, span)
    a, b = conform(a, b, "in a sum", scope, span)
    return Add(_terms(a) + _terms(b), span=span)


def sub(a: Expr, b: Expr, scope: Scope, span: Span) -> Expr:
    if isinstance(a, Number) and isinstance(b, Number):
        return number(a.value - b.value, span)
    a, b = conform(a, b, "in a difference", scope, span)
    return difference(a, b, span)


def difference(a: Expr, b: Expr, span: Span | None) -> Expr:
    """``a - b`` for operands of one shape, dropping a zero side."""
    if is_zero(b):
        return a
    if is_zero(a):
        return Scale(Number(MINUS_ONE, span=b.span), b, span=span)
    return Add(_terms(a) + (Scale(Number(MINUS_ONE, span=b.span), b, span=b.span),), span=span)


def _terms(e: Expr) -> tuple[Expr, ...]:
    return e.terms if isinstance(e, Add) else (e,)


def multiply(a: Expr, b: Expr, scope: Scope, span: Span) -> Expr:
    """``*``: Scale when a side is scalar, else a conformable matrix product.

    A scale factor met inside a product is pulled out front, so that
    ``1/2 * x' * P * x`` is ``Scale(1/2, MatMul(x', P, x))`` and matrix products
    never hold a scaled factor.
    """
    if isinstance(a, Number) and isinstance(b, Number):
        return number(a.value * b.value, span)
    if a.shape.is_scalar:
        return Scale(a, b, span=span)
    if b.shape.is_scalar:
        return Scale(b, a, span=span)
    if isinstance(a, Scale):
        return Scale(a.factor, multiply(a.arg, b, scope, span), span=span)
    if isinstance(b, Scale):
        return Scale(b.factor, multiply(a, b.arg, scope, span), span=span)
    if a.shape.cols != b.shape.rows:
        raise scope.fail(M.SHAPE_MISMATCH, span, what="in a matrix product",
                         left=f"a {a.shape}", right=f"a {b.shape}",
                         hint="use .* for the elementwise product, or transpose with '")
    return MatMul(_factors(a) + _factors(b), span=span)


def _factors(e: Expr) -> tuple[Expr, ...]:
    return e.factors if isinstance(e, MatMul) else (e,)


def hadamard(a: Expr, b: Expr, scope: Scope, span: Span) -> Expr:
    if a.shape.is_scalar or b.shape.is_scalar:
        return multiply(a, b, scope, span)
    a, b = conform(a, b, "in an elementwise product", scope, span)
    return Hadamard(a, b, span=span)


def divide(a: Expr, b: Expr, scope: Scope, span: Span, elementwise: bool) -> Expr:
    """``/`` needs a scalar denominator; ``./`` broadcasts a scalar numerator."""
    if is_zero(b):
        raise scope.fail(M.DIVISION_BY_ZERO, b.span or span)
    if isinstance(b, Number):
        if isinstance(a, Number):
            return number(a.value / b.value, span)
        return Scale(number(1 / b.value, b.span), a, span=span)
    if b.shape.is_scalar:
        return Divide(a, b, span=span)
    if not elementwise:
        raise scope.fail(M.SHAPE_MISMATCH, span, what="in a division", left=f"a {a.shape}",
                         right=f"a {b.shape}", hint="use ./ to divide elementwise")
    a, b = conform(a, b, "in an elementwise division", scope, span)
    return Divide(a, b, span=span)


def transpose(e: Expr, span: Span) -> Expr:
    """e' ; a scalar's transpose is the scalar, and e'' is e."""
    if e.shape.is_scalar:
        return e
    if isinstance(e, Transpose):
        return e.arg
    return Transpose(e, span=span)

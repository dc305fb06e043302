"""Scalar quotients as papers write them: ``\\frac{3\\lambda}{1 + \\lambda}``.

The engine keeps a scalar division as a product with a reciprocal
(``6 lambda (2 lambda + 2)^-1``), which is exact but reads badly.  A printer asks
``as_quotient`` for the numerator and the denominator of such a product, with
the numeric content of a one-sum denominator cancelled into the coefficient.
"""

from __future__ import annotations

from dataclasses import dataclass

import sympy

from dualize.model import expr as ir
from dualize.render import structure as st


@dataclass(frozen=True)
class Quotient:
    """``top / bottom`` times ``rest`` (a non-scalar factor the quotient scales, or None)."""

    top: ir.Expr
    bottom: ir.Expr
    rest: ir.Expr | None


def as_quotient(node: ir.Scale) -> Quotient | None:
    """The product as a quotient when some scalar factor is a reciprocal, else None."""
    factors, arg = st.scalar_factors(node)
    items = list(factors) + ([arg] if arg.shape.is_scalar else [])
    coefficient = sympy.Integer(1)
    top: list[ir.Expr] = []
    bottom: list[ir.Expr] = []
    rest: list[ir.Expr] = [] if arg.shape.is_scalar else [arg]
    while any(isinstance(i, ir.Divide) and i.shape.is_scalar for i in items):
        quotient = next(i for i in items if isinstance(i, ir.Divide) and i.shape.is_scalar)
        items.remove(quotient)
        items += [quotient.left, ir.Power(quotient.right, sympy.Integer(-1))]
    for item in items:
        base = reciprocal_of(item)
        if base is not None:
            bottom.append(base)
        elif isinstance(item, ir.Number) and st.number_value(item.value).is_Rational:
            coefficient *= st.number_value(item.value)
        elif _simple(item):
            top.append(item)
        else:
            rest.insert(len(rest) - (0 if arg.shape.is_scalar else 1), item)
    if not bottom or coefficient <= 0:
        return None
    if len(bottom) == 1 and isinstance(bottom[0], ir.Add):
        content = sum_content(bottom[0])
        bottom, coefficient = [divide_terms(bottom[0], content)], coefficient / content
    return _assemble(coefficient, top, bottom, rest)


def _simple(factor: ir.Expr) -> bool:
    """A factor that reads well above a fraction bar (a name, a power of one, a sum);
    a compound product such as a quadratic form stays after the fraction."""
    if isinstance(factor, ir.Power):
        factor = factor.base
    return isinstance(factor, ir.Symbol | ir.Add | ir.Apply | ir.Norm)


def _assemble(coefficient: sympy.Rational, top: list[ir.Expr], bottom: list[ir.Expr],
              rest: list[ir.Expr]) -> Quotient:
    if coefficient.p != 1 or not top:
        top = [ir.Number(sympy.Integer(coefficient.p))] + top
    if coefficient.q != 1:
        bottom = [ir.Number(sympy.Integer(coefficient.q))] + bottom
    return Quotient(product(top), product(bottom), product(rest) if rest else None)


def product(factors: list[ir.Expr]) -> ir.Expr:
    """Scalar factors multiplied in the order given."""
    out = factors[-1]
    for factor in reversed(factors[:-1]):
        out = ir.Scale(factor, out)
    return out


def reciprocal_of(node: ir.Expr) -> ir.Expr | None:
    """``b`` for a scalar ``b^-1`` (``b^k`` for ``b^-k``), else None."""
    if not node.shape.is_scalar:
        return None
    if isinstance(node, ir.Inverse):
        return node.arg
    if isinstance(node, ir.Power) and sympy.Rational(node.exponent) < 0:
        exponent = -sympy.Rational(node.exponent)
        return node.base if exponent == 1 else ir.Power(node.base, exponent)
    return None


def sum_content(node: ir.Add) -> sympy.Rational:
    """The largest positive rational dividing every term's coefficient (1 if none shows)."""
    content = sympy.Integer(0)
    for term in st.flat_terms(node):
        content = sympy.gcd(content, abs(_coefficient(term)))
    return content if content > 0 else sympy.Integer(1)


def _coefficient(term: ir.Expr) -> sympy.Rational:
    if isinstance(term, ir.Number) and st.number_value(term.value).is_Rational:
        return st.number_value(term.value)
    if isinstance(term, ir.Scale) and isinstance(term.factor, ir.Number):
        value = st.number_value(term.factor.value)
        return value if value.is_Rational else sympy.Integer(1)
    return sympy.Integer(1)


def divide_terms(node: ir.Add, content: sympy.Rational) -> ir.Expr:
    """Each term of the sum divided by ``content``, a divisor of every coefficient."""
    if content == 1:
        return node
    return ir.Add(tuple(_divide(t, content) for t in st.flat_terms(node)))


def _divide(term: ir.Expr, content: sympy.Rational) -> ir.Expr:
    if isinstance(term, ir.Number):
        return ir.Number(st.number_value(term.value) / content)
    coefficient = _coefficient(term)
    if isinstance(term, ir.Scale) and isinstance(term.factor, ir.Number) and (
            coefficient == st.number_value(term.factor.value)):
        term = term.arg
    value = coefficient / content
    return term if value == 1 else ir.Scale(ir.Number(value), term)

"""Equality through rational-function normal forms, for the symbolic half of a check.

``same_expression`` proves equality by the rules of linear algebra on the IR;
it does not put a sum over a common denominator, so ``8 w - 9 w^2/(w + 1) + 1``
and ``(9 w + 1 - w^2)/(w + 1)`` stayed unproved.  Here the difference of the
two sides is expanded into terms ``coefficient x scalars x chain``; the terms are
grouped by their matrix chain (a product of matrices and vectors, kept in order,
so sizes may stay symbolic), and each group's scalar coefficient is a rational
function in the scalar pieces, which sympy's ``together`` and ``cancel`` bring to
a normal form.  The sides are equal when every group cancels to zero: an
identity of rational functions, valid wherever both sides are defined.

Scalar pieces sympy cannot read (an inner product, a norm) become opaque symbols,
one per distinct piece, so a proof never rests on what a piece is.
"""

from __future__ import annotations

from collections import defaultdict

from dualize.model.expr import Expr


def same_rational_form(a: Expr, c: Expr) -> bool:
    """True when ``a - c`` cancels to zero as rational functions, chain by chain."""
    if a.shape != c.shape:
        return False
    groups = _grouped(a, c)
    if groups is None:
        return False
    return all(_cancels(total) for total in groups.values())


def _grouped(a: Expr, c: Expr) -> dict[tuple[str, ...], object] | None:
    """The scalar coefficient of each matrix chain in ``a - c``, as sympy expressions."""
    import sympy

    from dualize.duality import build as b
    from dualize.duality.keys import node_key
    from dualize.duality.normal import expand
    from dualize.duality.scalar import Scope, to_sympy

    scope = Scope()
    totals: dict[tuple[str, ...], sympy.Expr] = defaultdict(lambda: sympy.Integer(0))
    terms = expand(b.sub(a, c), keep_forms=False)
    for term in terms:
        key = tuple(node_key(f) for f in term.chain)
        value = term.coef
        for scalar in term.scalars:
            value = value * to_sympy(scalar, scope)
        totals[key] = totals[key] + value
    return dict(totals)


def _cancels(total: object) -> bool:
    """Whether a rational function is identically zero (numerator cancels)."""
    import sympy

    try:
        return sympy.cancel(sympy.together(sympy.expand(total))) == 0
    except (sympy.PolynomialError, TypeError, ValueError):
        return False

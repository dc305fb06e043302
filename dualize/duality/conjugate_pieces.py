"""The Legendre transform of a piecewise-defined convex function.

For a convex phi that is continuously differentiable and given by pieces on
consecutive intervals (Huber's function: t^2/2 on |t| <= 1, |t| - 1/2 beyond),
phi' is continuous and nondecreasing, so phi'(t) = s is solved piece by piece:
a strictly convex piece contributes its Legendre transform on the range of its
derivative, an affine piece only the single slope s = a (already an end of a
neighbouring range).  The conjugate is the transform of the strictly convex
pieces on the union of their ranges (R. T. Rockafellar, Convex Analysis, 1970,
section 26, from memory).  The result is checked numerically against the
definition by the caller, like every other conjugate.
"""

from __future__ import annotations

import sympy


def pieces(phi: sympy.Piecewise, t: sympy.Symbol,
           dom: sympy.Interval) -> list[tuple[sympy.Expr, sympy.Interval]]:
    """(expression, interval) for each piece of phi inside dom, unions split, in order."""
    out: list[tuple[sympy.Expr, sympy.Interval]] = []
    for expr, where in phi.as_expr_set_pairs(dom):
        parts = where.args if isinstance(where, sympy.Union) else (where,)
        for part in parts:
            if not isinstance(part, sympy.Interval):
                raise ValueError(f"a piece of {phi} is not on an interval: {part}")
            out.append((_signed(expr, t, part), part))
    return sorted(out, key=lambda p: float(p[1].inf) if p[1].inf.is_finite else -1e300)


def normalized(phi: sympy.Piecewise, t: sympy.Symbol, dom: sympy.Interval) -> sympy.Piecewise:
    """phi with each piece simplified by the sign of t on its interval and conditioned on
    that interval, so derivatives of every order are plain (no |t|, no sign(t))."""
    found = pieces(phi, t, dom)
    return sympy.Piecewise(*((e, i.as_relational(t)) for e, i in found[:-1]),
                           (found[-1][0], True))


def _signed(expr: sympy.Expr, t: sympy.Symbol, part: sympy.Interval) -> sympy.Expr:
    """``expr`` simplified with the sign of t on ``part`` (|t| is t on t >= 0)."""
    p = sympy.Dummy("p", positive=True)
    if (part.inf >= 0) is sympy.true:
        return sympy.simplify(expr.subs(t, p)).subs(p, t)
    if (part.sup <= 0) is sympy.true:
        return sympy.simplify(expr.subs(t, -p)).subs(p, -t)
    return expr


def strictly_convex_pieces(phi: sympy.Piecewise, t: sympy.Symbol,
                           dom: sympy.Interval) -> list[tuple[sympy.Expr, sympy.Interval]]:
    """The pieces whose derivative depends on t, and the slopes of the affine ones.

    Raises ValueError when phi' jumps between pieces (not C^1: the conjugate then has
    affine pieces this rule does not build) or when no piece is strictly convex.
    """
    found = pieces(phi, t, dom)
    curved = [(e, i) for e, i in found if t in sympy.diff(e, t).free_symbols]
    for (e1, i1), (e2, _) in zip(found, found[1:], strict=False):
        joint = i1.sup
        left = sympy.limit(sympy.diff(e1, t), t, joint, "-")
        right = sympy.limit(sympy.diff(e2, t), t, joint, "+")
        if sympy.simplify(left - right) != 0:
            raise ValueError(f"the derivative of {phi} jumps at {joint}")
    if len(curved) != 1:
        raise ValueError("only one strictly convex piece is supported")
    return curved

"""The value of an expression at the origin of its variables, folded to a simpler IR.

The structural Slater candidate on symbolic data puts every variable at zero:
``||x|| - r`` becomes ``-r``, which the declared fact ``r in R_++`` signs as
negative.  Folding knows only exact identities (0 * a = 0, ||0|| = 0, exp(0) = 1).
"""

from __future__ import annotations

from collections.abc import Mapping

import sympy

from dualize.analysis import sign_rules as S
from dualize.model import expr as E
from dualize.model.functions import lookup


class Undefined(Exception):
    """The expression is not defined at the candidate (log(0), 1/0)."""


def at_zero(node: E.Expr, names: frozenset[str]) -> E.Expr:
    """``node`` with the variables in ``names`` set to zero, folded."""
    return _fold(node, names)


def _zero(node: E.Expr) -> E.Zero:
    return E.Zero(node.shape)


def _fold(node: E.Expr, names: frozenset[str]) -> E.Expr:
    if isinstance(node, E.Symbol):
        return _zero(node) if node.name in names else node
    kids = [_fold(k, names) for k in node.children()]
    zeros = [isinstance(k, E.Zero) for k in kids]
    if isinstance(node, E.Add):
        rest = tuple(k for k in kids if not isinstance(k, E.Zero))
        return _zero(node) if not rest else (rest[0] if len(rest) == 1 else E.Add(rest))
    if isinstance(node, (E.MatMul, E.Scale, E.Hadamard)) and any(zeros):
        return _zero(node)
    if isinstance(node, (E.Transpose, E.Norm, E.SumAll, E.Diag, E.Trace, E.Broadcast)):
        return _zero(node) if zeros[0] else _rebuild(node, kids)
    if isinstance(node, E.Power) and zeros[0]:
        if node.exponent <= 0:
            raise Undefined("a nonpositive power of zero")
        return _zero(node)
    if isinstance(node, E.Apply) and zeros[0]:
        return _apply_zero(node)
    if isinstance(node, E.Divide) and zeros[0]:
        if S.sign(kids[1]) in ("pos", "neg"):
            return _zero(node)
        raise Undefined("a division by an expression that may vanish")
    return _rebuild(node, kids)


def _apply_zero(node: E.Apply) -> E.Expr:
    """f(0) from the function table: 0 and 1 fold, an undefined value stops the candidate."""
    value = lookup(node.func).to_sympy(sympy.Integer(0))
    if value.has(sympy.zoo, sympy.nan) or value.is_finite is not True:
        raise Undefined(f"{node.func}(0)")
    if value == 0:
        return _zero(node)  # abs(0) = sqrt(0) = 0
    if value == 1:
        one = E.Number(sympy.Integer(1)) if node.shape.is_scalar else E.Ones(node.shape.rows)
        return one if node.shape.is_scalar or node.shape.cols == 1 else E.Broadcast(
            E.Number(sympy.Integer(1)), node.shape)
    return E.Apply(node.func, _zero(node.arg))


def _rebuild(node: E.Expr, kids: list[E.Expr]) -> E.Expr:
    from dataclasses import fields, replace

    if isinstance(node, E.Block) or not kids:
        return node
    changes: dict[str, object] = {}
    it = iter(kids)
    for f in fields(node):  # type: ignore[arg-type]
        value = getattr(node, f.name)
        if isinstance(value, E.Expr):
            changes[f.name] = next(it)
        elif isinstance(value, tuple) and value and isinstance(value[0], E.Expr):
            changes[f.name] = tuple(next(it) for _ in value)
    return replace(node, **changes)  # type: ignore[type-var]


def sign_at_zero(node: E.Expr, names: frozenset[str],
                 domains: Mapping[str, S.Sign] | None = None) -> S.Sign:
    """Entrywise sign of ``node`` at the origin, or "unknown" where it is undefined."""
    try:
        folded = at_zero(node, names)
    except Undefined:
        return "unknown"
    return S.sign(folded, domains)

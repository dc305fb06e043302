"""Recognisers for building blocks written as mathematics: e'Me, log-sum-exp.

The language has no named functions for these (docs/language.md, section 4,
"Functions"), so the analysis finds them by shape.
"""

from __future__ import annotations

from dualize.model import expr as E
from dualize.model.functions import EXP


def transpose_of(node: E.Expr) -> E.Expr:
    """The transpose, pushed through products and sums, with symmetric data fixed."""
    if isinstance(node, E.Transpose):
        return node.arg
    if isinstance(node, E.MatMul):
        return E.MatMul(tuple(transpose_of(f) for f in reversed(node.factors)))
    if isinstance(node, E.Add):
        return E.Add(tuple(transpose_of(t) for t in node.terms))
    if isinstance(node, E.Scale):
        return E.Scale(node.factor, transpose_of(node.arg))
    if node.shape.is_scalar or isinstance(node, (E.Identity, E.Zero, E.Diag)):
        return node
    if isinstance(node, E.Symbol) and node.facts & {"symmetric", "psd", "pd"}:
        return node
    return E.Transpose(node)


def _scalar_part(f: E.Expr) -> tuple[list[E.Expr], E.Expr]:
    """A factor ``c * A`` (or ``(c * A)'``) as ([c], A), so products can be reordered."""
    if isinstance(f, E.Scale):
        inner, rest = _scalar_part(f.arg)
        return [f.factor] + inner, rest
    if isinstance(f, E.Transpose) and isinstance(f.arg, E.Scale):
        inner, rest = _scalar_part(f.arg.arg)
        return [f.arg.factor] + inner, E.Transpose(rest)
    return [], f


def pull_scalars(node: E.MatMul) -> E.Expr:
    """``A (c B) C`` as ``c (A B C)``: scalar factors moved out of a matrix product."""
    scalars: list[E.Expr] = []
    factors: list[E.Expr] = []
    for f in node.factors:
        cs, rest = _scalar_part(f)
        scalars += cs
        factors.append(rest)
    out: E.Expr = E.MatMul(tuple(factors))
    for c in reversed(scalars):
        out = E.Scale(c, out)
    return out


def _flat(factors: tuple[E.Expr, ...]) -> list[E.Expr]:
    out: list[E.Expr] = []
    for f in factors:
        out.extend(_flat(f.factors) if isinstance(f, E.MatMul) else [f])
    return out


def _product(factors: list[E.Expr]) -> E.Expr:
    return factors[0] if len(factors) == 1 else E.MatMul(tuple(factors))


def gram_middle(factors: tuple[E.Expr, ...]) -> tuple[E.Expr, E.Expr | None] | None:
    """Split ``F1 ... Fk`` as ``e' M e``: return (e, M) (M None when absent), or None.

    Tries every split, longest ``e`` first, so ``x' A' A x`` reads as ``(A x)'(A x)``.
    """
    fs = _flat(factors)
    for k in range(len(fs) // 2, 0, -1):
        right = _product(fs[len(fs) - k:])
        left = _product(fs[:k])
        if _same(transpose_of(left), right):
            middle = fs[k:len(fs) - k]
            return right, (_product(middle) if middle else None)
    return None


def _same(a: E.Expr, b: E.Expr) -> bool:
    if a == b:
        return True
    if isinstance(a, E.MatMul) and isinstance(b, E.MatMul):
        return _flat(a.factors) == _flat(b.factors)
    return False


def is_log_sum_exp(node: E.Apply) -> E.Expr | None:
    """For ``log(sum(exp(e)))`` (or ``log(exp(a) + exp(b) + ...)``) the argument, else None."""
    arg = node.arg
    if isinstance(arg, E.SumAll) and isinstance(arg.arg, E.Apply) and arg.arg.func == EXP.name:
        return arg.arg.arg
    if isinstance(arg, E.Add) and all(isinstance(t, E.Apply) and t.func == EXP.name
                                      for t in arg.terms):
        return E.Add(tuple(t.arg for t in arg.terms))  # curvature of the sum decides
    return None

"""Is a matrix expression symmetric by construction?

The semidefinite order compares symmetric matrices.  This is a structural test,
sound but not complete: True means symmetric for every value of the data and the
variables (symbols with the ``symmetric`` fact, A' S A, S + S', diag(v), ...).
"""

from __future__ import annotations

from dualize.model.expr import (
    Add,
    Apply,
    Broadcast,
    Diag,
    Expr,
    Extremum,
    Hadamard,
    Identity,
    Inverse,
    MatMul,
    Number,
    Power,
    Scale,
    Symbol,
    Transpose,
    Zero,
)


def transposed(e: Expr) -> Expr:
    """e' in a canonical form: transposes pushed into products, dropped on symmetric parts."""
    if isinstance(e, Transpose):
        return _canon(e.arg)
    if is_symmetric(e):
        return _canon(e)
    if isinstance(e, MatMul):
        return MatMul(tuple(transposed(f) for f in reversed(e.factors)))
    if isinstance(e, Scale):
        return Scale(e.factor, transposed(e.arg))
    if isinstance(e, Add):
        return Add(tuple(transposed(t) for t in e.terms))
    return Transpose(e)


def is_symmetric(e: Expr) -> bool:
    if e.shape.is_scalar or isinstance(e, Zero | Identity | Diag | Number):
        return e.shape.is_square
    if isinstance(e, Symbol):
        return "symmetric" in e.facts
    if isinstance(e, Broadcast):
        return e.shape.is_square
    if isinstance(e, Transpose | Inverse | Power | Apply | Scale):
        return is_symmetric(e.children()[-1])
    if isinstance(e, Hadamard | Extremum):
        return is_symmetric(e.left) and is_symmetric(e.right)
    if isinstance(e, MatMul):
        return _palindrome(e.factors)
    if isinstance(e, Add):
        return _closed_under_transpose(e.terms)
    return False


def _canon(e: Expr) -> Expr:
    """S' is written S when S is symmetric, so that comparisons see one form."""
    if isinstance(e, Transpose) and is_symmetric(e.arg):
        return e.arg
    return e


def _palindrome(factors: tuple[Expr, ...]) -> bool:
    """A B ... B' A' with a symmetric middle factor (or none)."""
    n = len(factors)
    for i in range(n // 2):
        if transposed(factors[i]) != _canon(factors[n - 1 - i]):
            return False
    return n % 2 == 0 or is_symmetric(factors[n // 2])


def _closed_under_transpose(terms: tuple[Expr, ...]) -> bool:
    """Every non-symmetric term is matched by its transpose (A X + X A')."""
    pending = [t for t in terms if not is_symmetric(t)]
    while pending:
        first = pending.pop(0)
        mate = transposed(first)
        pending = [_canon(t) for t in pending]
        if mate not in pending:
            return False
        pending.remove(mate)
    return True

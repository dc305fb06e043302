"""The kernel reading of a dual: data that enter only through a Gram matrix.

When a data matrix X (rows x_i) appears in the dual only inside the product
X X' (the inner products x_i'x_j), the dual is a function of that Gram matrix
alone, so replacing X X' by a kernel matrix K gives the kernel machine, and a
primal recovered as w = X' c makes the decision function w'x = sum_i c_i x_i'x
a kernel expansion (B. Schoelkopf and A. Smola, Learning with Kernels, 2002,
chapter 7, from memory).
"""

from __future__ import annotations

from dualize.duality.result import DualProblem, Recovery
from dualize.model.expr import Expr, MatMul, Symbol, Transpose, walk


def gram_only(exprs: list[Expr], X: Symbol) -> bool:
    """Whether every occurrence of X in ``exprs`` is in an X X' pair of a product."""
    total = sum(1 for e in exprs for n in walk(e) if n == X)
    if total == 0:
        return False
    paired = 0
    for e in exprs:
        for n in walk(e):
            if isinstance(n, MatMul):
                f = n.factors
                paired += 2 * sum(1 for a, c in zip(f, f[1:], strict=False)
                                  if a == X and c == Transpose(X))
    return paired == total


def kernel_notes(dual: DualProblem, recovery: list[Recovery]) -> list[str]:
    """A note for each non-square data matrix that the dual sees only through X X'."""
    exprs = [dual.objective] + [c.lhs for c in dual.constraints] + [
        c.rhs for c in dual.constraints]
    matrices = sorted({n for e in exprs for n in walk(e) if isinstance(n, Symbol)
                       and n.role == "data" and not n.shape.is_scalar
                       and not n.shape.is_vector and "symmetric" not in n.facts},
                      key=lambda s: s.name)
    notes = []
    for X in matrices:
        if not gram_only(exprs, X):
            continue
        expansion = [r.variable for r in recovery if r.formula is not None
                     and _starts_with_transpose(r.formula, X)]
        text = (f"The data {X.name} enter the dual only through the Gram matrix "
                f"{X.name} {X.name}' of inner products of its rows; replacing it by a kernel "
                "matrix K gives the kernel form of this dual")
        if expansion:
            w = expansion[0]
            text += (f", and since {w} = {X.name}' c for the coefficients c shown, the "
                     f"linear function of a new point t, {w}'t = sum_i c_i x_i't (x_i the rows of "
                     f"{X.name}) is the kernel expansion sum_i c_i k(x_i, t)")
        notes.append(text + ".")
    return notes


def _starts_with_transpose(e: Expr, X: Symbol) -> bool:
    from dualize.model.expr import Scale

    while isinstance(e, Scale):
        e = e.arg
    return isinstance(e, MatMul) and e.factors[0] == Transpose(X)

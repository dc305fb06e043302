"""Sums over two indices: ``\\sum_{i,j} (i-entries)(j-entries) x_i^T x_j`` -> ``u' X X' v``.

The body is read as a product of factors.  Each factor mentions i, j, both or
neither; exactly one pair factor (``x_i^\\top x_j`` with X a data matrix, or
``K_{ij}`` with K a data matrix) joins the two sides, and the i- and j-factors
become vectors u and v.  With vector entries only, u is written ``a' * diag(y)``
(the variable last), the form in which published duals state it.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Protocol

from dualize.paper import tree as T
from dualize.paper.notation import ATOM_P, UNARY_P, Index, Refusal, Symbol, mentions
from dualize.paper.piece import Piece, join


class Emitter(Protocol):
    """What a double sum asks of the expression translator (``emit.Emitter``)."""

    names: dict[str, Symbol]

    def expression(self, node: T.Node, index: Index | None = None) -> Piece: ...

    def wrapped(self, node: T.Node, index: Index | None, least: int) -> Piece: ...

    def symbol(self, name: T.Name) -> Symbol: ...

    def matrix_of(self, entry: T.Entry, index: Index) -> Piece: ...

    def _is_row(self, node: T.Node, index: Index | None) -> bool: ...


def sum_indices(node: T.Sum) -> tuple[tuple[Index, ...], T.Node]:
    """``\\sum_i \\sum_j body`` and ``\\sum_{i,j} body`` alike: the indices and the body."""
    indices = tuple(Index(name, node.upper) for name in node.indices)
    body = node.body
    if len(indices) == 1 and isinstance(body, T.Sum) and body.lower in (None, "1"):
        inner, body = sum_indices(body)
        indices = indices + inner
    return indices, body


def factors(node: T.Node) -> tuple[Fraction, list[T.Node]]:
    """A product flattened: a sign and its factors, in order."""
    if isinstance(node, T.Binary) and node.op == "*":
        ls, lf = factors(node.left)
        rs, rf = factors(node.right)
        return ls * rs, lf + rf
    if isinstance(node, T.Neg):
        sign, found = factors(node.arg)
        return -sign, found
    return Fraction(1), [node]


def double_sum(em: Emitter, node: T.Sum, indices: tuple[Index, ...], body: T.Node) -> Piece:
    i, j = indices
    sign, parts = factors(body)
    pair, rest = _pair_factor(em, parts, i, j, node)
    left = [f for f in rest if mentions(f, i.name)]
    right = [f for f in rest if mentions(f, j.name)]
    both = [f for f in left if f in right]
    if both:
        raise Refusal("paper-index", both[0].span, "a factor with both indices besides "
                      "the pair x_i^T x_j (or K_ij)")
    scalars = [f for f in rest if f not in left and f not in right]
    if not left or not right:
        raise Refusal("paper-index", node.span, "a double sum needs entries indexed by "
                      f"{i.name} and by {j.name} around the pair")
    core = _side(em, left, i, True) + " * " + pair + " * " + _side(em, right, j, False)
    coefficient = [em.wrapped(f, None, UNARY_P) for f in scalars]
    out = join([*coefficient, "(" + core + ")" if coefficient else core], " * ")
    return ("-(" + out + ")") if sign < 0 else out


def _pair_factor(em: Emitter, parts: list[T.Node], i: Index, j: Index, node: T.Sum
                 ) -> tuple[Piece, list[T.Node]]:
    """The factor that joins i and j, and the other factors."""
    for k, f in enumerate(parts):
        if isinstance(f, T.Entry) and f.indices == (i.name, j.name) \
                and isinstance(f.target, T.Name):
            return _matrix(em, f.target, f), parts[:k] + parts[k + 1:]
    for k, f in enumerate(parts[:-1]):
        nxt = parts[k + 1]
        if isinstance(f, T.Transpose) and em._is_row(f.arg, i) and em._is_row(nxt, j):
            assert isinstance(f.arg, T.Entry) and isinstance(nxt, T.Entry)
            if f.arg.target != nxt.target:
                raise Refusal("paper-index", f.span, "x_i^T z_j between rows of two matrices")
            matrix = em.matrix_of(f.arg, i)
            gram = matrix + " * " + _transposed(matrix)
            return gram, parts[:k] + parts[k + 2:]
    raise Refusal("paper-index", node.span, f"a double sum over {i.name}, {j.name} without "
                  f"x_{i.name}^T x_{j.name} or a matrix entry K_{{{i.name}{j.name}}}")


def vector_sum(em: Emitter, body: T.Node, index: Index) -> Piece | None:
    """``\\sum_i c_i x_i`` with x_i a row of a data matrix X: the vector ``X' * c``.

    Papers write a combination of rows as a sum (``\\sum_i \\alpha_i y_i x_i``); its
    value is a vector, not the sum of a vector's entries.  The factors indexed by i
    other than the row give the weights c entry by entry; factors without i scale
    the result.  None when the body has no row of a matrix (an ordinary sum).
    """
    sign, parts = factors(body)
    rows = [f for f in parts if em._is_row(f, index)]
    if len(rows) != 1:
        return None
    row = rows[0]
    assert isinstance(row, T.Entry)
    weights = [f for f in parts if f is not row and mentions(f, index.name)]
    scalars = [f for f in parts if f is not row and not mentions(f, index.name)]
    if not weights:
        return None
    weight = join([em.wrapped(f, index, UNARY_P) for f in weights], " .* ")
    core = _transposed(em.matrix_of(row, index)) + " * (" + weight + ")"
    out = join([*(em.wrapped(f, None, UNARY_P) for f in scalars), core], " * ")
    return ("-(" + out + ")") if sign < 0 else out


def _matrix(em: Emitter, target: T.Name, entry: T.Entry) -> Piece:
    sym = em.symbol(target)
    if sym.shape.is_vector or sym.shape.is_scalar or not sym.shape.is_square:
        raise Refusal("paper-index", entry.span, f"`{target.text}` with two indices must be "
                      "a square data matrix")
    return Piece(sym.name)


def _transposed(matrix: Piece) -> str:
    return matrix.text[:-1] if matrix.text.endswith("'") else matrix.text + "'"


def _side(em: Emitter, found: list[T.Node], index: Index, left: bool) -> Piece:
    """The i-side as ``a' * diag(y)`` (left) or ``diag(y) * a`` (right)."""
    simple = all(isinstance(f, T.Entry) and isinstance(f.target, T.Name) for f in found)
    if not simple:
        product = join([em.wrapped(f, index, UNARY_P) for f in found], " .* ")
        return ("(" + product + ")'") if left else ("(" + product + ")")
    pieces = [(em.expression(f, index), _is_variable(em, f)) for f in found]
    main = next((p for p, var in pieces if var), pieces[-1][0])
    diags = [Piece("diag(") + p + ")" for p, _ in pieces if p is not main]
    if left:
        return join([main + "'", *diags], " * ")
    return join([*diags[::-1], main], " * ")


def _is_variable(em: Emitter, f: T.Node) -> bool:
    assert isinstance(f, T.Entry) and isinstance(f.target, T.Name)
    sym = em.names.get(f.target.text)
    return bool(sym and sym.variable)


__all__ = ["ATOM_P", "double_sum", "factors", "sum_indices", "vector_sum"]

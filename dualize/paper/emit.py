"""Paper nodes -> text of our language, index notation put in matrix form.

The correspondences (docs/paper-claims.md) are the only ones used:
- ``v_i`` with v a vector is entry i of v; inside ``\\sum_i`` or under a for-all
  condition on i the expression is read entrywise and becomes a vector expression.
- ``x_i`` with X a data matrix is row i of X (column i when i runs to X's column
  count): ``x_i^\\top u`` is entry i of ``X * u``.
- ``\\sum_{i,j}`` of i-entries, j-entries and ``x_i^\\top x_j`` (or ``K_{ij}``) is
  ``u' * X * X' * v`` (or ``u' * K * v``).
Anything else with an index is refused (``Refusal``) with the place.
"""

from __future__ import annotations

from dualize.paper import tree as T
from dualize.paper.notation import (
    ATOM_P,
    POWER_P,
    PRODUCT_P,
    SUM_P,
    UNARY_P,
    Index,
    Refusal,
    Symbol,
    check_range,
    mentions,
    number,
)
from dualize.paper.piece import Piece
from dualize.paper.sums import double_sum, sum_indices, vector_sum


class Emitter:
    """Translation of one paper problem's expressions; ``names`` maps paper names."""

    def __init__(self, names: dict[str, Symbol], dims: frozenset[str] = frozenset()) -> None:
        self.names = names
        self.dims = dims  # sizes of the problem: a paper's n as a value is sum(ones(n))

    # ---- entry points -------------------------------------------------------
    def expression(self, node: T.Node, index: Index | None = None) -> Piece:
        return self.emit(node, index)[0]

    def emit(self, node: T.Node, index: Index | None) -> tuple[Piece, int]:
        handler = getattr(self, "_" + type(node).__name__.lower(), None)
        if handler is None:
            raise Refusal("paper-unsupported", node.span, f"a {type(node).__name__}")
        piece, prec = handler(node, index)
        return piece.at(node.span), prec

    def wrapped(self, node: T.Node, index: Index | None, least: int) -> Piece:
        piece, prec = self.emit(node, index)
        return ("(" + piece + ")") if prec < least else piece

    # ---- leaves -------------------------------------------------------------
    def symbol(self, name: T.Name) -> Symbol:
        found = self.names.get(name.text)
        if found is None:
            raise Refusal("paper-name", name.span, f"`{name.text}` is neither data of the "
                          "problem file nor a variable under the max/min",
                          "name it in a map (map paper=ours) or use the problem's name")
        return found

    def _name(self, node: T.Name, index: Index | None) -> tuple[Piece, int]:
        if index is not None and node.text == index.name:
            raise Refusal("paper-index", node.span, f"the index `{node.text}` used as a value")
        if node.text in self.dims and node.text not in self.names:
            return self._size(node)
        return Piece(self.symbol(node).name), ATOM_P

    def _size(self, node: T.Name) -> tuple[Piece, int]:
        """A size used as a number: ``sum(ones(n))``, when a set of the claim declares n."""
        sizes = {str(d) for s in self.names.values() for d in (s.shape.rows, s.shape.cols)}
        if node.text not in sizes:
            raise Refusal("paper-unsupported", node.span, f"the size {node.text} as a value "
                          "in a claim whose data and variables do not have that size")
        return Piece(f"sum(ones({node.text}))"), ATOM_P

    def _num(self, node: T.Num, index: Index | None) -> tuple[Piece, int]:
        return number(node.value)

    def _constant(self, node: T.Constant, index: Index | None) -> tuple[Piece, int]:
        return Piece(str(node.digit)), ATOM_P

    def _entry(self, node: T.Entry, index: Index | None) -> tuple[Piece, int]:
        target = node.target
        if not isinstance(target, T.Name):
            raise Refusal("paper-index", node.span, "an entry of a composite expression")
        if index is None or node.indices != (index.name,):
            return self._named_entry(node, target, index)
        if self._is_row(node, index) and target.text not in self.names:
            raise Refusal("paper-index", node.span, f"`{target.text}_{index.name}` is row "
                          f"{index.name} of a matrix; it is translated only in "
                          f"{target.text}_{index.name}^T u or {target.text}_i^T "
                          f"{target.text}_j")
        sym = self.symbol(target)
        if not sym.shape.is_vector:
            raise Refusal("paper-index", node.span, f"`{target.text}_{index.name}` where "
                          f"{target.text} is not a vector; a row x_i is used only as x_i^T u")
        check_range(sym, index, node.span)
        return Piece(sym.name), ATOM_P

    def _named_entry(self, node: T.Entry, target: T.Name, index: Index | None
                     ) -> tuple[Piece, int]:
        """``lambda_1`` (no bound index) may be a name of its own."""
        joined = target.text + "_" + "".join(node.indices)
        if joined in self.names:
            return Piece(self.names[joined].name), ATOM_P
        bound = f" (only {index.name} is bound here)" if index else ""
        raise Refusal("paper-index", node.span, f"the index {','.join(node.indices)} of "
                      f"`{target.text}` is bound by no sum or for-all condition{bound}",
                      "add a side condition such as `i = 1, \\dots, m`")

    # ---- operators ----------------------------------------------------------
    def _binary(self, node: T.Binary, index: Index | None) -> tuple[Piece, int]:
        if node.op in "+-":
            left = self.wrapped(node.left, index, SUM_P)
            right = self.wrapped(node.right, index, PRODUCT_P)
            return left + f" {node.op} " + right, SUM_P
        if node.op in (".*", "./"):  # elementwise, written \circ, \odot or \oslash
            left = self.wrapped(node.left, index, PRODUCT_P)
            right = self.wrapped(node.right, index, UNARY_P)
            return left + f" {node.op} " + right, PRODUCT_P
        return self._product(node, index)

    def _product(self, node: T.Binary, index: Index | None) -> tuple[Piece, int]:
        row = self._row_product(node, index)
        if row is not None:
            return row, ATOM_P
        op = " .* " if index is not None and mentions(node, index.name) else " * "
        left = self.wrapped(node.left, index, PRODUCT_P)
        right = self.wrapped(node.right, index, UNARY_P)
        return left + op + right, PRODUCT_P

    def _row_product(self, node: T.Binary, index: Index | None) -> Piece | None:
        """``x_i^T u`` (or ``u^T x_i``) read entrywise: entry i of ``X * u``."""
        if index is None:
            return None
        left, right = node.left, node.right
        if isinstance(left, T.Transpose) and self._is_row(left.arg, index) \
                and not mentions(right, index.name):
            entry, vector = left.arg, right
        elif isinstance(left, T.Transpose) and self._is_row(right, index) \
                and not mentions(left, index.name):
            entry, vector = right, left.arg
        else:
            return None
        assert isinstance(entry, T.Entry)
        matrix = self.matrix_of(entry, index)
        return "(" + matrix + " * " + self.wrapped(vector, None, UNARY_P) + ")"

    def _is_row(self, node: T.Node, index: Index) -> bool:
        """``x_i`` where x is not itself a vector: a row (or column) of a matrix."""
        if not (isinstance(node, T.Entry) and node.indices == (index.name,)
                and isinstance(node.target, T.Name)):
            return False
        own = self.names.get(node.target.text)
        return own is None or not (own.shape.is_vector or own.shape.is_scalar)

    def matrix_of(self, entry: T.Entry, index: Index) -> Piece:
        """X for rows of X, X' for its columns, by the size the index runs to."""
        target = entry.target
        assert isinstance(target, T.Name)
        sym = self.names.get(target.text.upper()) or self.names.get(target.text)
        if sym is None or sym.shape.is_vector or sym.shape.is_scalar:
            raise Refusal("paper-index", entry.span, f"`{target.text}_{index.name}` stands for "
                          "a row of a data matrix, but the problem has no matrix "
                          f"{target.text.upper()}")
        if index.upper is not None and index.upper == str(sym.shape.cols) != \
                str(sym.shape.rows):
            return Piece(sym.name + "'")
        return Piece(sym.name)

    def _group(self, node: T.Group, index: Index | None) -> tuple[Piece, int]:
        return self.emit(node.arg, index)

    def _neg(self, node: T.Neg, index: Index | None) -> tuple[Piece, int]:
        return "-" + self.wrapped(node.arg, index, PRODUCT_P), UNARY_P

    def _frac(self, node: T.Frac, index: Index | None) -> tuple[Piece, int]:
        if isinstance(node.num, T.Num) and isinstance(node.den, T.Num):
            if node.den.value == 0:
                raise Refusal("paper-unsupported", node.span, "a fraction over zero")
            return number(node.num.value / node.den.value)
        op = " ./ " if index is not None and mentions(node.den, index.name) else " / "
        num = self.wrapped(node.num, index, PRODUCT_P)
        return num + op + self.wrapped(node.den, index, UNARY_P), PRODUCT_P

    def _power(self, node: T.Power, index: Index | None) -> tuple[Piece, int]:
        base = node.base
        if isinstance(base, T.Name) and base.text == "e" and "e" not in self.names:
            return "exp(" + self.expression(node.exponent, index) + ")", ATOM_P
        if not isinstance(node.exponent, (T.Num, T.Neg)):
            raise Refusal("paper-unsupported", node.exponent.span, "an exponent that is not "
                          "a number")
        exponent = self.wrapped(node.exponent, None, ATOM_P)
        if exponent.text == "(-1)" and self._is_matrix(base):
            return "inv(" + self.expression(base, index) + ")", ATOM_P
        return self.wrapped(base, index, ATOM_P) + "^" + exponent, POWER_P

    def _is_matrix(self, node: T.Node) -> bool:
        if isinstance(node, T.Name) and node.text in self.names:
            shape = self.names[node.text].shape
            return not shape.is_scalar and not shape.is_vector
        return False

    def _transpose(self, node: T.Transpose, index: Index | None) -> tuple[Piece, int]:
        return self.wrapped(node.arg, index, ATOM_P) + "'", ATOM_P

    def _norm(self, node: T.Norm, index: Index | None) -> tuple[Piece, int]:
        if index is not None and mentions(node, index.name):
            raise Refusal("paper-index", node.span, "a norm of an indexed expression")
        sub = {"2": "", "1": "_1", "inf": "_inf"}.get(node.p)
        if sub is None:
            raise Refusal("paper-unsupported", node.span, f"the norm with subscript {node.p}")
        return "||" + self.expression(node.arg, index) + "||" + sub, ATOM_P

    def _abs(self, node: T.Abs, index: Index | None) -> tuple[Piece, int]:
        return "| " + self.expression(node.arg, index) + " |", ATOM_P

    def _call(self, node: T.Call, index: Index | None) -> tuple[Piece, int]:
        return node.func + "(" + self.expression(node.arg, index) + ")", ATOM_P

    # ---- sums ---------------------------------------------------------------
    def _sum(self, node: T.Sum, index: Index | None) -> tuple[Piece, int]:
        if node.lower not in (None, "1"):
            raise Refusal("paper-index", node.span, f"a sum from {node.lower}: only sums over "
                          "all entries (from 1) have a matrix form")
        if index is not None:
            raise Refusal("paper-index", node.span, "a sum inside an entrywise expression")
        indices, body = sum_indices(node)
        if len(indices) == 1:
            combination = vector_sum(self, body, indices[0])
            if combination is not None:
                return combination, PRODUCT_P
            inner = self.expression(body, indices[0])
            return "sum(" + inner + ")", ATOM_P
        if len(indices) == 2:
            piece = double_sum(self, node, indices, body)
            return piece, (UNARY_P if piece.text.startswith("-") else PRODUCT_P)
        raise Refusal("paper-index", node.span, "a sum over more than two indices")


__all__ = ["Emitter"]

"""What the paper reader's translators share: precedences, names, indices, refusals.

``emit`` (expressions) and ``sums`` (double sums) both build on these; keeping
them here lets ``emit`` call ``sums`` without the two importing each other.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from dualize.model.expr import Shape
from dualize.paper import tree as T
from dualize.paper.piece import Piece
from dualize.syntax.span import Span

SUM_P, PRODUCT_P, UNARY_P, POWER_P, ATOM_P = 1, 2, 3, 4, 5


class Refusal(Exception):
    """A construct with no declared translation: which rule, where, and why."""

    def __init__(self, rule: str, span: Span, what: str, hint: str | None = None) -> None:
        super().__init__(what)
        self.rule, self.span, self.what, self.hint = rule, span, what, hint


@dataclass(frozen=True)
class Symbol:
    """A paper name resolved: our name and its shape."""

    name: str
    shape: Shape
    variable: bool = False


@dataclass(frozen=True)
class Index:
    """An index read entrywise: its name and the size it runs to (a dimension name)."""

    name: str
    upper: str | None


def number(value: Fraction) -> tuple[Piece, int]:
    if value.denominator == 1:
        text = str(value.numerator)
        return Piece(text), (ATOM_P if value >= 0 else UNARY_P)
    return Piece(f"{value.numerator}/{value.denominator}"), PRODUCT_P


def mentions(node: T.Node, index: str) -> bool:
    """Does ``node`` use the index (as a subscript anywhere inside)?"""
    if isinstance(node, T.Entry):
        return index in node.indices or mentions(node.target, index)
    if isinstance(node, T.Name):
        return node.text == index
    return any(mentions(child, index) for child in children(node))


def free_use(node: T.Node, index: str) -> bool:
    """Does ``node`` use the index outside every sum that binds it?"""
    if isinstance(node, T.Sum):
        return index not in node.indices and free_use(node.body, index)
    if isinstance(node, T.Entry):
        return index in node.indices or free_use(node.target, index)
    if isinstance(node, T.Name):
        return node.text == index
    return any(free_use(child, index) for child in children(node))


def children(node: T.Node) -> list[T.Node]:
    out = []
    for field in ("left", "right", "arg", "num", "den", "base", "exponent", "body", "target"):
        child = getattr(node, field, None)
        if isinstance(child, T.Node):
            out.append(child)
    return out


def check_range(sym: Symbol, index: Index, span: Span) -> None:
    """An index that runs to n cannot pick entries of a vector of length m."""
    if index.upper is not None and str(sym.shape.rows) != index.upper:
        raise Refusal("paper-index", span, f"{index.name} runs to {index.upper}, but "
                      f"{sym.name} has length {sym.shape.rows}")

"""The LaTeX of a problem as read from a paper: small immutable nodes with spans.

These nodes stay close to what the paper wrote (an entry ``alpha_i``, a sum over
``i``), so that the translation into our language can refuse, with the place,
whatever it has no declared correspondence for.  Spans are in the .tex file.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

from dualize.syntax.span import Span

NOWHERE = Span(1, 1, 1, 1, 0, 0)


@dataclass(frozen=True)
class Node:
    span: Span = field(default=NOWHERE, compare=False, kw_only=True)


@dataclass(frozen=True)
class Name(Node):
    """A letter or Greek letter, under our spelling (``\\lambda`` is ``lambda``)."""

    text: str


@dataclass(frozen=True)
class Num(Node):
    value: Fraction


@dataclass(frozen=True)
class Constant(Node):
    """``\\mathbf{1}`` (all ones) or ``\\mathbf{0}`` (all zeros), of a size the context gives."""

    digit: int


@dataclass(frozen=True)
class Entry(Node):
    """``target_{indices}``: an entry, a row, or (for a number or infinity) a name part."""

    target: Node
    indices: tuple[str, ...]


@dataclass(frozen=True)
class Binary(Node):
    """``+``, ``-`` or a product (juxtaposition or ``\\cdot``: ``*``)."""

    op: str
    left: Node
    right: Node


@dataclass(frozen=True)
class Group(Node):
    """A parenthesized expression (it ends the argument of ``\\log`` or ``\\exp``)."""

    arg: Node


@dataclass(frozen=True)
class Neg(Node):
    arg: Node


@dataclass(frozen=True)
class Frac(Node):
    num: Node
    den: Node


@dataclass(frozen=True)
class Power(Node):
    base: Node
    exponent: Node


@dataclass(frozen=True)
class Transpose(Node):
    arg: Node


@dataclass(frozen=True)
class Norm(Node):
    arg: Node
    p: str  # "2", "1" or "inf"


@dataclass(frozen=True)
class Abs(Node):
    arg: Node


@dataclass(frozen=True)
class Call(Node):
    """``log``, ``exp``, ``sqrt``, ``diag`` or ``trace`` of one argument."""

    func: str
    arg: Node


@dataclass(frozen=True)
class Sum(Node):
    """``\\sum_{i=1}^m body`` (``indices`` has two names for ``\\sum_{i,j}``)."""

    indices: tuple[str, ...]
    upper: str | None
    body: Node
    lower: str | None = None


@dataclass(frozen=True)
class Chain(Node):
    """``0 \\le \\alpha_i \\le C``: terms and the relations between them."""

    terms: tuple[Node, ...]
    relations: tuple[str, ...]
    row: int = 0


@dataclass(frozen=True)
class ForAll(Node):
    """A side condition ``i = 1, \\dots, m`` or ``\\forall i``."""

    index: str
    upper: str | None
    row: int = 0


@dataclass(frozen=True)
class VarDecl(Node):
    """A variable under ``\\max``: ``\\lambda``, ``\\lambda \\succeq 0``, or
    ``\\lambda \\in \\mathbb{R}^m_+`` (read as ``\\lambda \\ge 0``)."""

    name: Name
    relation: str | None = None
    bound: Node | None = None


@dataclass(frozen=True)
class PaperProblem(Node):
    sense: str  # "maximize" or "minimize"
    variables: tuple[VarDecl, ...]
    objective: Node
    items: tuple[Chain | ForAll, ...]

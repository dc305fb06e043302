"""The syntax tree: what the file says, with where it says it.

Every node is a frozen dataclass with a ``span``; class names are the grammar's
rule names in CamelCase (``binop`` -> ``BinOp``).  Nothing here knows about
shapes or meaning: that is the resolver's job (dualize/model/resolve.py).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction

from dualize.syntax.span import Span


@dataclass(frozen=True)
class Node:
    span: Span


# ---- expressions -----------------------------------------------------------
@dataclass(frozen=True)
class Number(Node):
    """A literal, kept exact: ``0.25`` is the fraction 1/4."""

    text: str
    value: Fraction


@dataclass(frozen=True)
class Name(Node):
    name: str


@dataclass(frozen=True)
class BinOp(Node):
    """``left op right`` with op one of ``+ - * / .* ./``."""

    op: str
    left: Expr
    right: Expr


@dataclass(frozen=True)
class Neg(Node):
    operand: Expr


@dataclass(frozen=True)
class Power(Node):
    base: Expr
    exponent: Expr


@dataclass(frozen=True)
class Transpose(Node):
    operand: Expr


@dataclass(frozen=True)
class Call(Node):
    func: str
    func_span: Span
    args: tuple[Expr, ...]


@dataclass(frozen=True)
class Norm(Node):
    """``||arg||`` with ``p`` "2" unless a subscript ``_1``, ``_2``, ``_inf`` says otherwise."""

    arg: Expr
    p: str


@dataclass(frozen=True)
class Abs(Node):
    arg: Expr


Expr = Number | Name | BinOp | Neg | Power | Transpose | Call | Norm | Abs


# ---- sets ------------------------------------------------------------------
@dataclass(frozen=True)
class Size(Node):
    """A size inside a set: a number or a dimension symbol's name."""

    text: str

    @property
    def is_number(self) -> bool:
        return self.text.isdecimal()


@dataclass(frozen=True)
class NamedSet(Node):
    """``R``, ``R^n_+``, ``S^n_++``, ``Z^n``; ``sign`` is "", "+" or "++"."""

    name: str
    sizes: tuple[Size, ...]
    sign: str


@dataclass(frozen=True)
class BinarySet(Node):
    low: Number
    high: Number
    sizes: tuple[Size, ...]


@dataclass(frozen=True)
class BoxSet(Node):
    lo: Expr
    hi: Expr
    sizes: tuple[Size, ...]


SetExpr = NamedSet | BinarySet | BoxSet


# ---- statements ------------------------------------------------------------
@dataclass(frozen=True)
class Decl(Node):
    name: str
    name_span: Span
    set: SetExpr


@dataclass(frozen=True)
class Title(Node):
    text: str


@dataclass(frozen=True)
class Data(Node):
    decls: tuple[Decl, ...]


@dataclass(frozen=True)
class Over(Node):
    decls: tuple[Decl, ...]


@dataclass(frozen=True)
class Objective(Node):
    sense: str
    expr: Expr
    over: Over | None


@dataclass(frozen=True)
class Label(Node):
    name: str


@dataclass(frozen=True)
class Relation(Node):
    """A relation, normalized (``=`` -> ``==``, ``≤`` -> ``<=``, ``⪰`` -> ``succeq``)."""

    op: str
    text: str


@dataclass(frozen=True)
class Constraint(Node):
    """``labels: e0 r0 e1 [r1 e2]``: one relation, or a chain of two."""

    labels: tuple[Label, ...]
    parts: tuple[Expr, ...]
    relations: tuple[Relation, ...]


@dataclass(frozen=True)
class SubjectTo(Node):
    constraint: Constraint | None


Statement = Title | Data | Objective | Over | SubjectTo | Constraint


@dataclass(frozen=True)
class Start(Node):
    """The file as a list of statements, in the order written."""

    statements: tuple[Statement, ...]


@dataclass(frozen=True)
class Document:
    """The statements sorted into their places, after the order is checked."""

    title: Title | None
    data: tuple[Decl, ...]
    objective: Objective
    variables: tuple[Decl, ...]
    constraints: tuple[Constraint, ...]

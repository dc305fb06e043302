"""Expressions of the typed problem (the IR).

Every node is a small frozen dataclass: equality and hashing come from the
fields, so two structurally equal expressions are equal.  Sizes are sympy
integers or positive-integer symbols (``m``, ``n``), so a derivation over
symbolic sizes never needs numbers.  A 1-by-1 shape *is* a scalar: ``x' * y``
and ``sum(s)`` are scalars, not matrices.

Nodes may carry the source span they came from (``span``); the span takes no
part in equality, so rewriting keeps structural identity intact.
"""

from __future__ import annotations

import functools
from collections.abc import Iterator
from dataclasses import dataclass, field, fields, replace
from typing import Literal

import sympy

from dualize.syntax.span import Span

Role = Literal["data", "variable", "multiplier", "auxiliary"]
ONE = sympy.Integer(1)


@dataclass(frozen=True)
class Shape:
    """Rows and columns, each a sympy integer or a dimension symbol."""

    rows: sympy.Expr
    cols: sympy.Expr

    @property
    def is_scalar(self) -> bool:
        return self.rows == 1 and self.cols == 1

    @property
    def is_vector(self) -> bool:
        return self.cols == 1 and self.rows != 1

    @property
    def is_square(self) -> bool:
        return self.rows == self.cols

    def transposed(self) -> Shape:
        return Shape(self.cols, self.rows)

    def __str__(self) -> str:
        if self.is_scalar:
            return "scalar"
        if self.cols == 1:
            return f"vector of length {self.rows}"
        return f"{self.rows}x{self.cols} matrix"


SCALAR = Shape(ONE, ONE)


def vector(n: sympy.Expr | int) -> Shape:
    return Shape(sympy.Integer(n) if isinstance(n, int) else n, ONE)


class Expr:
    """Base of all expression nodes; subclasses are frozen dataclasses."""

    span: Span | None

    @property
    def shape(self) -> Shape:  # pragma: no cover - every subclass defines it
        raise NotImplementedError(type(self).__name__)

    def children(self) -> tuple[Expr, ...]:
        out: list[Expr] = []
        for name in _field_names(type(self)):
            value = getattr(self, name)
            if isinstance(value, Expr):
                out.append(value)
            elif isinstance(value, tuple):
                out.extend(v for v in value if isinstance(v, Expr))
        return tuple(out)

    def with_span(self, span: Span | None) -> Expr:
        return replace(self, span=span)  # type: ignore[type-var]


@functools.cache
def _field_names(cls: type) -> tuple[str, ...]:
    """A node class's field names, read once (``dataclasses.fields`` is slow in a walk)."""
    return tuple(f.name for f in fields(cls))


def _span() -> Span | None:
    return field(default=None, compare=False, hash=False, repr=False)  # type: ignore[return-value]


@dataclass(frozen=True)
class Symbol(Expr):
    """A named leaf: data, a decision variable, a multiplier or an auxiliary variable.

    ``facts`` holds what is known of every entry or of the matrix:
    ``nonneg``, ``pos``, ``integer``, ``binary``, ``symmetric``, ``psd``, ``pd``.
    """

    name: str
    role: Role
    sym_shape: Shape
    facts: frozenset[str] = frozenset()
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.sym_shape


@dataclass(frozen=True)
class Number(Expr):
    """An exact scalar constant: a rational, or a polynomial in dimension symbols
    (``1' * 1`` over R^n is the number n)."""

    value: sympy.Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return SCALAR


@dataclass(frozen=True)
class Ones(Expr):
    """The all-ones column vector of length n."""

    n: sympy.Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return Shape(self.n, ONE)


@dataclass(frozen=True)
class Identity(Expr):
    n: sympy.Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return Shape(self.n, self.n)


@dataclass(frozen=True)
class Zero(Expr):
    zero_shape: Shape
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.zero_shape


@dataclass(frozen=True)
class Add(Expr):
    """A sum of terms of one shape (broadcasting is made explicit before)."""

    terms: tuple[Expr, ...]
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.terms[0].shape


@dataclass(frozen=True)
class Broadcast(Expr):
    """A scalar repeated into every entry of ``target``: s * ones."""

    arg: Expr
    target: Shape
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.target


@dataclass(frozen=True)
class MatMul(Expr):
    """A conformable matrix product chain (no scalar factors: those are Scale)."""

    factors: tuple[Expr, ...]
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return Shape(self.factors[0].shape.rows, self.factors[-1].shape.cols)


@dataclass(frozen=True)
class Scale(Expr):
    """A scalar expression times an expression of any shape."""

    factor: Expr
    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.arg.shape


@dataclass(frozen=True)
class Transpose(Expr):
    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.arg.shape.transposed()


@dataclass(frozen=True)
class Hadamard(Expr):
    """Elementwise product of two expressions of one shape."""

    left: Expr
    right: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.left.shape


@dataclass(frozen=True)
class Divide(Expr):
    """Elementwise quotient; ``right`` has the shape of ``left`` or is a scalar."""

    left: Expr
    right: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.left.shape


@dataclass(frozen=True)
class Power(Expr):
    """Elementwise power with an exact rational exponent."""

    base: Expr
    exponent: sympy.Rational
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.base.shape


Elementwise = str
"""The name of an elementwise function: a key of ``dualize.model.functions.TABLE``."""


@dataclass(frozen=True)
class Apply(Expr):
    """An elementwise function, one entry of the function table (``model/functions.py``)."""

    func: Elementwise
    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.arg.shape


@dataclass(frozen=True)
class Extremum(Expr):
    """Elementwise max or min of two expressions of one shape."""

    kind: Literal["max", "min"]
    left: Expr
    right: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.left.shape


@dataclass(frozen=True)
class Norm(Expr):
    """||arg||_p for p in {"1", "2", "inf"}; on a matrix, "2" is the Frobenius norm."""

    arg: Expr
    p: Literal["1", "2", "inf"]
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return SCALAR


@dataclass(frozen=True)
class SumAll(Expr):
    """The sum of all entries."""

    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return SCALAR


@dataclass(frozen=True)
class Diag(Expr):
    """A vector made into a diagonal matrix."""

    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return Shape(self.arg.shape.rows, self.arg.shape.rows)


@dataclass(frozen=True)
class Trace(Expr):
    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return SCALAR


@dataclass(frozen=True)
class Inverse(Expr):
    """The inverse of a square matrix (or the reciprocal of a scalar)."""

    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.arg.shape


@dataclass(frozen=True)
class PseudoInverse(Expr):
    """The Moore-Penrose pseudo-inverse; appears only in derived duals."""

    arg: Expr
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        return self.arg.shape.transposed()


@dataclass(frozen=True)
class Block(Expr):
    """A block matrix, rows of blocks; appears only in derived duals (Schur LMIs)."""

    rows: tuple[tuple[Expr, ...], ...]
    span: Span | None = _span()

    @property
    def shape(self) -> Shape:
        height = sympy.Add(*(row[0].shape.rows for row in self.rows))
        width = sympy.Add(*(b.shape.cols for b in self.rows[0]))
        return Shape(height, width)

    def children(self) -> tuple[Expr, ...]:
        return tuple(b for row in self.rows for b in row)


def walk(expr: Expr) -> Iterator[Expr]:
    """Every node of the tree, parents before children, in a stable order."""
    stack = [expr]
    while stack:
        node = stack.pop()
        yield node
        stack.extend(reversed(node.children()))


def symbols_of(expr: Expr, role: Role | None = None) -> tuple[Symbol, ...]:
    """The distinct symbols in ``expr`` (of ``role`` if given), in first-seen order."""
    seen: dict[Symbol, None] = {}
    for node in walk(expr):
        if isinstance(node, Symbol) and (role is None or node.role == role):
            seen.setdefault(node, None)
    return tuple(seen)


def depends_on(expr: Expr, names: frozenset[str] | set[str]) -> bool:
    return any(isinstance(n, Symbol) and n.name in names for n in walk(expr))


def substitute(expr: Expr, mapping: dict[Expr, Expr]) -> Expr:
    """Replace every occurrence of a key (compared structurally) by its value."""
    if expr in mapping:
        return mapping[expr]
    if isinstance(expr, Block):
        return replace(
            expr, rows=tuple(tuple(substitute(b, mapping) for b in row) for row in expr.rows)
        )
    changes = {}
    for f in fields(expr):  # type: ignore[arg-type]
        value = getattr(expr, f.name)
        if isinstance(value, Expr):
            changes[f.name] = substitute(value, mapping)
        elif isinstance(value, tuple) and value and isinstance(value[0], Expr):
            changes[f.name] = tuple(substitute(v, mapping) for v in value)
    return replace(expr, **changes) if changes else expr  # type: ignore[type-var]

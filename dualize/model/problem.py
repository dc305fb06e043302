"""The typed problem: declarations, domains, normalized constraints."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import sympy

from dualize.model.expr import Expr, Symbol
from dualize.model.relations import Comparison, DomainKind
from dualize.syntax.span import Span


@dataclass(frozen=True)
class Domain:
    """The set a variable ranges over in the inner minimization (never dualized).

    ``free`` is R^..., ``nonneg`` R_+, ``pos`` R_++, ``box`` [lo, hi] (``lo`` and
    ``hi`` scalar expressions: numbers or scalar data), ``integer`` Z,
    ``binary`` {0,1}, and for square matrices ``symmetric`` S^n, ``psd`` S^n_+,
    ``pd`` S^n_++.
    """

    kind: DomainKind
    lo: Expr | None = None
    hi: Expr | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "kind", DomainKind(self.kind))


@dataclass(frozen=True)
class Variable:
    symbol: Symbol
    domain: Domain
    span: Span | None = None

    @property
    def name(self) -> str:
        return self.symbol.name


@dataclass(frozen=True)
class DataDecl:
    """A parameter; its facts (sign, symmetry, definiteness) live on the symbol."""

    symbol: Symbol
    set_text: str
    span: Span | None = None

    @property
    def name(self) -> str:
        return self.symbol.name


ConstraintKind = Literal["ineq", "eq", "psd"]


@dataclass(frozen=True)
class Constraint:
    """One normalized constraint: ``function <= 0``, ``= 0`` or ``preceq 0``.

    ``lhs rel rhs`` is kept as written for reports; ``function`` follows the sign
    conventions of the language (``f >= g`` gives ``g - f``; ``F succeq G`` gives
    ``G - F``).  ``multiplier`` has the shape of ``function`` (symmetric for psd).
    """

    label: str
    kind: ConstraintKind
    relation: Comparison  # as written: "<=", ">=", "==", "succeq", "preceq"
    lhs: Expr
    rhs: Expr
    function: Expr
    multiplier: Symbol
    labelled: bool
    span: Span | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "relation", Comparison(self.relation))


@dataclass(frozen=True)
class Problem:
    """A resolved problem: what every later stage reads."""

    title: str | None
    sense: Literal["minimize", "maximize"]
    objective: Expr
    variables: tuple[Variable, ...]
    data: tuple[DataDecl, ...]
    constraints: tuple[Constraint, ...]
    dims: tuple[sympy.Symbol, ...]
    source: str = ""
    path: str = "<string>"
    objective_span: Span | None = None

    def variable(self, name: str) -> Variable:
        return next(v for v in self.variables if v.name == name)

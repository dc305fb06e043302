"""Relations and domain kinds as enums (string-valued, so JSON and text are unchanged).

Two spellings of equality are in use for a reason: a constraint keeps the
language's spelling as written (``==``, a ``Comparison``), while derived
mathematics (dual constraints, displayed equations) states relations the way
a reader writes them (``=``, a ``Relation``).  ``relation_of`` is the one place
that maps between them.
"""

from __future__ import annotations

from enum import StrEnum


class Comparison(StrEnum):
    """A constraint's relation as the language writes it."""

    LE = "<="
    GE = ">="
    EQ = "=="
    SUCCEQ = "succeq"
    PRECEQ = "preceq"

    @property
    def relation(self) -> Relation:
        """The relation as derived mathematics states it (``==`` becomes ``=``)."""
        return relation_of(self.value)


class Relation(StrEnum):
    """A relation in derived mathematics: dual constraints and displayed equations."""

    EQ = "="
    LE = "<="
    GE = ">="
    SUCCEQ = "succeq"
    PRECEQ = "preceq"
    IN = "in"


def relation_of(text: str) -> Relation:
    """The relation for either spelling of equality or any relation's text."""
    return Relation.EQ if text == Comparison.EQ else Relation(text)


class DomainKind(StrEnum):
    """The set a variable ranges over (see ``dualize.model.problem.Domain``)."""

    FREE = "free"
    NONNEG = "nonneg"
    POS = "pos"
    BOX = "box"
    INTEGER = "integer"
    BINARY = "binary"
    SYMMETRIC = "symmetric"
    PSD = "psd"
    PD = "pd"

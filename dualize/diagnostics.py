"""Diagnostics as data: every finding of every stage is one of these.

Passes return diagnostics and never print; ``dualize.render.diagnostics``
formats them.  Each diagnostic names a kind (``RuleKind``) by its stable id.
Each stage lists its own kinds in its ``rules.py`` (a tuple ``KINDS``); this
base module imports no stage, so the table of every kind is assembled above
the stages (``dualize.lint.rule_table``) with ``table_of``.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Literal

from dualize.span import Span

Severity = Literal["error", "warning", "info"]
SEVERITY_ORDER: dict[str, int] = {"info": 0, "warning": 1, "error": 2}


@dataclass(frozen=True)
class RuleKind:
    """A kind of finding: stable id, default severity, message template, why it matters."""

    id: str
    severity: Severity
    template: str
    why: str
    stage: Literal["syntax", "model", "analysis", "instance", "paper"]
    aliases: tuple[str, ...] = ()  # former ids, still accepted by --select and --ignore


@dataclass(frozen=True)
class Diagnostic:
    rule: str
    severity: Severity
    message: str
    path: str = "<string>"
    span: Span | None = None
    hint: str | None = None
    notes: tuple[str, ...] = field(default=())


def table_of(*groups: Iterable[RuleKind]) -> dict[str, RuleKind]:
    """The kinds of ``groups`` by id, sorted; an id given twice is an error, because a
    finding must name exactly one kind."""
    table: dict[str, RuleKind] = {}
    taken: set[str] = set()
    for kind in (k for group in groups for k in group):
        for name in (kind.id, *kind.aliases):
            if name in taken:
                raise ValueError(f"rule id registered twice: {name}")
            taken.add(name)
        table[kind.id] = kind
    return dict(sorted(table.items()))


def make(kind: RuleKind, path: str, span: Span | None, hint: str | None = None,
         notes: tuple[str, ...] = (), **values: object) -> Diagnostic:
    """A diagnostic of ``kind`` with its template filled from ``values``."""
    return Diagnostic(kind.id, kind.severity, kind.template.format(**values), path, span,
                      hint, notes)

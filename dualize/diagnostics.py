"""Diagnostics as data: every finding of every stage is one of these.

Passes return diagnostics and never print; ``dualize.render.diagnostics``
formats them.  Each diagnostic names a registered kind (``RuleKind``) by its
stable id; the table of kinds is complete and tested.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from dualize.syntax.span import Span

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


@dataclass(frozen=True)
class Diagnostic:
    rule: str
    severity: Severity
    message: str
    path: str = "<string>"
    span: Span | None = None
    hint: str | None = None
    notes: tuple[str, ...] = field(default=())


_REGISTRY: dict[str, RuleKind] = {}


def register(kind: RuleKind) -> RuleKind:
    """Add a kind to the table; ids are unique."""
    if kind.id in _REGISTRY:
        raise ValueError(f"rule id registered twice: {kind.id}")
    _REGISTRY[kind.id] = kind
    return kind


def rule_table() -> dict[str, RuleKind]:
    """Every registered kind, after importing the modules that register them."""
    import dualize.analysis.rules  # noqa: F401
    import dualize.model.rules  # noqa: F401
    import dualize.paper.rules  # noqa: F401
    import dualize.syntax.rules  # noqa: F401

    return dict(sorted(_REGISTRY.items()))


def make(kind: RuleKind, path: str, span: Span | None, hint: str | None = None,
         notes: tuple[str, ...] = (), **values: object) -> Diagnostic:
    """A diagnostic of ``kind`` with its template filled from ``values``."""
    return Diagnostic(kind.id, kind.severity, kind.template.format(**values), path, span,
                      hint, notes)

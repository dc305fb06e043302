"""What the analysis tells the user: convexity, constraint classes, the duality verdict."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from dualize.diagnostics import Diagnostic

Status = Literal["guaranteed", "not-guaranteed", "unknown"]


@dataclass(frozen=True)
class Verdict:
    """A strong-duality verdict, why, and the point that proves it (if any)."""

    status: Status
    reason: str
    witness: dict[str, list | float] | None = None
    finding: str | None = None  # the lint rule id the verdict raises, if any
    detail: str = ""  # the part of the reason the finding's message quotes
    label: str | None = None  # the constraint the finding points at


@dataclass(frozen=True)
class Analysis:
    """The result of ``analyze``.

    ``convex`` is None when some part could not be decided.  ``constraint_classes``
    pairs each constraint label (and each integral variable's name) with its class.
    ``witness`` is a strictly feasible point when one was found, by name.
    """

    convex: bool | None
    convexity_reasons: tuple[str, ...]
    constraint_classes: tuple[tuple[str, str], ...]
    strong_duality_status: Status
    strong_duality_reason: str
    witness: dict[str, list | float] | None = None
    diagnostics: tuple[Diagnostic, ...] = field(default=())

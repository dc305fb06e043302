"""The result of one numeric solve, shared by the reference and the local solver.

A solve's ``status`` is a word of the program's: ``optimal``, ``inaccurate``,
``infeasible``, ``unbounded``, ``unsupported``, ``local``, ``failed`` (the
reference translates the solver library's statuses into these).  Reports shown
to users go one step further with ``status_word``: "solved" and
"solved-loosely" say what the program knows, in its own words, rather than
echo a solver library's vocabulary.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True)
class Solution:
    """A numeric solve: status, optimal value, the point, and multipliers by label."""

    status: str
    value: float
    x: dict[str, np.ndarray | float] = field(default_factory=dict)
    multipliers: dict[str, np.ndarray | float] = field(default_factory=dict)
    note: str = ""


STATUS_WORDS = {"optimal": "solved", "inaccurate": "solved-loosely"}


def status_word(status: str) -> str:
    """A status as reports show it to users (``optimal`` -> ``solved``)."""
    return STATUS_WORDS.get(status, status)

"""The result of one numeric solve, shared by the reference and the local solver."""

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

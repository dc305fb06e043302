"""dualize: derive, check and explain Lagrange duals of optimization problems.

The package imports nothing heavy at start-up; ``derive`` loads the engine
when first called.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from pathlib import Path

    from dualize.duality.result import Derivation
    from dualize.model.problem import Problem

__all__ = ["derive"]


def derive(source: str | Path | Problem) -> Derivation:
    """The dual of a problem given as text, as a path to a ``.prob`` file, or resolved.

    Raises ``dualize.errors.DualizeError`` (with the located diagnostics in its
    message) when the problem does not load.
    """
    from dualize.api import derive as _derive

    return _derive(source)

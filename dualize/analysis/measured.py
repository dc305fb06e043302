"""An instance together with the evaluator that computes IR expressions on its numbers.

The evaluator belongs to the numeric stage, which sits above the analysis; the
caller (``dualize.api.analyze``, the lint runner) passes it in with the
instance, so the analysis imports nothing of that stage.  This module stays
free of numpy: the analysis without an instance must not load it.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any

# The value of an IR expression given values by name and sizes by symbol, as a 2-D array.
Evaluate = Callable[[Any, Mapping[str, Any], Mapping[str, int]], Any]


@dataclass(frozen=True)
class Measured:
    """An instance (an ``Instance`` or a mapping name -> value) and its evaluator."""

    data: Any
    evaluate: Evaluate

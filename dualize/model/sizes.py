"""Symbolic sizes (``n``, ``m + 1``) made integers from the sizes of an instance.

Every stage that works on numbers needs it (the numeric evaluator, the exact
arithmetic of the analysis), so it lives with the model that declares sizes.
"""

from __future__ import annotations

from collections.abc import Mapping

import sympy


def size_of(size: sympy.Expr | int, dims: Mapping[str, int]) -> int:
    """A symbolic size (``n``, ``m + 1``) as an integer, from ``dims``."""
    if isinstance(size, int):
        return size
    if size.is_Integer:
        return int(size)
    if size.is_Symbol:
        if size.name not in dims:
            raise KeyError(f"no value for dimension {size.name}")
        return int(dims[size.name])
    free = sorted(size.free_symbols, key=lambda s: s.name)
    missing = [s.name for s in free if s.name not in dims]
    if missing:
        raise KeyError(f"no value for dimension {', '.join(missing)}")
    return int(size.subs({s: int(dims[s.name]) for s in free}))

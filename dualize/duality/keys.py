"""A deterministic structural key for any IR expression: for sorting and comparing.

No hash order and no object ids enter a key, so output sorted by it is the same
in every run.  Kept apart from the canonical form (``normal``) so that modules
the canonical form itself uses can sort by it too.
"""

from __future__ import annotations

from dataclasses import fields

import sympy

from dualize.model.expr import Expr, Number, Symbol


def node_key(e: Expr) -> str:
    """A deterministic structural key (no hash order, no object ids)."""
    if isinstance(e, Symbol):
        return f"S:{e.name}"
    if isinstance(e, Number):
        return f"N:{sympy.srepr(e.value)}"
    parts = [type(e).__name__]
    for f in fields(e):  # type: ignore[arg-type]
        if f.name == "span":
            continue
        value = getattr(e, f.name)
        parts.append(_value_key(value))
    return "(" + " ".join(parts) + ")"


def _value_key(value: object) -> str:
    if isinstance(value, Expr):
        return node_key(value)
    if isinstance(value, tuple):
        return "[" + ",".join(_value_key(v) for v in value) + "]"
    if isinstance(value, sympy.Basic):
        return sympy.srepr(value)
    return str(value)

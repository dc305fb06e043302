"""Two harmless rewrites applied to both sides before a symbolic comparison.

The shared comparison (``dualize.duality.compare``) proves equalities by the
rules of linear algebra; it does not look inside norms or elementwise extrema.
Two facts it misses, both exact:

- ``||-k e|| = k ||e||`` and ``|-k e| = k |e|`` for a number ``k > 0``
  (absolute homogeneity of norms), which a sign-flipped multiplier produces;
- ``min(a, b) = min(b, a)`` (likewise ``max``): the operand that is a constant
  number (``0`` in ``min(c + A' l, 0)``) is put on the left on both sides.
"""

from __future__ import annotations

from dataclasses import fields, replace

from dualize.model.expr import Apply, Block, Expr, Extremum, Norm, Number, Scale, Zero
from dualize.model.functions import ABS


def canonical(e: Expr) -> Expr:
    """``e`` with both rewrites applied everywhere, bottom up."""
    e = _children(e)
    if isinstance(e, Norm):
        return _out_of_norm(e)
    if isinstance(e, Apply) and e.func == ABS.name and _negative_scale(e.arg):
        inner = e.arg
        assert isinstance(inner, Scale)
        return _scaled(-_value(inner), Apply(ABS.name, inner.arg))
    if isinstance(e, Extremum) and _constant(e.right) and not _constant(e.left):
        return Extremum(e.kind, e.right, e.left)
    return e


def _children(e: Expr) -> Expr:
    if isinstance(e, Block):
        return replace(e, rows=tuple(tuple(canonical(b) for b in row) for row in e.rows))
    changes = {}
    for f in fields(e):  # type: ignore[arg-type]
        value = getattr(e, f.name)
        if isinstance(value, Expr):
            changes[f.name] = canonical(value)
        elif isinstance(value, tuple) and value and isinstance(value[0], Expr):
            changes[f.name] = tuple(canonical(v) for v in value)
    return replace(e, **changes) if changes else e  # type: ignore[type-var]


def _negative_scale(e: Expr) -> bool:
    return isinstance(e, Scale) and isinstance(e.factor, Number) and _value(e) < 0


def _value(e: Scale) -> object:
    assert isinstance(e.factor, Number)
    return e.factor.value


def _out_of_norm(e: Norm) -> Expr:
    if not _negative_scale(e.arg):
        return e
    inner = e.arg
    assert isinstance(inner, Scale)
    return _scaled(-_value(inner), Norm(inner.arg, e.p))  # type: ignore[operator]


def _scaled(k: object, e: Expr) -> Expr:
    return e if k == 1 else Scale(Number(k), e)  # type: ignore[arg-type]


def _constant(e: Expr) -> bool:
    return isinstance(e, (Number, Zero))

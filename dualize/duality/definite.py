"""What is known of the definiteness of a symmetric matrix expression.

The answer is a proof from declared facts, or "unknown": a scalar by sympy's
sign rules under the assumptions (multipliers of inequalities are
nonnegative, R_++ data positive); a matrix term by term (c I, data in S_+ or
S_++, diag of a nonnegative vector, Gram forms M' M and M' P M with P
semidefinite, inverses of definite matrices), summed by the cone rules
(definite + semidefinite = definite).
"""

from __future__ import annotations

from typing import Literal

import sympy

from dualize.duality import build as b
from dualize.duality import derivation_cache as cache
from dualize.duality.normal import Term, expand
from dualize.duality.scalar import Scope, known_sign, to_sympy
from dualize.model.expr import Diag, Expr, Identity, Inverse, Symbol

Definiteness = Literal["pd", "psd", "nd", "nsd", "zero", "unknown"]


def definiteness(H: Expr) -> Definiteness:
    if H.shape.is_scalar:
        return _scalar(to_sympy(H, Scope()))
    terms = expand(H)
    if not terms:
        return "zero"
    result: Definiteness = "zero"
    for t in terms:
        result = _add(result, _term(t))
        if result == "unknown":
            return result
    return result


_ANSWERS: tuple[Definiteness, ...] = ("pd", "psd", "nd", "nsd", "zero", "unknown")


def _scalar(value: sympy.Expr) -> Definiteness:
    """The sign of a scalar coefficient; sympy's simplify is costly, so the answer is
    kept in the derivation cache (keyed by the exact expression)."""
    return cache.memo(cache.key_of("scalar-sign", value),  # type: ignore[no-any-return]
                      lambda: _scalar_sign(value), str, _answer)


def _answer(payload: object) -> Definiteness:
    if payload not in _ANSWERS:
        raise ValueError(f"not a definiteness: {payload!r}")
    return payload  # type: ignore[return-value]


def _scalar_sign(value: sympy.Expr) -> Definiteness:
    # A strict sign that the assumptions prove on the expression as it stands is final
    # (it cannot be zero); only the rest needs sympy's simplify, whose first call in a
    # process costs a third of a second of imports.
    if value.is_positive:
        return "pd"
    if value.is_negative:
        return "nd"
    if value.is_nonnegative or value.is_nonpositive:
        value = sympy.cancel(value)  # enough to see a zero; the sign is known already
    else:
        value = sympy.simplify(value)
    if value == 0:
        return "zero"
    if value.is_positive:
        return "pd"
    if value.is_nonnegative:
        return "psd"
    if value.is_negative:
        return "nd"
    if value.is_nonpositive:
        return "nsd"
    return "unknown"


def _term(t: Term) -> Definiteness:
    sign = _scalar(t.coef * sympy.Mul(*(to_sympy(s, Scope()) for s in t.scalars)))
    shape = _chain(t.chain)
    return _times(sign, shape)


def _chain(chain: tuple[Expr, ...]) -> Definiteness:
    if len(chain) == 1:
        return _atom(chain[0])
    n = len(chain)
    for i in range(n // 2):
        if b.transpose(chain[i]) != chain[n - 1 - i]:
            return "unknown"
    if n % 2 == 0:
        return "psd"
    middle = _atom(chain[n // 2])
    return "psd" if middle in ("pd", "psd") else ("nsd" if middle in ("nd", "nsd") else "unknown")


def _atom(e: Expr) -> Definiteness:
    if isinstance(e, Identity):
        return "pd"
    if isinstance(e, Symbol):
        if "pd" in e.facts:
            return "pd"
        if "psd" in e.facts:
            return "psd"
        return "unknown"
    if isinstance(e, Inverse):
        inner = _atom(e.arg) if not isinstance(e.arg, Symbol) else _atom(e.arg)
        return "pd" if inner == "pd" else "unknown"
    if isinstance(e, Diag):
        sign = known_sign(e.arg)
        return {"pos": "pd", "nonneg": "psd"}.get(sign or "", "unknown")  # type: ignore[return-value]
    return "unknown"


def _times(sign: Definiteness, shape: Definiteness) -> Definiteness:
    if "zero" in (sign, shape):
        return "zero"
    if "unknown" in (sign, shape):
        return "unknown"
    positive = sign in ("pd", "psd")
    strict = sign in ("pd", "nd") and shape in ("pd", "nd")
    same = positive == (shape in ("pd", "psd"))
    if same:
        return "pd" if strict else "psd"
    return "nd" if strict else "nsd"


def _add(a: Definiteness, c: Definiteness) -> Definiteness:
    if a == "zero":
        return c
    if c == "zero":
        return a
    if "unknown" in (a, c):
        return "unknown"
    if {a, c} <= {"pd", "psd"}:
        return "pd" if "pd" in (a, c) else "psd"
    if {a, c} <= {"nd", "nsd"}:
        return "nd" if "nd" in (a, c) else "nsd"
    return "unknown"

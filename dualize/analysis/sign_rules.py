"""Entrywise sign of an expression, from declared facts, domains and the node rules.

The sign is what lets a rule of the convexity calculus fire: a convex function scaled by
nonnegative data stays convex, a power above one is increasing on a
nonnegative argument.  Signs are "pos", "nonneg", "zero", "nonpos", "neg" or
"unknown"; each rule below is a fact of real arithmetic.
"""

from __future__ import annotations

from collections.abc import Mapping

from dualize.model import expr as E
from dualize.model.functions import lookup

Sign = str
NONNEG = frozenset({"pos", "nonneg", "zero"})
NONPOS = frozenset({"neg", "nonpos", "zero"})
_NEGATED = {"pos": "neg", "neg": "pos", "nonneg": "nonpos", "nonpos": "nonneg",
            "zero": "zero", "unknown": "unknown"}


def negate(s: Sign) -> Sign:
    return _NEGATED[s]


def product(a: Sign, b: Sign) -> Sign:
    """Sign of a product of two factors."""
    if "zero" in (a, b):
        return "zero"
    if "unknown" in (a, b):
        return "unknown"
    negative = (a in NONPOS) != (b in NONPOS)
    strict = a in ("pos", "neg") and b in ("pos", "neg")
    if negative:
        return "neg" if strict else "nonpos"
    return "pos" if strict else "nonneg"


def total(signs: list[Sign]) -> Sign:
    """Sign of a sum of terms."""
    signs = [s for s in signs if s != "zero"]
    if not signs:
        return "zero"
    if all(s in NONNEG for s in signs):
        return "pos" if "pos" in signs else "nonneg"
    if all(s in NONPOS for s in signs):
        return "neg" if "neg" in signs else "nonpos"
    return "unknown"


def _number(value: object) -> Sign:
    """A rational, or a polynomial in dimension symbols (positive integers)."""
    for attr, out in (("is_zero", "zero"), ("is_positive", "pos"), ("is_negative", "neg"),
                      ("is_nonnegative", "nonneg"), ("is_nonpositive", "nonpos")):
        if getattr(value, attr, None) is True:
            return out
    return "unknown"


def symbol_sign(sym: E.Symbol, domains: Mapping[str, Sign]) -> Sign:
    """Facts of data (R_+, R_++, {0,1}) or the sign implied by a variable's domain."""
    if sym.name in domains:
        return domains[sym.name]
    if "pos" in sym.facts:
        return "pos"
    if "nonneg" in sym.facts or "binary" in sym.facts:
        return "nonneg"
    return "unknown"


def sign(node: E.Expr, domains: Mapping[str, Sign] | None = None) -> Sign:
    """The entrywise sign of ``node``; ``domains`` maps variable names to their signs."""
    return _sign(node, domains or {})


def _sign(node: E.Expr, d: Mapping[str, Sign]) -> Sign:
    if isinstance(node, E.Symbol):
        return symbol_sign(node, d)
    if isinstance(node, E.Number):
        return _number(node.value)
    if isinstance(node, E.Ones):
        return "pos"
    if isinstance(node, (E.Identity, E.Diag)):
        return "nonneg" if _sign(_arg(node), d) in NONNEG else "unknown"
    if isinstance(node, E.Zero):
        return "zero"
    return _compound(node, d)


def _arg(node: E.Expr) -> E.Expr:
    return node.arg if isinstance(node, E.Diag) else E.Ones(node.n)  # type: ignore[attr-defined]


def _compound(node: E.Expr, d: Mapping[str, Sign]) -> Sign:
    if isinstance(node, E.Add):
        return total([_sign(t, d) for t in node.terms])
    if isinstance(node, (E.Broadcast, E.Transpose, E.SumAll, E.Trace)):
        s = _sign(node.arg, d)
        return s if not isinstance(node, (E.SumAll, E.Trace)) or s != "pos" else "pos"
    if isinstance(node, E.Scale):
        return product(_sign(node.factor, d), _sign(node.arg, d))
    if isinstance(node, E.Hadamard):
        return _hadamard(node, d)
    if isinstance(node, E.MatMul):
        return _matmul(node, d)
    if isinstance(node, E.Divide):
        return _divide(node, d)
    return _function(node, d)


def _hadamard(node: E.Hadamard, d: Mapping[str, Sign]) -> Sign:
    if node.left == node.right:
        return "nonneg"
    return product(_sign(node.left, d), _sign(node.right, d))


def _matmul(node: E.MatMul, d: Mapping[str, Sign]) -> Sign:
    """Entrywise signs multiply through a product of nonnegative or nonpositive factors."""
    out = "pos"
    for f in node.factors:
        out = product(out, _sign(f, d))
    if out in ("pos", "neg"):
        return "nonneg" if out == "pos" else "nonpos"  # a sum of products may vanish
    return out


def _divide(node: E.Divide, d: Mapping[str, Sign]) -> Sign:
    right = _sign(node.right, d)
    if right in ("zero", "nonneg", "nonpos", "unknown"):
        return "unknown"
    return product(_sign(node.left, d), right)


def _function(node: E.Expr, d: Mapping[str, Sign]) -> Sign:
    if isinstance(node, E.Apply):
        return lookup(node.func).sign  # type: ignore[return-value]
    if isinstance(node, E.Norm):
        return "nonneg"
    if isinstance(node, E.Power):
        return _power(node, d)
    if isinstance(node, E.Extremum):
        return _extremum(node, d)
    if isinstance(node, (E.Inverse, E.PseudoInverse, E.Block)):
        return "unknown"
    raise TypeError(f"sign: unhandled node {type(node).__name__}")


def _power(node: E.Power, d: Mapping[str, Sign]) -> Sign:
    p = node.exponent
    base = _sign(node.base, d)
    if p == 0:
        return "pos"
    if p.q == 1 and p.p % 2 == 0:
        return "pos" if base in ("pos", "neg") else "nonneg"
    if p.q != 1:
        return "pos" if base == "pos" else "nonneg"  # real only on a nonnegative base
    if base in ("pos", "neg", "zero") or p > 0:
        return base if p > 0 or base != "zero" else "unknown"
    return "unknown"


def _extremum(node: E.Extremum, d: Mapping[str, Sign]) -> Sign:
    a, b = _sign(node.left, d), _sign(node.right, d)
    if node.kind == "max":
        if "pos" in (a, b):
            return "pos"
        if a in NONNEG or b in NONNEG:
            return "nonneg"
        return "nonpos" if a in NONPOS and b in NONPOS else "unknown"
    if "neg" in (a, b):
        return "neg"
    if a in NONPOS or b in NONPOS:
        return "nonpos"
    return "nonneg" if a in NONNEG and b in NONNEG else "unknown"

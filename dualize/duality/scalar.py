"""A bridge from scalar IR expressions to sympy and back.

Scalar pieces of a derivation (a coefficient such as 2 + 2 lambda, or the part
of a dual objective that depends on one free multiplier) are handed to sympy
for sign questions and closed-form maximization.  Scalar symbols become sympy
symbols carrying what is known of them (a nonnegative multiplier, positive
data); any other scalar subexpression (a norm, u'v, a sum of exponentials)
becomes an opaque sympy symbol whose sign is recorded when it is known.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import sympy

from dualize.duality import build as b
from dualize.duality.elementwise import data_symbol
from dualize.duality.keys import node_key
from dualize.model.expr import (
    Add,
    Apply,
    Divide,
    Expr,
    MatMul,
    Norm,
    Number,
    Power,
    Scale,
    SumAll,
    Symbol,
    Trace,
    Transpose,
)
from dualize.model.functions import EXP, by_sympy_head, lookup


@dataclass
class Scope:
    """The correspondence between IR scalars and sympy symbols for one translation."""

    to_ir: dict[sympy.Symbol, Expr] = field(default_factory=dict)
    by_key: dict[str, sympy.Symbol] = field(default_factory=dict)

    def symbol_for(self, e: Expr) -> sympy.Symbol:
        key = node_key(e)
        if key not in self.by_key:
            if isinstance(e, Symbol):
                sym = data_symbol(e)
            else:
                sym = sympy.Symbol(f"q{len(self.by_key)}_", real=True, **_assumptions(e))
            self.by_key[key] = sym
            self.to_ir[sym] = e
        return self.by_key[key]


def _assumptions(e: Expr) -> dict[str, bool]:
    sign = known_sign(e)
    if sign == "pos":
        return {"positive": True}
    if sign == "nonneg":
        return {"nonnegative": True}
    return {}


def known_sign(e: Expr) -> str | None:
    """'pos' or 'nonneg' when the sign of an opaque scalar follows from its form."""
    if isinstance(e, Symbol):
        if "pos" in e.facts:
            return "pos"
        if "nonneg" in e.facts or "psd" in e.facts:
            return "nonneg"
        return None
    if isinstance(e, Norm):
        return "nonneg"
    if isinstance(e, SumAll | MatMul) and _is_sum_of_exp(e):
        return "pos"
    if isinstance(e, MatMul) and _is_gram(e.factors):
        return "nonneg"
    if isinstance(e, MatMul) and _inner_of_nonnegatives(e.factors):
        return "nonneg"
    if isinstance(e, Apply) and lookup(e.func).sign in ("pos", "nonneg"):
        return lookup(e.func).sign
    return None


def _inner_of_nonnegatives(factors: tuple[Expr, ...]) -> bool:
    """u'v with u and v entrywise nonnegative (1'lambda for a multiplier lambda >= 0)."""
    if len(factors) != 2 or not isinstance(factors[0], Transpose):
        return False

    def nonneg(v: Expr) -> bool:
        return isinstance(v, b.Ones) or (isinstance(v, Symbol) and v.shape.cols == 1 and bool(
            v.facts & {"nonneg", "pos"}))

    return nonneg(factors[0].arg) and nonneg(factors[1])


def _is_sum_of_exp(e: Expr) -> bool:
    if isinstance(e, SumAll):
        return isinstance(e.arg, Apply) and e.arg.func == EXP.name
    f = e.factors  # type: ignore[attr-defined]
    return (len(f) == 2 and isinstance(f[0], Transpose) and isinstance(f[0].arg, b.Ones)
            and isinstance(f[1], Apply) and f[1].func == EXP.name)


def _is_gram(factors: tuple[Expr, ...]) -> bool:
    """u' M u with M known positive semidefinite (or absent)."""
    n = len(factors)
    for i in range(n // 2):
        if b.transpose(factors[i]) != factors[n - 1 - i]:
            return False
    if n % 2 == 1:
        middle = factors[n // 2]
        return isinstance(middle, Symbol) and "psd" in middle.facts
    return True


def to_sympy(e: Expr, scope: Scope) -> sympy.Expr:
    """The scalar IR expression ``e`` as a sympy expression in ``scope``'s symbols."""
    if isinstance(e, Number):
        return e.value
    if isinstance(e, Add):
        return sympy.Add(*(to_sympy(t, scope) for t in e.terms))
    if isinstance(e, Scale) and e.arg.shape.is_scalar:
        return to_sympy(e.factor, scope) * to_sympy(e.arg, scope)
    if isinstance(e, Power):
        return to_sympy(e.base, scope) ** e.exponent
    if isinstance(e, Divide) and e.shape.is_scalar:
        return to_sympy(e.left, scope) / to_sympy(e.right, scope)
    if isinstance(e, Apply) and e.shape.is_scalar:
        return lookup(e.func).to_sympy(to_sympy(e.arg, scope))
    if isinstance(e, Trace | SumAll) and e.arg.shape.is_scalar:
        return to_sympy(e.arg, scope)
    return scope.symbol_for(e)


def from_sympy(expr: sympy.Expr, scope: Scope) -> Expr:
    """The sympy expression back as IR (exp, log, powers, sums, products)."""
    if expr.is_Number:
        return Number(sympy.Rational(expr)) if expr.is_Rational else Number(expr)
    if isinstance(expr, sympy.Symbol):
        return scope.to_ir[expr]
    if expr.is_Add:
        return b.add(*(from_sympy(a, scope) for a in _ordered(expr.args)))
    if expr.is_Mul:
        out: Expr = b.num(1)
        for a in _ordered(expr.args):
            out = b.mul_scalars(out, from_sympy(a, scope))
        return out
    if expr.is_Pow:
        return b.power(from_sympy(expr.base, scope), sympy.Rational(expr.exp))
    function = by_sympy_head(type(expr).__name__) if isinstance(expr, sympy.Function) else None
    if function is not None:
        return b.apply(function.name, from_sympy(expr.args[0], scope))
    raise ValueError(f"no IR form for {type(expr).__name__}")


def _ordered(args: tuple[sympy.Expr, ...]) -> list[sympy.Expr]:
    return sorted(args, key=sympy.default_sort_key)

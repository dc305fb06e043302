"""The bridge between elementwise IR expressions and scalar sympy functions.

The derivation engine meets terms such as sum(x .* log(x)) or sum(exp(x)):
separable sums of one scalar function phi applied to every entry.  Their
conjugates are scalar questions, so ``scalar_form`` turns the IR into phi(t),
the conjugate module answers in s, and ``lift`` / ``lift_interval`` carry the
answer back to the IR entry by entry.  Both directions refuse (None or
LiftError) rather than guess when an expression is not entrywise.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import sympy

from dualize.model.expr import (
    SCALAR,
    Add,
    Apply,
    Broadcast,
    Divide,
    Expr,
    Extremum,
    Hadamard,
    Number,
    Ones,
    Power,
    Scale,
    Shape,
    Symbol,
    Zero,
    depends_on,
)
from dualize.model.functions import EXP, SQRT, TABLE, lookup
from dualize.model.relations import Comparison

Relation = tuple[Expr, str, Expr]
"""lhs, relation, rhs; the relation may be strict (">", "<") until the caller closes it."""
ASSUMPTIONS = {"pos": "positive", "nonneg": "nonnegative", "integer": "integer"}


class LiftError(ValueError):
    """A sympy expression has no elementwise counterpart in the IR."""


class _NotElementwise(Exception):  # noqa: N818 - private control flow, never escapes
    pass


def data_symbol(symbol: Symbol) -> sympy.Symbol:
    """The sympy scalar for a scalar data symbol, with what its facts guarantee.

    The assumptions matter: (a phi)* needs a > 0 to be known, and sympy only
    simplifies sqrt(c**2) or log(c*s) when it knows the sign of c.
    """
    flags = {ASSUMPTIONS[f]: True for f in sorted(symbol.facts) if f in ASSUMPTIONS}
    return sympy.Symbol(symbol.name, real=True, **flags)


# ---------------------------------------------------------------- IR -> sympy


@dataclass(frozen=True)
class _Target:
    var: Symbol
    t: sympy.Symbol


def scalar_form(expr: Expr, var: Symbol, t: sympy.Symbol) -> sympy.Expr | None:
    """phi with expr = phi(var) entrywise, or None when expr is not of that kind.

    Entry i of the result may depend on entry i of ``var`` and on scalar data
    only; any other variable, a non-scalar data symbol or a node that mixes
    entries (products, sums, norms) makes the answer None.  So does a function
    that is undefined everywhere (a division by a literal zero): sympy would
    carry it as complex infinity, which is no function of t.
    """
    if expr.shape != var.shape:
        return None
    try:
        phi = _to_sympy(expr, _Target(var, t))
    except (_NotElementwise, TypeError, ValueError):
        return None
    return None if phi.has(sympy.zoo, sympy.nan) else phi


def _to_sympy(node: Expr, target: _Target) -> sympy.Expr:
    handler = _HANDLERS.get(type(node))
    if handler is None:
        raise _NotElementwise(type(node).__name__)
    return handler(node, target)


def _constant(node: Expr, target: _Target) -> sympy.Expr:
    """A scalar that is the same in every entry: no trace of the variable."""
    if not node.shape.is_scalar or depends_on(node, {target.var.name}):
        raise _NotElementwise("a factor depends on the variable or is not scalar")
    return _to_sympy(node, target)


def _entrywise_shape(shape: Shape, target: _Target) -> None:
    if shape != target.var.shape and not shape.is_scalar:
        raise _NotElementwise(f"shape {shape} differs from the variable's")


def _symbol(node: Symbol, target: _Target) -> sympy.Expr:
    if node.name == target.var.name:
        return target.t
    if node.role == "data" and node.shape.is_scalar:
        return data_symbol(node)
    raise _NotElementwise(node.name)


def _number(node: Number, target: _Target) -> sympy.Expr:
    return sympy.Rational(node.value)


def _filled(node: Zero | Ones, target: _Target) -> sympy.Expr:
    _entrywise_shape(node.shape, target)
    return sympy.Integer(0 if isinstance(node, Zero) else 1)


def _broadcast(node: Broadcast, target: _Target) -> sympy.Expr:
    _entrywise_shape(node.shape, target)
    return _constant(node.arg, target)


def _add(node: Add, target: _Target) -> sympy.Expr:
    return sympy.Add(*(_to_sympy(term, target) for term in node.terms))


def _scale(node: Scale, target: _Target) -> sympy.Expr:
    return _constant(node.factor, target) * _to_sympy(node.arg, target)


def _hadamard(node: Hadamard, target: _Target) -> sympy.Expr:
    return _to_sympy(node.left, target) * _to_sympy(node.right, target)


def _divide(node: Divide, target: _Target) -> sympy.Expr:
    right = node.right
    scalar_right = right.shape.is_scalar and not node.left.shape.is_scalar
    denominator = _constant(right, target) if scalar_right else _to_sympy(right, target)
    if denominator == 0:
        raise _NotElementwise("division by zero")
    return _to_sympy(node.left, target) / denominator


def _power(node: Power, target: _Target) -> sympy.Expr:
    base, exponent = _to_sympy(node.base, target), sympy.Rational(node.exponent)
    if base == 0 and exponent < 0:
        raise _NotElementwise("a negative power of zero")
    return base**exponent


def _apply(node: Apply, target: _Target) -> sympy.Expr:
    return lookup(node.func).to_sympy(_to_sympy(node.arg, target))


def _extremum(node: Extremum, target: _Target) -> sympy.Expr:
    pick = sympy.Max if node.kind == "max" else sympy.Min
    return pick(_to_sympy(node.left, target), _to_sympy(node.right, target))


_HANDLERS: dict[type, Callable[[Expr, _Target], sympy.Expr]] = {
    Symbol: _symbol,
    Number: _number,
    Zero: _filled,
    Ones: _filled,
    Broadcast: _broadcast,
    Add: _add,
    Scale: _scale,
    Hadamard: _hadamard,
    Divide: _divide,
    Power: _power,
    Apply: _apply,
    Extremum: _extremum,
}  # type: ignore[dict-item]


# ---------------------------------------------------------------- sympy -> IR


@dataclass(frozen=True)
class _Place:
    """Where a lifted expression lands: s stands for ``arg``, of shape ``shape``."""

    s: sympy.Symbol
    arg: Expr
    shape: Shape
    data: dict[str, Symbol]

    def scalar(self) -> _Place:
        return _Place(self.s, self.arg, SCALAR, self.data)


def lift(value: sympy.Expr, s: sympy.Symbol, arg: Expr, data: dict[str, Symbol]) -> Expr:
    """value(arg_i) in every entry i, as an IR expression of arg's shape.

    SumAll(lift(phi*, s, arg, data)) is then sum_i phi*(arg_i).  Constants are
    broadcast (0 becomes Zero), numeric coefficients become Scale, and data
    symbols are looked up by name in ``data``.
    """
    return _lift(value, _Place(s, arg, arg.shape, data))


def _lift(e: sympy.Expr, place: _Place) -> Expr:
    if e == place.s:
        return place.arg
    if not e.has(place.s) and not place.shape.is_scalar:
        return _fit(_lift(e, place.scalar()), place.shape)
    if isinstance(e, sympy.Rational):
        return Number(e)
    if e is sympy.E:
        return Apply(EXP.name, Number(sympy.Integer(1)))
    if isinstance(e, sympy.Symbol):
        return _data(e, place)
    for kind, lifter in _LIFTERS:
        if isinstance(e, kind):
            return lifter(e, place)
    raise LiftError(f"no elementwise form for {e}")


def _fit(scalar: Expr, shape: Shape) -> Expr:
    if shape.is_scalar:
        return scalar
    if scalar == Number(sympy.Integer(0)):
        return Zero(shape)
    return Broadcast(scalar, shape)


def _data(e: sympy.Symbol, place: _Place) -> Expr:
    symbol = place.data.get(e.name)
    if symbol is None:
        raise LiftError(f"{e.name} is neither s nor a known data symbol")
    return symbol


def _lift_add(e: sympy.Add, place: _Place) -> Expr:
    varying = [a for a in e.args if a.has(place.s)]
    fixed = [a for a in e.args if not a.has(place.s)]
    return Add(tuple(_lift(a, place) for a in varying + fixed))


def _lift_mul(e: sympy.Mul, place: _Place) -> Expr:
    """coefficient * constants * varying / denominators, as Scale, Hadamard and Divide."""
    coefficient, rest = e.as_coeff_Mul()
    if not isinstance(coefficient, sympy.Rational):
        raise LiftError(f"the coefficient of {e} is not an exact rational")
    factors = sympy.Mul.make_args(rest)
    fixed = [f for f in factors if not f.has(place.s)]
    varying = [f for f in factors if f.has(place.s)]
    core_factors, fixed = (varying, fixed) if varying else (fixed, [])
    core = _quotient(core_factors, place)
    scalar = place.scalar()
    for factor in reversed(fixed):
        base, exponent = factor.as_base_exp()
        if exponent.is_negative:
            core = Divide(core, _lift(base ** (-exponent), scalar))
        else:
            core = Scale(_lift(factor, scalar), core)
    if coefficient != 1:
        core = Scale(Number(sympy.Rational(coefficient)), core)
    return core


def _quotient(factors: list[sympy.Expr], place: _Place) -> Expr:
    upper = [f for f in factors if not f.as_base_exp()[1].is_negative]
    lower = [f.as_base_exp()[0] ** -f.as_base_exp()[1] for f in factors if f not in upper]
    if not lower:
        return _product(upper, place)
    numerator = _product(upper, place) if upper else _fit(Number(sympy.Integer(1)), place.shape)
    return Divide(numerator, _product(lower, place))


def _product(factors: list[sympy.Expr], place: _Place) -> Expr:
    lifted = [_lift(f, place) for f in factors]
    combine = Scale if place.shape.is_scalar else Hadamard
    out = lifted[0]
    for nxt in lifted[1:]:
        out = combine(out, nxt)
    return out


def _lift_pow(e: sympy.Pow, place: _Place) -> Expr:
    base, exponent = e.args
    if not isinstance(exponent, sympy.Rational):
        raise LiftError(f"the exponent of {e} is not a rational number")
    if exponent == sympy.Rational(1, 2):
        return Apply(SQRT.name, _lift(base, place))
    return Power(_lift(base, place), sympy.Rational(exponent))


def _lift_function(name: str) -> Callable[[sympy.Expr, _Place], Expr]:
    def lifter(e: sympy.Expr, place: _Place) -> Expr:
        return Apply(name, _lift(e.args[0], place))  # type: ignore[arg-type]

    return lifter


def _lift_extremum(e: sympy.Expr, place: _Place) -> Expr:
    kind = "max" if isinstance(e, sympy.Max) else "min"
    parts = sorted(e.args, key=lambda a: (not a.has(place.s), sympy.default_sort_key(a)))
    out = _lift(parts[0], place)
    for part in parts[1:]:
        out = Extremum(kind, out, _lift(part, place))
    return out


_LIFTERS: tuple[tuple[type, Callable[[sympy.Expr, _Place], Expr]], ...] = (
    (sympy.Add, _lift_add),
    (sympy.Mul, _lift_mul),
    (sympy.Pow, _lift_pow),
    *((getattr(sympy, f.sympy_head), _lift_function(f.name))
      for f in TABLE.values() if f.sympy_head is not None),
    (sympy.Max, _lift_extremum),
    (sympy.Min, _lift_extremum),
)  # type: ignore[assignment]


def lift_interval(
    domain: sympy.Set, arg: Expr, data: dict[str, Symbol] | None = None
) -> list[Relation]:
    """The domain of s as relations on every entry of ``arg``.

    The IR has no strict relations, so an open end is reported with the
    relation "<" or ">" and the caller decides how to state it (a dual usually
    keeps the closure and notes the open end).  A single point gives "==" (the
    language's comparison);
    the whole line gives no relation at all.
    """
    place = _Place(sympy.Dummy("s"), arg, arg.shape, data or {})
    if domain == sympy.S.Reals:
        return []
    if isinstance(domain, sympy.FiniteSet) and len(domain.args) == 1:
        return [(arg, Comparison.EQ, _bound(domain.args[0], place))]
    if not isinstance(domain, sympy.Interval):
        raise LiftError(f"the domain {domain} is not an interval or a point")
    out: list[Relation] = []
    if domain.inf.is_finite:
        out.append((arg, ">" if domain.left_open else ">=", _bound(domain.inf, place)))
    if domain.sup.is_finite:
        out.append((arg, "<" if domain.right_open else "<=", _bound(domain.sup, place)))
    return out


def _bound(value: sympy.Expr, place: _Place) -> Expr:
    return _fit(_lift(value, place.scalar()), place.shape)

"""What every printer of the IR needs to know about an expression's layout.

Precedence decides where parentheses go (as few as the reading allows), the sign
split prints ``a - b`` instead of ``a + -1 b``, and the term order puts quadratic
terms before linear ones and constants last, the way papers write objectives.
The LaTeX and text printers share these rules so the two targets never disagree.
"""

from __future__ import annotations

from fractions import Fraction

import sympy

from dualize.model import expr as ir
from dualize.model.functions import lookup

ADD = 10
NEG = 15
MUL = 20
POSTFIX = 30
ATOM = 100

_ATOMS = (ir.Symbol, ir.Ones, ir.Identity, ir.Zero, ir.Norm, ir.Apply, ir.Extremum,
          ir.Diag, ir.Trace, ir.Block)
_POSTFIX = (ir.Transpose, ir.Power, ir.Inverse, ir.PseudoInverse)


def number_value(value: object) -> sympy.Expr:
    """A Number's value as a sympy expression (the IR holds sympy values; ints are tolerated)."""
    if isinstance(value, sympy.Basic):
        return value  # type: ignore[return-value]
    if isinstance(value, int):
        return sympy.Integer(value)
    if isinstance(value, Fraction):
        return sympy.Rational(value.numerator, value.denominator)
    raise TypeError(f"not an exact number: {value!r}")


def is_number(node: ir.Expr, value: int | None = None) -> bool:
    """True for a Number node (of ``value`` when given)."""
    return isinstance(node, ir.Number) and (value is None or node.value == value)


def precedence(node: ir.Expr) -> int:
    """How tightly a printed node binds: an argument looser than its context gets parentheses."""
    if isinstance(node, _ATOMS):
        return ATOM
    if isinstance(node, _POSTFIX):
        return POSTFIX
    if isinstance(node, ir.Number):
        return _number_precedence(node.value)
    if isinstance(node, ir.Add):
        return ADD if len(node.terms) > 1 else precedence(node.terms[0])
    if split_sign(node)[0]:
        return NEG
    if isinstance(node, ir.Scale) and is_number(node.factor, 1):
        return precedence(node.arg)
    if isinstance(node, ir.Broadcast) and is_number(node.arg, 1):
        return ATOM
    if isinstance(node, ir.SumAll) and node.arg.shape.is_scalar:
        return precedence(node.arg)
    return MUL


def _number_precedence(value: sympy.Expr) -> int:
    """Rationals bind as atoms (integers) or products (fractions); sizes like n + 1 as sums."""
    value = number_value(value)
    if is_negative_number(value):
        return NEG
    if value.is_Rational:
        return ATOM if value.q == 1 else MUL
    if value.is_Add:
        return ADD
    return MUL if value.is_Mul else ATOM


def is_negative_number(value: sympy.Expr) -> bool:
    """True for -3/4 and for -n: a value whose printed form opens with a minus sign."""
    value = number_value(value)
    if value.is_Rational:
        return bool(value < 0)
    return bool(value.could_extract_minus_sign())


def split_sign(node: ir.Expr) -> tuple[bool, ir.Expr]:
    """(negative, magnitude) with ``node == -magnitude`` when negative is True."""
    if isinstance(node, ir.Number) and is_negative_number(node.value):
        return True, ir.Number(-number_value(node.value))
    if isinstance(node, ir.Scale):
        negative, factor = split_sign(node.factor)
        inner_negative, arg = split_sign(node.arg)
        if negative == inner_negative:
            return False, _rescale(factor, arg) if negative else node
        return True, _rescale(factor, arg)
    if isinstance(node, ir.Broadcast | ir.Divide | ir.Hadamard | ir.MatMul):
        return _split_first(node)
    return False, node


def _rescale(factor: ir.Expr, arg: ir.Expr) -> ir.Expr:
    return arg if is_number(factor, 1) else ir.Scale(factor, arg)


def _split_first(node: ir.Expr) -> tuple[bool, ir.Expr]:
    """A product is negative when an odd number of its factors are; a quotient by its top."""
    if isinstance(node, ir.Broadcast):
        negative, arg = split_sign(node.arg)
        return negative, ir.Broadcast(arg, node.target)
    if isinstance(node, ir.MatMul):
        split = [split_sign(f) for f in node.factors]
        negative = sum(1 for sign, _ in split if sign) % 2 == 1
        return negative, ir.MatMul(tuple(f for _, f in split))
    if isinstance(node, ir.Hadamard):
        (left_sign, left), (right_sign, right) = split_sign(node.left), split_sign(node.right)
        return left_sign != right_sign, ir.Hadamard(left, right)
    negative, left = split_sign(node.left)  # type: ignore[attr-defined]
    return negative, ir.Divide(left, node.right)  # type: ignore[attr-defined]


def scalar_factors(node: ir.Scale) -> tuple[tuple[ir.Expr, ...], ir.Expr]:
    """A chain ``Scale(a, Scale(b, x))`` as its factors (a, b) and the scaled x.

    When everything is scalar the order is free, and papers put numbers first and
    compound factors last: ``1/4 gamma^-1 (u' S u)``, not ``1/4 (u' S u) gamma^-1``.
    """
    factors: list[ir.Expr] = []
    arg: ir.Expr = node
    while isinstance(arg, ir.Scale):
        factors.extend(_flatten_factor(arg.factor))
        arg = arg.arg
    if arg.shape.is_scalar:
        factors.append(arg)
        factors.sort(key=_factor_rank)
        arg = factors.pop()
    numbers = [f for f in factors if isinstance(f, ir.Number)]
    others = [f for f in factors if not isinstance(f, ir.Number)]
    coefficient = sympy.Mul(*(number_value(n.value) for n in numbers)) if numbers else None
    lead = [] if coefficient is None or coefficient == 1 else [ir.Number(coefficient)]
    return tuple(lead + others), arg


def _factor_rank(factor: ir.Expr) -> int:
    """Scalar products read numbers first, then symbols, then other simple factors, then
    compound ones (a parenthesized group, even under an exponent, comes last)."""
    if isinstance(factor, ir.Number):
        return 0
    if isinstance(factor, ir.Symbol):
        return 1
    if isinstance(factor, ir.Power | ir.Inverse | ir.Transpose | ir.PseudoInverse):
        inner = factor.base if isinstance(factor, ir.Power) else factor.arg
        return 2 if precedence(inner) > POSTFIX else 3
    return 2 if precedence(factor) >= POSTFIX else 3


def _flatten_factor(factor: ir.Expr) -> list[ir.Expr]:
    if isinstance(factor, ir.Scale) and factor.arg.shape.is_scalar:
        return _flatten_factor(factor.factor) + _flatten_factor(factor.arg)
    return [factor]


def as_sum_of_entries(node: ir.MatMul) -> ir.Expr | None:
    """``a' * 1`` is the sum of a's entries: shown as ``1' a``, the way papers write it."""
    if len(node.factors) != 2:
        return None
    first, second = node.factors
    ones = isinstance(second, ir.Ones) or (
        isinstance(second, ir.Broadcast) and is_number(second.arg, 1))
    if ones and isinstance(first, ir.Transpose) and first.arg.shape.cols == 1:
        return ir.SumAll(first.arg)
    return None


def flat_terms(node: ir.Add) -> tuple[ir.Expr, ...]:
    """The terms of nested sums, in the order written."""
    out: list[ir.Expr] = []
    for term in node.terms:
        out.extend(flat_terms(term) if isinstance(term, ir.Add) else (term,))
    return tuple(out)


def ordered_terms(node: ir.Add) -> tuple[ir.Expr, ...]:
    """Quadratic and higher terms first, then other nonlinear ones, linear, constant.

    Degrees count the primal variables when the sum has any (so a Lagrangian keeps
    the objective's shape, multiplier terms counting as linear), else the
    multipliers (a dual objective).  The sort is stable, so terms of one kind keep
    the order they were written in; a sum is not made to open with a minus sign
    when it has a positive term: the positive terms of the first positive kind
    lead (``1 - s``, not ``-s + 1``), as authors write it.
    """
    terms = flat_terms(node)
    roles = PRIMAL if any(_mentions(t, PRIMAL) for t in terms) else DUAL
    ordered = sorted(terms, key=lambda t: _term_rank(t, roles))
    if not split_sign(ordered[0])[0]:
        return tuple(ordered)
    positive = [t for t in ordered if not split_sign(t)[0]]
    if not positive:
        return tuple(ordered)
    lead_rank = _term_rank(positive[0], roles)
    lead = [t for t in positive if _term_rank(t, roles) == lead_rank]
    chosen = {id(p) for p in lead}
    return tuple(lead + [t for t in ordered if id(t) not in chosen])


PRIMAL = frozenset({"variable", "auxiliary"})
DUAL = frozenset({"multiplier"})


def _mentions(node: ir.Expr, roles: frozenset[str]) -> bool:
    return any(isinstance(n, ir.Symbol) and n.role in roles for n in ir.walk(node))


def _term_rank(term: ir.Expr, roles: frozenset[str]) -> int:
    d = degree(term, roles)
    if d is None:
        return 1
    return 0 if d >= 2 else 3 - d  # degree 1 -> 2, constants -> 3


def degree(node: ir.Expr, roles: frozenset[str] = PRIMAL | DUAL) -> int | None:
    """Polynomial degree in the symbols of ``roles``; None for other nonlinear terms."""
    if isinstance(node, ir.Symbol):
        return 1 if node.role in roles else 0
    if isinstance(node, ir.Number | ir.Ones | ir.Identity | ir.Zero):
        return 0
    if isinstance(node, ir.Add | ir.Extremum | ir.Block):
        return _max_degree(node.children(), roles)
    if isinstance(node, ir.MatMul | ir.Hadamard | ir.Scale):
        return _sum_degree(node.children(), roles)
    if isinstance(node, ir.Power):
        return _power_degree(node, roles)
    if isinstance(node, ir.Divide):
        if degree(node.right, roles) == 0:
            return degree(node.left, roles)
        return _nonpolynomial(node, roles)
    if isinstance(node, ir.Apply) and lookup(node.func).homogeneous:
        return degree(node.arg, roles)
    if isinstance(node, ir.Norm | ir.Transpose | ir.Broadcast | ir.SumAll | ir.Diag
                  | ir.Trace):
        return degree(node.children()[0], roles)
    return _nonpolynomial(node, roles)


def _nonpolynomial(node: ir.Expr, roles: frozenset[str]) -> int | None:
    """Constant when no counted symbol occurs, else not a polynomial."""
    constant = all(degree(c, roles) == 0 for c in node.children())
    return 0 if constant else None


def _power_degree(node: ir.Power, roles: frozenset[str]) -> int | None:
    base = degree(node.base, roles)
    if base == 0:
        return 0
    exponent = sympy.Rational(node.exponent)
    if base is None or exponent.q != 1 or exponent < 0:
        return None
    return base * int(exponent)


def _max_degree(children: tuple[ir.Expr, ...], roles: frozenset[str]) -> int | None:
    degrees = [degree(c, roles) for c in children]
    return None if None in degrees else max(degrees, default=0)  # type: ignore[type-var]


def _sum_degree(children: tuple[ir.Expr, ...], roles: frozenset[str]) -> int | None:
    degrees = [degree(c, roles) for c in children]
    return None if None in degrees else sum(degrees)  # type: ignore[arg-type]

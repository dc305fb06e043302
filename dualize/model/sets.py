"""What a set means: a shape, the facts it states, and (on variables) a domain.

On data a set is a fact (``C in R_++`` makes C > 0 known); on a variable it is
the domain of the inner minimization.  Integer, binary and box sets are domains
only, so they are refused on data.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import sympy

from dualize.model import rules as M
from dualize.model.expr import ONE, SCALAR, Expr, Number, Scale, Shape, Symbol
from dualize.model.problem import Domain, DomainKind
from dualize.model.scope import Scope
from dualize.syntax import ast

SIGN_FACTS = {"": frozenset(), "+": frozenset({"nonneg"}), "++": frozenset({"nonneg", "pos"})}
SIGN_KIND: dict[str, DomainKind] = {"": "free", "+": "nonneg", "++": "pos"}
SYM_FACTS = {"": frozenset({"symmetric"}), "+": frozenset({"symmetric", "psd"}),
             "++": frozenset({"symmetric", "psd", "pd"})}
SYM_KIND: dict[str, DomainKind] = {"": "symmetric", "+": "psd", "++": "pd"}
REAL_NAMES = frozenset({"R", "ℝ"})


@dataclass(frozen=True)
class SetMeaning:
    shape: Shape
    facts: frozenset[str]
    domain: Domain


BoundResolver = Callable[[ast.Expr], Expr]


def set_meaning(s: ast.SetExpr, scope: Scope, bound: BoundResolver) -> SetMeaning:
    """The meaning of a set as written (for a variable; data call ``check_data_set``)."""
    if isinstance(s, ast.NamedSet):
        return _named(s, scope)
    if isinstance(s, ast.BinarySet):
        return _binary(s, scope)
    return _box(s, scope, bound)


def check_data_set(s: ast.SetExpr, meaning: SetMeaning, name: str, scope: Scope) -> None:
    """Integer, binary and box sets are domains: refuse them on data."""
    if meaning.domain.kind in {"integer", "binary", "box"}:
        label = {"integer": "Z", "binary": "{0,1}", "box": "a box [lo, hi]"}
        raise scope.fail(M.SET_NOT_ALLOWED, s.span, set=label[meaning.domain.kind], name=name,
                         hint="state the fact as a constraint on a variable instead")


def _sizes(sizes: tuple[ast.Size, ...], scope: Scope) -> tuple[sympy.Expr, ...]:
    return tuple(_size(s, scope) for s in sizes)


def _size(size: ast.Size, scope: Scope) -> sympy.Expr:
    if size.is_number:
        if int(size.text) < 1:
            raise scope.fail(M.BAD_SIZE, size.span, size=size.text)
        return sympy.Integer(int(size.text))
    if not size.text[0].isalpha():
        raise scope.fail(M.BAD_SIZE, size.span, size=size.text)
    return scope.dimension(size.text)


def _shape(dims: tuple[sympy.Expr, ...]) -> Shape:
    if not dims:
        return SCALAR
    return Shape(dims[0], ONE) if len(dims) == 1 else Shape(dims[0], dims[1])


def _named(s: ast.NamedSet, scope: Scope) -> SetMeaning:
    dims = _sizes(s.sizes, scope)
    if s.name in REAL_NAMES:
        return SetMeaning(_shape(dims), SIGN_FACTS[s.sign], Domain(SIGN_KIND[s.sign]))
    if s.name == "S":
        if len(dims) != 1:
            raise scope.fail(M.BAD_SET, s.span, message="S takes one size: S^n is n-by-n")
        return SetMeaning(Shape(dims[0], dims[0]), SYM_FACTS[s.sign], Domain(SYM_KIND[s.sign]))
    if s.name == "Z":
        if s.sign:
            raise scope.fail(M.BAD_SET, s.span, message="Z takes no sign suffix",
                             hint="write the bound as a constraint, e.g. z >= 0")
        return SetMeaning(_shape(dims), frozenset({"integer"}), Domain("integer"))
    raise scope.fail(M.UNKNOWN_SET, s.span, name=s.name,
                     hint="sets are R, S, Z, {0,1} and [lo, hi], e.g. R^n or S^n_+")


def _binary(s: ast.BinarySet, scope: Scope) -> SetMeaning:
    if (s.low.value, s.high.value) != (0, 1):
        raise scope.fail(M.BAD_SET, s.span, message="the only finite set is {0,1}",
                         hint="for an interval write a box [lo, hi]")
    dims = _sizes(s.sizes, scope)
    return SetMeaning(_shape(dims), frozenset({"binary", "integer", "nonneg"}), Domain("binary"))


def _box(s: ast.BoxSet, scope: Scope, bound: BoundResolver) -> SetMeaning:
    lo, hi = _bound(s.lo, scope, bound), _bound(s.hi, scope, bound)
    dims = _sizes(s.sizes, scope)
    facts: frozenset[str] = frozenset()
    if isinstance(lo, Number) and lo.value >= 0:
        facts = SIGN_FACTS["++" if lo.value > 0 else "+"]
    return SetMeaning(_shape(dims), facts, Domain("box", lo, hi))


def _bound(e: ast.Expr, scope: Scope, bound: BoundResolver) -> Expr:
    value = bound(e)
    if _is_constant_scalar(value):
        return value
    moving = isinstance(value, Symbol) and value.role != "data"
    found = "a variable" if moving else f"a {value.shape}"
    raise scope.fail(M.BAD_BOX_BOUND, e.span, found=found)


def _is_constant_scalar(value: Expr) -> bool:
    if isinstance(value, Number):
        return True
    if isinstance(value, Scale) and value.factor == Number(sympy.Integer(-1)):
        value = value.arg
    return isinstance(value, Symbol) and value.role == "data" and value.shape.is_scalar

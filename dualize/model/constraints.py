"""Constraints as written -> normalized constraints with their multipliers.

Normalization follows the language's sign conventions: ``f <= g`` gives
``f - g <= 0``, ``f >= g`` gives ``g - f <= 0``, ``f == g`` gives ``f - g = 0``,
``F succeq G`` gives ``G - F preceq 0`` and ``F preceq G`` gives ``F - G``.
A zero side is dropped (``f - 0`` is ``f``; ``0 - f`` is ``-1 * f``).
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass

from dualize.model import ops
from dualize.model import rules as M
from dualize.model.expr import Expr, Symbol
from dualize.model.expressions import ExprResolver
from dualize.model.problem import Constraint, ConstraintKind
from dualize.model.relations import Comparison
from dualize.model.symmetry import is_symmetric
from dualize.syntax import ast
from dualize.syntax.span import Span

KIND: dict[Comparison, ConstraintKind] = {
    Comparison.LE: "ineq", Comparison.GE: "ineq", Comparison.EQ: "eq",
    Comparison.SUCCEQ: "psd", Comparison.PRECEQ: "psd"}
MULTIPLIER_FACTS = {"ineq": frozenset({"nonneg"}), "psd": frozenset({"symmetric", "psd"}),
                    "eq": frozenset()}


@dataclass(frozen=True)
class Piece:
    """One relation of a (possibly chained) constraint, before resolution."""

    label: ast.Label | None
    lhs: ast.Expr
    relation: ast.Relation
    rhs: ast.Expr
    span: Span


def pieces(c: ast.Constraint) -> Iterator[Piece]:
    """A chain ``lo <= x <= hi`` is two pieces, one label each."""
    for i, relation in enumerate(c.relations):
        label = c.labels[i] if i < len(c.labels) else None
        lhs, rhs = c.parts[i], c.parts[i + 1]
        start = label.span if label is not None else lhs.span
        yield Piece(label, lhs, relation, rhs, start.merge(rhs.span))


def multiplier_names(ps: list[Piece], taken: set[str]) -> list[str]:
    """Labels, else lambda1, lambda2, ... (inequalities) and nu1, nu2, ... (equalities).

    A generated name already used by the file (a data, variable, size or label
    name) is skipped: the counter moves on to the next free number.
    """
    counters = {"lambda": 0, "nu": 0}
    names = []
    for p in ps:
        if p.label is not None:
            names.append(p.label.name)
            continue
        stem = "nu" if KIND[p.relation.op] == "eq" else "lambda"
        counters[stem] += 1
        while f"{stem}{counters[stem]}" in taken:
            counters[stem] += 1
        names.append(f"{stem}{counters[stem]}")
    return names


def build(p: Piece, name: str, resolve: ExprResolver) -> Constraint:
    """The normalized constraint for one piece (raises ResolveError on a defect)."""
    lhs, rhs = resolve(p.lhs), resolve(p.rhs)
    kind = KIND[p.relation.op]
    what = f"in the constraint `{p.relation.text}`"
    lhs, rhs = ops.conform(lhs, rhs, what, resolve.scope, p.span)
    if kind == "psd":
        _check_symmetric(lhs, rhs, p, resolve)
    function = _function(p.relation.op, lhs, rhs)
    multiplier = Symbol(name, "multiplier", function.shape, MULTIPLIER_FACTS[kind],
                        span=p.label.span if p.label else p.span)
    return Constraint(name, kind, p.relation.op, lhs, rhs, function, multiplier,
                      p.label is not None, p.span)


def _function(op: str, lhs: Expr, rhs: Expr) -> Expr:
    if op in {Comparison.LE, Comparison.EQ, Comparison.PRECEQ}:
        return ops.difference(lhs, rhs, lhs.span)
    return ops.difference(rhs, lhs, rhs.span)


def _check_symmetric(lhs: Expr, rhs: Expr, p: Piece, resolve: ExprResolver) -> None:
    for side, expr, node in (("left", lhs, p.lhs), ("right", rhs, p.rhs)):
        if not is_symmetric(expr):
            raise resolve.scope.fail(M.NOT_SYMMETRIC, node.span, relation=p.relation.op,
                                     side=side,
                                     hint="declare the data in S^n, or symmetrize: (B + B')/2")

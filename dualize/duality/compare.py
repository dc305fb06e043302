"""Comparing expressions that come from different sources (a derivation and a
claim written by a user) up to the roles of their names."""

from __future__ import annotations

from dataclasses import fields, replace

from dualize.duality.normal import equal
from dualize.model.expr import Add, Block, Divide, Expr, MatMul, Symbol, substitute, symbols_of
from dualize.model.relations import Relation, relation_of


def _plain(e: Expr) -> Expr:
    """Every symbol as a data symbol of its name and shape; only symmetry is kept,
    since it is the one fact that changes the algebra (S' = S).  Divisions by a
    scalar become powers, so 1/(2h) and 1/2 h^-1 compare equal."""
    mapping: dict[Expr, Expr] = {}
    for s in symbols_of(e):
        facts = frozenset({"symmetric"}) & s.facts
        mapping[s] = Symbol(s.name, "data", s.shape, facts)
    return _undivided(substitute(e, mapping))


def _undivided(e: Expr) -> Expr:
    """``e`` with every a / d for a scalar d written as d^-1 a, children first."""
    from dualize.duality import build as b

    if isinstance(e, Block):
        return Block(tuple(tuple(_undivided(x) for x in row) for row in e.rows))
    changes = {f.name: _undivided(getattr(e, f.name)) for f in fields(e)
               if isinstance(getattr(e, f.name), Expr)}
    if isinstance(e, Add):
        changes["terms"] = tuple(_undivided(t) for t in e.terms)
    elif isinstance(e, MatMul):
        changes["factors"] = tuple(_undivided(f) for f in e.factors)
    e = replace(e, **changes) if changes else e
    if isinstance(e, Divide) and e.right.shape.is_scalar:
        return b.divide(e.left, e.right)
    return e


def same_expression(a: Expr, c: Expr) -> bool:
    """True when ``a`` and ``c`` are provably equal by the rules of linear algebra.

    False means no proof was found, not that they differ: the numeric check
    decides those cases.
    """
    if a.shape != c.shape:
        return False
    return equal(_plain(a), _plain(c))


_TO_LE = {Relation.LE: 1, Relation.GE: -1, Relation.PRECEQ: 1, Relation.SUCCEQ: -1,
          Relation.EQ: 1}
_KIND = {Relation.LE: "ineq", Relation.GE: "ineq", Relation.PRECEQ: "psd",
         Relation.SUCCEQ: "psd", Relation.EQ: "eq"}


def normalized(lhs: Expr, relation: str, rhs: Expr) -> tuple[str, Expr]:
    """(kind, E) with the constraint read as E <= 0, E = 0 or E preceq 0."""
    from dualize.duality import build as b

    relation = relation_of(relation)
    sign = _TO_LE[relation]
    e = b.sub(lhs, rhs) if sign > 0 else b.sub(rhs, lhs)
    return _KIND[relation], _plain(e)


def same_constraint(a: tuple[Expr, str, Expr], c: tuple[Expr, str, Expr]) -> bool:
    """True when the two constraints are the same up to a constant factor
    (positive for inequalities, nonzero for equalities) and the side terms sit on."""
    from dualize.duality.normal import expand, node_key

    kind_a, ea = normalized(*a)
    kind_c, ec = normalized(*c)
    if kind_a != kind_c or ea.shape != ec.shape:
        return False
    ta, tc = expand(ea, keep_forms=False), expand(ec, keep_forms=False)
    key = lambda t: "|".join(map(node_key, t.scalars + t.chain))  # noqa: E731
    if sorted(map(key, ta)) != sorted(map(key, tc)) or not ta:
        return False
    ratios = {key(t): t.coef for t in ta}
    factor = None
    for t in tc:
        r = ratios[key(t)] / t.coef
        if factor is None:
            factor = r
        elif r != factor:
            return False
    return factor is not None and (factor > 0 or kind_a == "eq")

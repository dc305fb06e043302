"""Which claim variable stands for which derived dual variable.

Names first (a user who kept the constraint labels as multiplier names), then
shapes, in the order both sides declare them (a user who renamed ``z`` to
``nu``).  The pairing only serves the symbolic comparison and the report: the
numeric comparison looks at optimal values, which do not depend on names.
"""

from __future__ import annotations

from dataclasses import dataclass

from dualize.duality.result import DualProblem
from dualize.model.expr import Expr, Symbol, substitute
from dualize.model.problem import Problem


@dataclass(frozen=True)
class Match:
    """``claim`` (a claim variable) paired with ``derived``; ``how`` is name | shape."""

    claim: str
    derived: str
    how: str


@dataclass(frozen=True)
class Matching:
    pairs: tuple[Match, ...]
    unmatched_claim: tuple[str, ...]
    unmatched_derived: tuple[str, ...]

    @property
    def complete(self) -> bool:
        return not self.unmatched_claim and not self.unmatched_derived


def match_variables(claim: Problem, dual: DualProblem) -> Matching:
    """Pair the claim's variables with the dual's: by name, then by shape in order."""
    derived = {v.name: v.symbol for v in dual.variables}
    pairs: list[Match] = []
    left = [v.symbol for v in claim.variables]
    for sym in list(left):
        other = derived.get(sym.name)
        if other is not None and other.sym_shape == sym.sym_shape:
            pairs.append(Match(sym.name, sym.name, "name"))
            left.remove(sym)
            del derived[sym.name]
    for sym in list(left):
        other = next((d for d in derived.values() if d.sym_shape == sym.sym_shape), None)
        if other is not None:
            pairs.append(Match(sym.name, other.name, "shape"))
            left.remove(sym)
            del derived[other.name]
    order = {v.name: i for i, v in enumerate(claim.variables)}
    pairs.sort(key=lambda m: order[m.claim])
    return Matching(tuple(pairs), tuple(s.name for s in left), tuple(derived))


def renamed(e: Expr, claim: Problem, matching: Matching,
            flipped: frozenset[str] = frozenset()) -> Expr:
    """A claim expression with every matched variable under its derived name, and the
    ``flipped`` ones (claim names) replaced by their negatives."""
    from dualize.duality.build import neg

    by_name = {v.name: v.symbol for v in claim.variables}
    mapping: dict[Expr, Expr] = {}
    for m in matching.pairs:
        sym = by_name[m.claim]
        new = Symbol(m.derived, "multiplier", sym.sym_shape, sym.facts)
        mapping[sym] = neg(new) if m.claim in flipped else new
    return substitute(e, mapping) if mapping else e

"""The symbolic half of a check: is the claim the derived dual, written differently?

Both sides become an objective and a set of constraints.  Variable sets count
as constraints (a derived ``y`` in R^m_+ is ``y >= 0``; a claim variable
declared in ``R^m_+`` is too, and a box ``[lo, hi]^m`` is two inequalities),
so a claim that writes ``alpha >= 0`` where the derivation gave a nonnegative
multiplier matches.  A proof needs every variable paired, the objectives equal
by the rules of linear algebra (``same_expression``) or as rational functions put
over one denominator (``rational.same_rational_form``), and each constraint of one
side matched by one of the other up to a positive factor (``same_constraint``).
No proof is not a disproof: the numeric half then decides.

Sign conventions differ between books (Boyd and Vandenberghe price ``b - Ax``
where the language prices ``Ax - b``), so a free claim variable may also be
matched with its sign turned round: ``nu -> -nu`` maps the claim's feasible
set onto itself one to one and keeps every objective value, so the optimal
values agree.  Up to ``MAX_FLIPPED`` free variables are tried that way.
"""

from __future__ import annotations

from dataclasses import dataclass

from dualize.checking.canonical import canonical
from dualize.checking.matching import Matching, renamed
from dualize.checking.rational import same_rational_form
from dualize.duality import build as b
from dualize.duality.result import DualProblem
from dualize.model.expr import Expr, Symbol
from dualize.model.problem import Problem

Triple = tuple[Expr, str, Expr]
_COMPARABLE = ("<=", ">=", "=", "succeq", "preceq")
MAX_FLIPPED = 3


@dataclass(frozen=True)
class SymbolicResult:
    """``proved`` True only with a full proof; ``reasons`` say what stopped one."""

    proved: bool
    reasons: tuple[str, ...]
    flipped: tuple[str, ...] = ()


def derived_constraints(dual: DualProblem) -> list[Triple]:
    """The dual's constraints with its variables' sets written as constraints."""
    out: list[Triple] = [(c.lhs, c.relation, c.rhs) for c in dual.constraints]
    for v in dual.variables:
        out += _set_constraints(v.symbol, v.set)
    return out


def _set_constraints(sym: Symbol, kind: str) -> list[Triple]:
    zero = b.zeros(sym.sym_shape)
    if kind == "nonneg":
        return [(sym, ">=", zero)]
    if kind == "nonpos":
        return [(sym, "<=", zero)]
    if kind in ("psd", "pd"):
        return [(sym, "succeq", zero)]
    return []


def claim_constraints(claim: Problem) -> list[Triple]:
    """The claim's constraints as written, with its variables' domains as constraints."""
    out: list[Triple] = [(c.lhs, c.relation.relation, c.rhs)
                         for c in claim.constraints]
    for v in claim.variables:
        kind = v.domain.kind
        if kind == "box":
            shape = v.symbol.sym_shape
            out += [(v.symbol, ">=", b.broadcast(v.domain.lo, shape)),
                    (v.symbol, "<=", b.broadcast(v.domain.hi, shape))]
        else:
            out += _set_constraints(v.symbol, kind)
    return out


def unsupported_domains(claim: Problem) -> list[str]:
    """Claim variables whose domain has no constraint form here (strict or integer sets)."""
    return [f"{v.name} in a {v.domain.kind} set" for v in claim.variables
            if v.domain.kind in ("pos", "pd", "integer", "binary")]


def compare_symbolically(claim: Problem, dual: DualProblem, matching: Matching
                         ) -> SymbolicResult:
    """Try to prove the claim equal to the derived dual (see the module docstring)."""
    reasons = _preconditions(claim, dual, matching)
    if reasons:
        return SymbolicResult(False, tuple(reasons))
    first = _attempt(claim, dual, matching, frozenset())
    if not first:
        return SymbolicResult(True, ())
    for flips in _flip_sets(claim, matching):
        if not _attempt(claim, dual, matching, flips):
            return SymbolicResult(True, (), tuple(sorted(flips)))
    return SymbolicResult(False, tuple(first))


def _flip_sets(claim: Problem, matching: Matching) -> list[frozenset[str]]:
    """Nonempty sets of free matched claim variables, smallest first, in declared order."""
    from itertools import combinations

    matched = {m.claim for m in matching.pairs}
    free = [v.name for v in claim.variables if v.domain.kind == "free" and v.name in matched]
    if len(free) > MAX_FLIPPED:
        return []
    return [frozenset(c) for k in range(1, len(free) + 1) for c in combinations(free, k)]


def _attempt(claim: Problem, dual: DualProblem, matching: Matching,
             flips: frozenset[str]) -> list[str]:
    """What keeps the claim, with ``flips`` negated, from being the derived dual."""
    from dualize.duality.compare import same_expression

    reasons = []
    objective = canonical(renamed(claim.objective, claim, matching, flips))
    derived = canonical(dual.objective)
    if not same_expression(derived, objective) and not same_rational_form(derived, objective):
        reasons.append("the objectives were not proved equal")
    mine = [_rename(t, claim, matching, flips) for t in claim_constraints(claim)]
    theirs = [_canonical(t) for t in derived_constraints(dual)]
    reasons += [f"claim constraint {_show(t)} has no counterpart in the derived dual"
                for t in mine if not _has_match(t, theirs)]
    reasons += [f"derived constraint {_show(t)} has no counterpart in the claim"
                for t in theirs if not _has_match(t, mine)]
    return reasons


def _preconditions(claim: Problem, dual: DualProblem, matching: Matching) -> list[str]:
    reasons = []
    if not dual.closed_form:
        reasons.append("the derived dual has no closed form to compare with")
    if matching.unmatched_claim:
        reasons.append("claim variables without a derived counterpart: "
                       + ", ".join(matching.unmatched_claim))
    if matching.unmatched_derived:
        reasons.append("derived dual variables without a claim counterpart: "
                       + ", ".join(matching.unmatched_derived))
    reasons += [f"no symbolic form for {text}" for text in unsupported_domains(claim)]
    return reasons


def _rename(t: Triple, claim: Problem, matching: Matching, flips: frozenset[str]) -> Triple:
    return _canonical((renamed(t[0], claim, matching, flips), t[1],
                       renamed(t[2], claim, matching, flips)))


def _canonical(t: Triple) -> Triple:
    return canonical(t[0]), t[1], canonical(t[2])


def _has_match(t: Triple, pool: list[Triple]) -> bool:
    from dualize.duality.compare import same_constraint

    if t[1] not in _COMPARABLE:
        return False
    return any(p[1] in _COMPARABLE and same_constraint(t, p) for p in pool)


def _show(t: Triple) -> str:
    from dualize.render.text_printer import text_expr, text_relation

    return f"{text_expr(t[0])} {text_relation(t[1])} {text_expr(t[2])}"

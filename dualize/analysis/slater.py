"""The strong-duality verdict: Slater's condition, refined for affine constraints.

S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.3: a convex
problem has zero duality gap when some x in the relative interior of the
domain satisfies every nonaffine inequality strictly and the affine
constraints (the refined condition: affine inequalities need only hold).
Variables' polyhedral domains (R_+, boxes) act like affine constraints: the
partial dual's bound is at least the full dual's, which is tight under the
refined condition.  "guaranteed" is said only with a proof; on symbolic data
without one the verdict is "unknown".
"""

from __future__ import annotations

from dualize.analysis.convexity import Convexity, variable_signs
from dualize.analysis.measured import Measured
from dualize.analysis.report import Verdict
from dualize.deadline import Deadline
from dualize.model import expr as E
from dualize.model.functions import ArgumentDomain, lookup
from dualize.model.problem import Problem

STRICT_CLASSES = frozenset({"convex-inequality", "linear-matrix-inequality"})
WEAK_ONLY = ("the problem is not convex: weak duality only (the dual optimum is {bound} "
             "on the primal optimum, possibly with a gap)")


def strong_duality(problem: Problem, conv: Convexity,
                   instance: Measured | None = None, deadline: Deadline | None = None) -> Verdict:
    """The verdict for ``problem`` given its convexity analysis (and, to decide it on
    numbers, an instance with its evaluator); past ``deadline`` no further candidate
    point is tried and the verdict says so."""
    if not problem.constraints and conv.convex is not None:
        return Verdict("guaranteed", "no constraint is dualized: the dual function's only "
                       "value is the primal optimal value itself")
    if not problem.constraints:
        return Verdict("unknown", "convexity could not be decided: with no constraint the "
                       "plain dual is the primal optimum itself, but the derivation may "
                       "introduce auxiliary equalities (u = an affine argument) whose dual "
                       "needs convexity")
    if conv.convex is False:
        bound = "a lower bound" if problem.sense == "minimize" else "an upper bound"
        return Verdict("not-guaranteed", WEAK_ONLY.format(bound=bound))
    if conv.convex is None:
        return Verdict("unknown", "convexity could not be decided, so neither could Slater's "
                       "condition")
    if instance is not None:
        from dualize.analysis.phase_one import numeric_verdict

        return numeric_verdict(problem, frozenset(strict_labels(problem, conv)), instance)
    return symbolic_verdict(problem, conv, deadline)


def strict_labels(problem: Problem, conv: Convexity) -> tuple[str, ...]:
    """Constraints Slater's condition asks to hold strictly (nonaffine ones, LMIs)."""
    return tuple(p.label for p in conv.constraints if p.kind in STRICT_CLASSES)


def domain_caveats(problem: Problem) -> tuple[str, ...]:
    """Closed, non-polyhedral domains whose relative interior a point must reach."""
    out = [f"{v.name} positive definite"
           for v in problem.variables if v.domain.kind == "psd"]
    exprs = [problem.objective] + [c.function for c in problem.constraints]
    for node in (n for e in exprs for n in E.walk(e)):
        if isinstance(node, E.Apply) and _closed_domain(node.func) and _varies(node.arg):
            out.append(f"{node.func} needs its argument > 0")
        if isinstance(node, E.Power) and node.exponent.q != 1 and _varies(node.base):
            out.append("a fractional power needs its base > 0")
    return tuple(sorted(set(out)))


def _closed_domain(name: str) -> bool:
    """A function whose argument may reach 0 but whose interior asks it positive (sqrt)."""
    function = lookup(name)
    return function.keep_positive and function.domain is ArgumentDomain.NONNEG


def _varies(node: E.Expr) -> bool:
    return bool(E.symbols_of(node, "variable"))


def symbolic_verdict(problem: Problem, conv: Convexity,
                     deadline: Deadline | None = None) -> Verdict:
    """Refined Slater on symbolic data: a scalar sympy search, then structural points
    (the origin, large slacks); without one, affine problems hold when feasible.  Each
    search runs to its end; past ``deadline`` the next is not started."""
    from dualize.analysis.slack_point import slack_candidate
    from dualize.analysis.slater_symbolic import scalar_search, zero_candidate

    searches = (lambda: scalar_search(problem, conv),
                lambda: zero_candidate(problem, conv, variable_signs(problem)),
                lambda: slack_candidate(problem, conv))
    for search in searches:
        if deadline is not None and deadline.expired():
            return _out_of_time(problem, conv, deadline)
        found = search()
        if found is not None:
            return found
    strict, caveats = strict_labels(problem, conv), domain_caveats(problem)
    if not strict and not caveats:
        return Verdict("guaranteed", AFFINE_REASON)
    return _undecided(problem, strict, caveats)


def _out_of_time(problem: Problem, conv: Convexity, deadline: Deadline) -> Verdict:
    strict = strict_labels(problem, conv)
    detail = (f"the time limit of {deadline.seconds or 0:g} s was reached before every "
              "candidate point was tried")
    return Verdict("unknown", f"Slater's condition was not decided ({detail}); raise "
                   "--time-limit, or give an instance with --data",
                   finding="slater-undecided", detail=detail,
                   label=strict[0] if strict else None)


def _undecided(problem: Problem, strict: tuple[str, ...], caveats: tuple[str, ...]) -> Verdict:
    if strict:
        detail = f"a point must satisfy {', '.join(strict)} strictly"
    else:
        detail = f"a feasible point must lie inside the domain: {'; '.join(caveats)}"
    if not problem.data:
        detail += ("; no simple candidate point works and the problem has no data: an empty "
                   "instance ({}) lets --data search numerically")
    return Verdict("unknown", f"Slater's condition cannot be decided on symbolic data "
                   f"({detail}); give an instance with --data",
                   finding="slater-undecided", detail=detail,
                   label=strict[0] if strict else None)


AFFINE_REASON = ("all constraints are affine and the domain is polyhedral or open: by the "
                 "refined Slater condition (Boyd and Vandenberghe, 2004, section 5.2.3) "
                 "strong duality holds whenever the problem is feasible")

"""The Lagrangian and its multipliers, with the sign conventions of the language.

Every constraint is normalized (f <= 0, h = 0, F preceq 0) by the resolver;
here each gets its multiplier's set and the Lagrangian is

    L = f0 + sum_i <y_i, f_i(x)>

with inner products taken entrywise (trace for matrices).  A maximization
``maximize f`` is dualized as ``minimize -f``: the Lagrangian shown to the
reader is the natural one, f - sum_i <y_i, f_i>, and the dual is stated as a
minimization of its supremum.
"""

from __future__ import annotations

from dualize.duality import build as b
from dualize.duality.result import DualVariable
from dualize.model.expr import Expr
from dualize.model.problem import Constraint, Problem

_SETS = {"ineq": "nonneg", "eq": "free", "psd": "psd"}


def multipliers(problem: Problem) -> tuple[DualVariable, ...]:
    return tuple(
        DualVariable(c.multiplier, _SETS[c.kind], c.label)  # type: ignore[arg-type]
        for c in problem.constraints
    )


def constraint_term(c: Constraint) -> Expr:
    """<y, f> for one normalized constraint."""
    return b.inner(c.multiplier, c.function)


def lagrangian(problem: Problem) -> tuple[Expr, Expr]:
    """(the Lagrangian as shown, the Lagrangian of the minimization form)."""
    terms = [constraint_term(c) for c in problem.constraints]
    if problem.sense == "minimize":
        shown = b.add(problem.objective, *terms)
        return shown, shown
    shown = b.sub(problem.objective, b.add(*terms)) if terms else problem.objective
    return shown, b.neg(shown)

"""The numeric half of a check: three optimal values on one instance.

On each instance the primal is solved by the reference (p), the derived dual
by its own solve (d), and the claim, posed as a dual problem over its own
variables, likewise (c).  The claim is only ever solved, never trusted: it is
translated with the same reference translation as the derived dual
(``dualize.numeric.reference.solve_dual``), so both are held to one standard.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from dualize.duality import build as b
from dualize.duality.result import Derivation, DualConstraint, DualProblem, DualVariable
from dualize.model.problem import Problem
from dualize.model.relations import relation_of
from dualize.numeric.instance import Instance

SOLVED = ("optimal", "inaccurate", "local")
_SETS = {"free": "free", "nonneg": "nonneg", "pos": "nonneg", "box": "free",
         "symmetric": "symmetric", "psd": "psd", "pd": "psd"}


@dataclass(frozen=True)
class Values:
    """One instance: the three values and their statuses, as the solvers reported them."""

    source: str
    seed: int | None
    primal_value: float
    primal_status: str
    dual_value: float
    dual_status: str
    claim_value: float
    claim_status: str
    note: str = ""
    claim_point: dict = field(default_factory=dict, compare=False, repr=False)
    """The claim's solution point by variable name (empty when the solve gave none)."""


def claim_as_dual(claim: Problem) -> DualProblem:
    """The claim as a dual problem: its variables with their sets, its constraints.

    Strict sets (R_++, S_++) become their closures: the optimal value of a
    continuous objective over a set with interior is the same over its closure.
    """
    unknown = [v.name for v in claim.variables if v.domain.kind not in _SETS]
    if unknown:
        raise ValueError(f"claim variable '{unknown[0]}' has an integer or binary set; a dual "
                         "ranges over real multipliers")
    variables = tuple(DualVariable(v.symbol, _SETS[v.domain.kind], "claim")  # type: ignore[arg-type]
                      for v in claim.variables)
    cons = [DualConstraint(c.lhs, relation_of(c.relation), c.rhs, "claim", c.label)
            for c in claim.constraints]
    for v in claim.variables:
        if v.domain.kind == "box":
            shape = v.symbol.sym_shape
            cons += [DualConstraint(v.symbol, ">=", b.broadcast(v.domain.lo, shape), "claim"),
                     DualConstraint(v.symbol, "<=", b.broadcast(v.domain.hi, shape), "claim")]
    return DualProblem(claim.sense, variables, claim.objective, tuple(cons))


def solve_three(derivation: Derivation, claim: DualProblem, instance: Instance,
                seed: int | None) -> Values:
    """p, d and c on one instance."""
    from dualize.numeric.reference import solve_dual, solve_primal

    primal = solve_primal(derivation.problem, instance)
    dual = solve_dual(derivation.dual, instance)
    mine = _solve_claim(claim, instance)
    note = "; ".join(filter(None, (primal.note, dual.note, mine[2])))
    return Values(instance.source, seed, primal.value, primal.status, dual.value, dual.status,
                  mine[0], mine[1], note, mine[3])


def _solve_claim(claim: DualProblem, instance: Instance) -> tuple[float, str, str, dict]:
    from dualize.numeric.reference import solve_dual

    try:
        sol = solve_dual(claim, instance)
    except (ValueError, TypeError, ArithmeticError, KeyError) as err:
        return math.nan, "unsupported", f"the claim could not be posed: {err}", {}
    note = f"claim: {sol.note}" if sol.note else ""
    return sol.value, sol.status, note, dict(sol.x)


def usable(value: float, status: str) -> bool:
    return status in SOLVED and math.isfinite(value)

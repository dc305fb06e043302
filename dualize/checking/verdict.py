"""From three optimal values per instance to one verdict, soundly.

For a minimization primal the claim must be a lower bound: c <= p* on every
instance (weak duality), and it is the dual when c = d* (the derived dual's
optimum).  Every comparison uses the tolerance of ``dualize.numeric.verify``.
A primal value from local solves (a nonconvex primal) is a feasible value, so
it is at least p*: a claim above it is above p* too, and the verdict
"invalid" stays sound; a claim below it is known to be a bound only when it is
at most the derived dual's optimum (itself at most p* by weak duality).  A
claim solved only locally (its objective not certifiably concave) is caught
when it exceeds p, and otherwise decides nothing.  For a maximization every
inequality turns round.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from dualize.checking.numeric import Values, usable
from dualize.numeric.verify import tolerance

EQUIVALENT = "equivalent"
NOT_TIGHT = "valid bound, not tight"
TIGHT_NOT_ATTAINED = "tight, not attained"
INVALID = "invalid: exceeds the primal optimum"
INFEASIBLE = "claim infeasible or unbounded where the true dual is not"
UNDECIDED = "undecided"
EXACT = ("optimal", "inaccurate")
VERDICTS = (EQUIVALENT, TIGHT_NOT_ATTAINED, NOT_TIGHT, INVALID, INFEASIBLE, UNDECIDED)


@dataclass(frozen=True)
class Reading:
    """What one instance says: the claim's gap to p (positive: a valid, loose bound)."""

    gap: float
    exceeds: bool
    below: bool
    agrees: bool
    broken: bool


def read(values: Values, sense: str) -> Reading:
    """The comparisons on one instance for a primal of the given sense."""
    s = 1.0 if sense == "minimize" else -1.0
    p, c = values.primal_value, values.claim_value
    p_ok = usable(p, values.primal_status)
    c_ok = usable(c, values.claim_status)
    gap = s * (p - c) if p_ok and c_ok else math.nan
    tol = tolerance(p, c)
    exceeds = p_ok and c_ok and gap < -tol
    broken = values.claim_status in ("infeasible", "unbounded") and _dual_finite(values)
    below = p_ok and c_ok and gap > tol and _bound_is_sure(values, s)
    return Reading(gap, exceeds, below, _agrees(values, c_ok), broken)


def _bound_is_sure(values: Values, s: float) -> bool:
    """Whether a claim value below p is known to be a bound at all.

    It is when the claim was solved to optimality (not locally: a local maximum of a
    claim that is not concave may hide a larger one) and either p is exact or the
    claim is at most the derived dual's optimum, itself at most p* by weak duality.
    """
    if values.claim_status not in EXACT:
        return False
    if values.primal_status in EXACT:
        return True
    d = values.dual_value
    return usable(d, values.dual_status) and s * (d - values.claim_value) >= -tolerance(
        d, values.claim_value)


def _dual_finite(values: Values) -> bool:
    return usable(values.dual_value, values.dual_status) or usable(values.primal_value,
                                                                    values.primal_status)


def _agrees(values: Values, c_ok: bool) -> bool:
    """c equal to d, or to p when the derived dual could not be solved and p is exact."""
    c = values.claim_value
    if not c_ok or values.claim_status not in EXACT:
        return False
    if usable(values.dual_value, values.dual_status):
        return abs(c - values.dual_value) <= tolerance(c, values.dual_value)
    if values.primal_status in EXACT:
        return abs(c - values.primal_value) <= tolerance(c, values.primal_value)
    return False


def decide(readings: Sequence[Reading], proved: bool) -> tuple[str, str]:
    """(verdict, method): method is symbolic, numeric or none."""
    if any(r.exceeds for r in readings):
        return INVALID, "numeric"
    if any(r.broken for r in readings):
        return INFEASIBLE, "numeric"
    if proved:
        return EQUIVALENT, "symbolic"
    if readings and all(r.agrees for r in readings):
        return EQUIVALENT, "numeric"
    if any(r.below for r in readings):
        return NOT_TIGHT, "numeric"
    return UNDECIDED, "none"


def witness(readings: Sequence[Reading], verdict: str) -> int | None:
    """The instance that shows an invalid or broken claim most clearly (its index)."""
    if verdict == INVALID:
        worst = min((r.gap, i) for i, r in enumerate(readings) if r.exceeds)
        return worst[1]
    if verdict == INFEASIBLE:
        return next(i for i, r in enumerate(readings) if r.broken)
    return None


def largest_gap(readings: Sequence[Reading]) -> float:
    """The largest |p - c| seen (NaN when no instance gave both values)."""
    gaps = [abs(r.gap) for r in readings if math.isfinite(r.gap)]
    return max(gaps) if gaps else math.nan

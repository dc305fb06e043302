"""Constraints priced on an instance, every rate checked by re-solving.

With strong duality and an optimal multiplier ``lambda*``, the perturbed
problem ``minimize f0(x) s.t. g_i(x) <= u_i, h_j(x) = v_j`` satisfies, for every
``u`` and ``v``, ``p*(u, v) >= p*(0, 0) - lambda*'u - nu*'v``, and where ``p*``
is differentiable at 0, ``dp*/du_i = -lambda*_i`` (Boyd and Vandenberghe,
Convex Optimization, 2004, sections 5.6.2 and 5.6.3).  For a maximization the
language's multipliers are those of ``minimize -f``, so the bound reads
``p*(u) <= p*(0) + lambda*'u`` and the rate is ``+lambda*_i``.

Each rate is measured by one-sided differences on both sides with Richardson
extrapolation (steps ``h`` and ``h/2``, ``h`` a thousandth of the entry's
right-hand-side scale, at most half a slack; then ``h/8`` and ``h/64`` while the
rates do not agree, since another constraint that starts to bind within the step
bends p* without a kink at 0): when the left and right
derivatives differ beyond the tolerance, ``p*`` has a kink there and both are
reported instead of one number (the multiplier set is then not a single
point, and the solver's multiplier lies between them).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from dualize.deadline import Deadline
from dualize.model.problem import Problem
from dualize.multipliers import entries as E
from dualize.multipliers.solve import Point, Posed
from dualize.numeric.instance import Instance

STEP_REL = 1e-3
AGREE_REL = 1e-4
REFINEMENTS = 2  # smaller steps tried when the rates do not agree at the first
LOOSEST = 1e-2  # a check looser than this, relative to the problem's rates, is no check
NOISY = "not checked: the re-solves are not accurate enough"
REFINE_FACTOR = 8.0
DEFAULT_LIMIT = 200
DEFAULT_SECONDS = 300.0


@dataclass(frozen=True)
class Rate:
    """One entry: multiplier, binding, the rate the theory gives and the rate measured."""

    name: str
    constraint: str
    relation: str
    multiplier: float
    slack: float
    binds: bool
    rate: float
    step: float = 0.0
    left: float = float("nan")
    right: float = float("nan")
    check: str = "not-checked"  # agrees, disagrees, kink, kink-disagrees, edge, edge-disagrees
    tolerance: float = 0.0
    note: str = ""

    @property
    def measured(self) -> float:
        return (self.left + self.right) / 2


@dataclass(frozen=True)
class Sensitivity:
    """The whole report for one problem on one instance."""

    problem: Problem
    instance: str
    status: str
    value: float
    verdict: str
    verdict_reason: str
    rows: tuple[Rate, ...] = ()
    refusal: str = ""
    notes: tuple[str, ...] = field(default=())

    @property
    def established(self) -> bool:
        """Strong duality proved and an optimal multiplier in hand: the bound holds."""
        return (self.verdict == "guaranteed" and self.status == "optimal" and not self.refusal
                and all(np.isfinite(r.multiplier) for r in self.rows))

    @property
    def minimize(self) -> bool:
        return self.problem.sense == "minimize"

    def failed_checks(self) -> tuple[Rate, ...]:
        return tuple(r for r in self.rows if r.check.endswith("disagrees"))


def sensitivity(problem: Problem, instance: Instance, limit: int = DEFAULT_LIMIT,
                deadline: Deadline | None = None,
                tick: Callable[[], None] | None = None) -> Sensitivity:
    """Price every constraint of ``problem`` on ``instance`` and check every rate; past
    ``deadline`` the entries left are reported unchecked (one solve is never cut)."""
    from dualize.analysis.convexity import analyse_convexity
    from dualize.analysis.measured import Measured
    from dualize.analysis.slater import strong_duality
    from dualize.numeric.evaluate import evaluate_2d

    verdict = strong_duality(problem, analyse_convexity(problem),
                             Measured(instance.values, evaluate_2d))
    base = dict(problem=problem, instance=instance.source, verdict=verdict.status,
                verdict_reason=verdict.reason)
    refusal = _refusal(problem)
    if refusal:
        return Sensitivity(status="unsupported", value=float("nan"), refusal=refusal, **base)
    try:
        posed = Posed(problem, instance)
    except (ValueError, TypeError, ArithmeticError) as err:
        return Sensitivity(status="unsupported", value=float("nan"), refusal=(
            f"the numeric reference cannot pose this problem ({err})"), **base)
    if not posed.convex():
        return Sensitivity(status="unsupported", value=float("nan"), refusal=(
            "the numeric reference cannot pose the problem in a form its curvature rules "
            "certify as convex (DCP), so no solve here is known to be global and no "
            "optimal multiplier can be read"), **base)
    start = posed.solve()
    if not start.solved:
        return Sensitivity(status=start.status, value=float("nan"), refusal=(
            f"the problem on this instance is {start.status}: there is no optimal "
            "multiplier to read"), **base)
    rows = _rows(posed, start, limit, deadline or Deadline(DEFAULT_SECONDS), tick)
    return Sensitivity(status=start.status, value=start.value, rows=tuple(rows), **base)


def _refusal(problem: Problem) -> str:
    kinds = sorted({v.domain.kind for v in problem.variables} & {"integer", "binary"})
    if kinds:
        return (f"the problem has {' and '.join(kinds)} variables: multipliers are not "
                "defined for an integer problem, and p* has no derivative to price")
    if not problem.constraints:
        return "the problem has no constraint to price"
    return ""


def _rows(posed: Posed, start: Point, limit: int, deadline: Deadline,
          tick: Callable[[], None] | None) -> list[Rate]:
    problem, instance = posed.problem, posed.instance
    sign = -1.0 if problem.sense == "minimize" else 1.0
    everything = E.entries(problem, instance)
    sizes = [abs(E.multiplier_entry(e, start.multipliers)) for e in everything]
    scale = max((v for v in sizes if np.isfinite(v)), default=0.0)
    out = []
    for k, entry in enumerate(everything):
        lam = E.multiplier_entry(entry, start.multipliers)
        gap = E.slack(entry, problem, instance, start.x)
        row = Rate(entry.name, entry.constraint.label, entry.constraint.relation, lam, gap,
                   E.binds(entry, gap), sign * lam)
        if not np.isfinite(lam):
            row = _replace(row, note="not checked: the solver returned no multiplier")
        elif k >= limit:
            row = _replace(row, note=f"not checked: only the first {limit} entries are")
        elif deadline.expired():
            row = _replace(row, note="not checked: the time limit was reached")
        else:
            row = _check(posed, start, entry, row, scale)
        out.append(row)
        if tick is not None:
            tick()
    return out


def _replace(row: Rate, **changes: object) -> Rate:
    from dataclasses import replace

    return replace(row, **changes)  # type: ignore[arg-type]


def _step(entry: E.Entry, row: Rate) -> float:
    """A thousandth of the right-hand side's scale, and at most half a positive slack."""
    step = STEP_REL * entry.scale
    if not row.binds and row.slack > 0:
        step = min(step, row.slack / 2)
    return step


def _check(posed: Posed, start: Point, entry: E.Entry, row: Rate, scale: float) -> Rate:
    """The verdict at the step ``h``; up to two more steps, 8 times smaller or larger.

    Another constraint that starts or stops binding within the step bends ``p*``
    between 0 and ``h`` without a kink at 0: a smaller step no longer sees it, while a
    true kink persists at every step, so the last step's verdict is kept.  A check
    drowned in solver noise gets a larger step (never beyond half a slack).
    """
    h = _step(entry, row)
    cap = row.slack / 2 if not row.binds and row.slack > 0 else float("inf")
    found = row
    for _ in range(REFINEMENTS + 1):
        found = _conclusive(_measure(posed, start, entry, row, h), scale, start.value, entry)
        if found.check in ("disagrees", "kink", "kink-disagrees"):
            h /= REFINE_FACTOR
        elif found.note.startswith(NOISY) and h * REFINE_FACTOR <= cap:
            h *= REFINE_FACTOR
        else:
            return found  # agreement, an edge, nothing solved: another step cannot help
    return found


def _conclusive(row: Rate, scale: float, p0: float, entry: E.Entry) -> Rate:
    """A check whose tolerance (set by solver noise over the step) exceeds 1e-2 of the
    problem's rates proves nothing: it is reported as not checked, with the reason.
    (When every rate is near zero, the reference rate is a thousandth of p* per unit of
    the entry's scale.)"""
    ref = max(abs(row.rate), scale, 1e-3 * (1 + abs(p0)) / max(entry.scale, 1.0))
    if row.check == "not-checked" or row.tolerance <= LOOSEST * ref:
        return row
    return _replace(row, check="not-checked", note=(
        f"{NOISY} at this step (the agreement tolerance would be {row.tolerance:.2g})"))


def _measure(posed: Posed, start: Point, entry: E.Entry, row: Rate, h: float) -> Rate:
    """Four re-solves (+-h, +-h/2) and the verdict on the rate."""
    shape = posed.shifts[entry.constraint.label].shape
    values, statuses, accuracy = {}, [], start.tolerance
    for t in (h, h / 2, -h / 2, -h):
        point = posed.solve({entry.constraint.label: E.shift_for(entry, shape, t)})
        values[t] = point.value if point.solved else float("nan")
        statuses.append(point.status)
        accuracy = max(accuracy, point.tolerance if point.solved else 0.0)
    if all(status == "infeasible" for status in statuses):
        return _replace(row, step=h, check="not-checked", note=(
            "any shift of this entry alone leaves the problem infeasible: the constraints "
            "are dependent on this instance (p* is finite only on a subspace of shifts), "
            "so the entry has no rate of its own"))
    p0 = start.value
    right = 2 * (values[h / 2] - p0) / (h / 2) - (values[h] - p0) / h
    left = 2 * (p0 - values[-h / 2]) / (h / 2) - (p0 - values[-h]) / h
    tol = _tolerance(row.rate, left, right, accuracy * (1 + abs(p0)), h)
    return _judge(_replace(row, step=h, left=left, right=right, tolerance=tol),
                  posed.problem.sense == "minimize")


def _tolerance(rate: float, left: float, right: float, noise: float, h: float) -> float:
    """1e-4 relative, with a floor for the noise of optimal values over the step: the
    solver's gap tolerance times (1 + |p*|), amplified 6 times by the extrapolation."""
    sizes = [abs(v) for v in (rate, left, right) if np.isfinite(v)]
    noise = 6 * noise / h
    return max(AGREE_REL * max(sizes, default=0.0), noise)


def _judge(row: Rate, minimize: bool) -> Rate:
    """Two-sided agreement, a kink (the rate between the one-sided ones), or an edge.

    ``p*`` is convex in ``u`` for a convex minimization (concave for a
    maximization), so a multiplier's rate always lies between the one-sided
    derivatives; a side whose perturbed problem has no solution counts as an
    infinite derivative (the edge of the domain of ``p*``).
    """
    left, right, rate, tol = row.left, row.right, row.rate, row.tolerance
    finite = np.isfinite(left), np.isfinite(right)
    if not any(finite):
        return _replace(row, check="not-checked",
                        note="no perturbed problem could be solved on either side")
    low, high = _interval(left, right, minimize)
    inside = low - tol <= rate <= high + tol
    if not all(finite):
        which = "negative" if finite[1] else "positive"
        return _replace(row, check="edge" if inside else "edge-disagrees", note=(
            f"a {which} shift leaves no optimal solution (the edge of the domain "
            "of p*), so only a one-sided rate exists; the multiplier's rate is "
            + ("within the one-sided bound" if inside else "outside the one-sided bound")))
    if abs(left - right) <= tol:
        ok = abs(row.measured - rate) <= tol
        return _replace(row, check="agrees" if ok else "disagrees")
    return _replace(row, check="kink" if inside else "kink-disagrees", note=(
        "p* has a kink here: the one-sided rates differ, so no single rate exists "
        + ("(the multiplier's rate lies between them)" if inside
           else "and the multiplier's rate is not between them")))


def _interval(left: float, right: float, minimize: bool) -> tuple[float, float]:
    """Where a multiplier's rate must lie; a missing side is an infinite derivative."""
    inf = float("inf")
    if minimize:
        return (left if np.isfinite(left) else -inf, right if np.isfinite(right) else inf)
    return (right if np.isfinite(right) else -inf, left if np.isfinite(left) else inf)

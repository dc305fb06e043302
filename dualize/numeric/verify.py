"""Check a derived dual against the primal, numerically, on concrete instances.

For each instance the primal is solved by the cvxpy reference and the derived
dual is solved on its own; the two optimal values must obey weak duality and,
where strong duality holds, agree.

Tolerance: a gap counts as zero when
``|p - d| <= ABS_TOL + REL_TOL * max(1, |p|, |d|)`` with ``ABS_TOL = 1e-6`` and
``REL_TOL = 1e-5``: loose enough for interior-point solves (Clarabel stops at
about 1e-8 relative), tight enough to catch a wrong constant or a lost term.
Weak duality (``d <= p`` for a minimization, ``d >= p`` for a maximization)
violated beyond the same tolerance is a loud failure: the derivation is wrong.

A dual that keeps an inner optimization cannot be solved as it stands; it is
then evaluated at the reference multipliers (an inner solve over the remaining
primal variables), which gives a valid bound and is zero-gap exactly when the
derivation is right and strong duality holds.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from dualize.duality.result import Derivation
from dualize.numeric.dual_data import make_dual_feasible
from dualize.numeric.dual_value import SOLVED, dual_function_value
from dualize.numeric.instance import Instance
from dualize.numeric.random_data import random_instance
from dualize.numeric.samples import WeakDualitySamples, weak_duality_samples
from dualize.numeric.solution import status_word
from dualize.numeric.tolerance import tolerance
from dualize.numeric.verify_words import CONSISTENT

__all__ = ["CONSISTENT", "InstanceCheck", "VerifyReport", "WeakDualitySamples", "check_instance",
           "dual_function_value", "report_dict", "tolerance", "verify", "weak_duality_samples"]



@dataclass(frozen=True)
class InstanceCheck:
    """One instance: both values, the gap, statuses and the multiplier disagreement."""

    source: str
    seed: int | None
    primal_value: float
    dual_value: float
    gap: float
    primal_status: str
    dual_status: str
    multiplier_error: float | None
    weak_duality_ok: bool
    note: str = ""


@dataclass(frozen=True)
class VerifyReport:
    """Every check, the largest gap seen, and the verdict zero-gap | gap | failed."""

    checks: tuple[InstanceCheck, ...]
    max_abs_gap: float
    verdict: str
    messages: tuple[str, ...] = ()


def verify(derivation: Derivation, instances: Sequence[Instance] = (),
           seeds: Sequence[int] = (), dims: dict[str, int] | None = None) -> VerifyReport:
    """Check ``derivation`` on the given instances and on random ones for ``seeds``.

    Random instances make the primal strictly feasible where the structure allows
    (``random_data``) and then the derived dual too (``dual_data``), so both
    optima are finite and comparable.
    """
    checks = [check_instance(derivation, inst, None) for inst in instances]
    for seed in seeds:
        inst = make_dual_feasible(derivation, random_instance(derivation.problem, dims, seed),
                                  seed)
        checks.append(check_instance(derivation, inst, seed))
    return summarize(tuple(checks))


def check_instance(derivation: Derivation, instance: Instance, seed: int | None
                   ) -> InstanceCheck:
    from dualize.numeric.reference import solve_dual, solve_primal

    problem = derivation.problem
    primal = solve_primal(problem, instance)
    dual = solve_dual(derivation.dual, instance)
    dual_value, dual_status, note = dual.value, dual.status, dual.note
    if dual.status == "unsupported" and derivation.dual.inner and primal.status in SOLVED:
        dual_value, dual_status, note = _at_reference(derivation, instance, primal.multipliers)
    if seed is None:  # a user's instance; random ones are feasible by construction
        primal = _confirmed(problem, instance, primal)
    sign = 1.0 if problem.sense == "minimize" else -1.0
    gap = sign * (primal.value - dual_value)
    usable = primal.status in SOLVED + ("local",) and math.isfinite(dual_value)
    weak_ok = not usable or gap >= -tolerance(primal.value, dual_value)
    error = _multiplier_error(derivation, primal.multipliers, dual.x)
    notes = "; ".join(filter(None, (primal.note, note)))
    return InstanceCheck(instance.source, seed, primal.value, dual_value,
                         gap if usable else float("nan"), primal.status, dual_status,
                         error, weak_ok, notes)


def _confirmed(problem: Any, instance: Instance, primal: Any) -> Any:
    """A primal optimum is kept only when its point meets the affine constraints exactly
    on the instance's values after an exact correction (``analysis.exact``); a solver
    accepts points infeasible by 1e-9, and an infeasible instance has no optimum."""
    from dataclasses import replace

    from dualize.analysis.measured import Measured
    from dualize.analysis.phase_one import feasible_exactly
    from dualize.numeric.evaluate import evaluate_2d

    if primal.status not in SOLVED or not primal.x:
        return primal
    measured = Measured(instance, evaluate_2d)
    if feasible_exactly(problem, measured, primal.x) is not False:
        return primal
    note = ("the solver's primal point meets the constraints only within its tolerance and "
            "no point meeting them exactly on the instance's values was found near it: the "
            "instance may be infeasible")
    return replace(primal, status="unconfirmed", note="; ".join(filter(None, (primal.note,
                                                                              note))))


def _at_reference(derivation: Derivation, instance: Instance,
                  multipliers: dict[str, Any]) -> tuple[float, str, str]:
    """A dual with an inner optimization, evaluated at the reference multipliers."""
    point = multiplier_point(derivation, multipliers)
    missing = sorted(v.name for v in derivation.dual.variables if v.name not in point)
    if missing:
        return (float("nan"), "unsupported", "the dual keeps an inner optimization and has "
                f"variables the primal does not price ({', '.join(missing)})")
    value = dual_function_value(derivation.dual, instance, point)
    return value, "at-reference-multipliers", "dual evaluated at the reference multipliers " \
        "(inner solve)"


def multiplier_point(derivation: Derivation, by_label: dict[str, Any]) -> dict[str, Any]:
    """The reference multipliers keyed by their multiplier symbols' names."""
    out = {}
    for con in derivation.problem.constraints:
        if con.label in by_label:
            out[con.multiplier.name] = by_label[con.label]
    return out


def _multiplier_error(derivation: Derivation, reference: dict[str, Any],
                      dual_x: dict[str, Any]) -> float | None:
    """Largest relative disagreement over multipliers both sides report, or None."""
    point = multiplier_point(derivation, reference)
    common = sorted(set(point) & set(dual_x))
    if not common:
        return None
    errors = []
    for name in common:
        a = np.asarray(point[name], dtype=float).reshape(-1)
        b = np.asarray(dual_x[name], dtype=float).reshape(-1)
        if a.shape != b.shape:
            continue
        errors.append(float(np.max(np.abs(a - b)) / max(1.0, float(np.max(np.abs(a))))))
    return max(errors) if errors else None



_PAIRS = {("infeasible", "unbounded"): "the primal is infeasible and the dual unbounded",
          ("unbounded", "infeasible"): "the primal is unbounded and the dual infeasible"}


def infinite_pair(c: InstanceCheck) -> str | None:
    """Why an instance with no finite values still agrees with weak duality, or None.

    Weak duality (d <= p for a minimization) forces d = -inf when p = -inf, so an
    unbounded primal leaves the dual infeasible; an infeasible primal (p = +inf)
    allows any dual, and an unbounded dual (d = +inf) proves the primal infeasible
    (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.2, from memory).
    """
    return _PAIRS.get((c.primal_status, c.dual_status))


def summarize(checks: tuple[InstanceCheck, ...]) -> VerifyReport:
    """The verdict: failed on any weak-duality violation or when nothing was comparable."""
    messages = [f"weak duality violated on {c.source}: primal {c.primal_value:.10g}, dual "
                f"{c.dual_value:.10g}; the derived dual is wrong"
                for c in checks if not c.weak_duality_ok]
    pairs = [c for c in checks if infinite_pair(c) is not None]
    agree = [f"{infinite_pair(c)} on {c.source}: both optimal values are infinite, as "
             "weak duality predicts" for c in pairs]
    if pairs and len(pairs) == len(checks) and not messages:
        return VerifyReport(checks, float("nan"), CONSISTENT, tuple(agree))
    usable = [c for c in checks if math.isfinite(c.gap)]
    max_gap = max((abs(c.gap) for c in usable), default=float("nan"))
    if messages or not usable:
        if not usable and not messages:
            seen = {f"{status_word(c.primal_status)}/{status_word(c.dual_status)}"
                    for c in checks}
            messages.append("no instance gave two comparable finite values: "
                            + ", ".join(sorted(seen)))
        return VerifyReport(checks, max_gap, "failed", tuple(messages + agree))
    gaps = [c for c in usable if c.gap > tolerance(c.primal_value, c.dual_value)]
    for c in gaps:
        bound = " (the primal value is only a local bound)" if c.primal_status == "local" else ""
        messages.append(f"duality gap {c.gap:.6g} on {c.source}{bound}")
    skipped = len(checks) - len(usable) - len(pairs)
    messages += agree
    if skipped:
        messages.append(f"{skipped} instance(s) not comparable (see statuses)")
    return VerifyReport(checks, max_gap, "gap" if gaps else "zero-gap", tuple(messages))


def report_dict(report: VerifyReport) -> dict[str, Any]:
    """The report as JSON-ready data: non-finite numbers as the strings "inf", "-inf", "nan"."""
    return {
        "verdict": report.verdict,
        "max_abs_gap": _json_number(report.max_abs_gap),
        "messages": list(report.messages),
        "checks": [{
            "source": c.source, "seed": c.seed,
            "primal_status": status_word(c.primal_status),
            "dual_status": status_word(c.dual_status),
            "primal_value": _json_number(c.primal_value),
            "dual_value": _json_number(c.dual_value), "gap": _json_number(c.gap),
            "multiplier_error": None if c.multiplier_error is None
            else _json_number(c.multiplier_error),
            "weak_duality_ok": c.weak_duality_ok, "note": c.note,
        } for c in report.checks],
    }


def _json_number(value: float) -> float | str:
    if math.isnan(value):
        return "nan"
    if math.isinf(value):
        return "inf" if value > 0 else "-inf"
    return float(value)

"""The strong-duality verdict under the run's time budget: past it, no candidate point is
tried and the verdict says why instead of claiming anything.

The problem is Slater's slack example of our own making: every constraint holds strictly
with the slack large (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section
5.2.3), so with time to spare the verdict is a proof.
"""

from __future__ import annotations

from dualize import api
from dualize.deadline import Deadline

TEXT = ("data X in R^(m,n)\ndata y in R^m\ndata C in R_++\n"
        "minimize 1/2 * ||w||^2 + C * sum(s)\nover w in R^n, b in R, s in R^m\n"
        "subject to\n  alpha: y .* (X*w + b) >= 1 - s\n  beta: s >= 0\n")


def _spent() -> Deadline:
    ticks = iter(range(0, 10**6, 100))
    return Deadline(1.0, clock=lambda: float(next(ticks)))


def test_with_time_to_spare_the_slack_point_proves_strong_duality() -> None:
    found = api.analyze(api.load_problem(TEXT), deadline=Deadline(60.0))
    assert found.strong_duality_status == "guaranteed"


def test_past_the_deadline_the_verdict_is_undecided_and_says_why() -> None:
    found = api.analyze(api.load_problem(TEXT), deadline=_spent())
    assert found.strong_duality_status == "unknown"
    assert "time limit of 1 s was reached" in found.strong_duality_reason
    assert any(d.rule == "slater-undecided" for d in found.diagnostics)


def test_derive_shares_one_budget_between_derivation_and_analysis() -> None:
    derived = api.derive(TEXT, with_analysis=True, time_limit=_spent())
    assert derived.analysis is not None
    assert derived.analysis.strong_duality_status == "unknown"

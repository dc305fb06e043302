"""Every bundled example with an instance: each rate re-solved, or the reason why not.

The rate of a constraint is dp*/du_i = -lambda_i for a minimization where p* is
differentiable (Boyd and Vandenberghe, Convex Optimization, 2004, section 5.6.3);
where it is not, the one-sided derivatives bracket the rate of every optimal
multiplier (the same section's global inequality, read on each side).  Each
checked rate must agree to 1e-4 relative (with a noise floor for rates near zero),
or be reported as a kink or an edge of the domain of p*, or the whole report
must say why nothing is established.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from dualize.api import load_problem, prices

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
WITH_INSTANCE = sorted(p.stem for p in EXAMPLES.glob("*.prob")
                       if p.with_suffix(".json").exists())


@pytest.mark.parametrize("name", WITH_INSTANCE)
def test_every_rate_is_checked_or_explained(name: str) -> None:
    path = EXAMPLES / f"{name}.prob"
    report = prices(load_problem(path), str(path.with_suffix(".json")))
    if not report.rows:
        assert report.refusal, "a report with no rows must say why"
        return
    for row in report.rows:
        assert row.check in ("agrees", "kink", "edge"), (row.name, row.check, row.note)
        if row.check == "agrees":
            error = abs(row.measured - row.rate)
            assert error <= max(1e-4 * abs(row.rate), row.tolerance), row.name
            if abs(row.rate) > 1e-2:
                assert error <= 1e-4 * abs(row.rate), row.name
        else:
            assert row.note, "a kink or an edge is said in words"


def test_the_kinks_of_a_one_norm_problem_are_reported() -> None:
    """min ||x||_1 s.t. Ax = b is a linear program: p* is piecewise linear in b, and the
    bundled instance sits on a breakpoint (its solution is degenerate)."""
    path = EXAMPLES / "pipe_leaks_l1.prob"
    report = prices(load_problem(path), str(path.with_suffix(".json")))
    kinks = [r for r in report.rows if r.check == "kink"]
    assert kinks
    for r in kinks:
        assert min(r.left, r.right) - r.tolerance <= r.rate <= max(r.left, r.right) + r.tolerance


def test_a_nonconvex_example_is_refused_with_the_reason() -> None:
    path = EXAMPLES / "shift_partition.prob"
    report = prices(load_problem(path), str(path.with_suffix(".json")))
    assert not report.rows and not report.established
    assert "convex" in report.refusal


def test_the_bound_is_refused_without_strong_duality() -> None:
    """minimize x s.t. x^2 <= 0 has one feasible point and no strictly feasible one:
    Slater's condition fails, p*(u) = -sqrt(u) has an infinite slope at 0 and no optimal
    multiplier exists (Boyd and Vandenberghe, 2004, section 5.2.3; the example is common
    in courses, from memory). The global bound must be refused with that reason."""
    from dualize.multipliers.printing import bound_sentence
    from dualize.numeric.instance import Instance

    report = prices(load_problem("minimize x\nover x in R\nsubject to\n  c: x^2 <= 0\n"),
                    Instance({}, {}))
    assert report.verdict == "not-guaranteed" and not report.established
    assert bound_sentence(report).startswith("No global bound is stated: strong duality")
    (row,) = report.rows
    assert row.check != "agrees"  # no finite rate exists to agree with


PROBLEMS = Path(__file__).resolve().parents[1] / "problems"


def _random_report(name: str, seed: int = 0):  # type: ignore[no-untyped-def]
    from dualize.numeric.random_data import random_instance

    problem = load_problem(PROBLEMS / f"{name}.prob")
    return prices(problem, random_instance(problem, None, seed))


def test_dependent_equalities_have_no_rate_of_their_own() -> None:
    """Row sums and column sums of an assignment are dependent (both add up to the
    total): b must stay in the range of the constraint map, so shifting one entry alone
    makes the problem infeasible (Boyd and Vandenberghe, 2004, section 5.6: p*(u) is
    +inf off the feasible shifts) and no entry has a rate of its own."""
    report = _random_report("assignment")
    assert report.rows
    for row in report.rows:
        if row.constraint in ("row", "col"):
            assert row.check == "not-checked" and "dependent" in row.note


def test_a_constraint_that_binds_within_the_step_is_not_a_kink() -> None:
    """With this instance a slack bound (cap[2], slack about 1e-3) starts to bind within
    the first step of fit[1]: p* bends there, not at 0. The smaller step sees a smooth
    p*, whose derivative is the multiplier's rate (section 5.6.3)."""
    report = _random_report("diag_weighted")
    fit = next(r for r in report.rows if r.name == "fit[1]")
    assert fit.check == "agrees"
    assert abs(fit.measured - fit.rate) <= 1e-4 * abs(fit.rate)

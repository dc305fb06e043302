"""The derived duals of every bundled example, checked numerically.

On each example's own instance and on random instances, the optimum of the
derived dual (solved with cvxpy's bundled open solvers) equals the primal
optimum found by cvxpy on the primal where strong duality holds, and never
lies on the wrong side of it (weak duality, common practice).  The one
nonconvex example shows the duality gap that theory predicts.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

pytest.importorskip("cvxpy")

from dualize.duality import derive  # noqa: E402
from dualize.model import load, load_file  # noqa: E402
from dualize.numeric.instance import read_instance  # noqa: E402
from dualize.numeric.samples import weak_duality_samples  # noqa: E402
from dualize.numeric.verify import verify  # noqa: E402

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
NONCONVEX = {"shift_partition"}
KEPT_INFIMUM: set[str] = set()


def _examples() -> list[Path]:
    return sorted(EXAMPLES.glob("*.prob"))


def _derived(path: Path):  # type: ignore[no-untyped-def]
    loaded = load_file(path)
    assert loaded.problem is not None
    return loaded.problem, derive(loaded.problem)


@pytest.mark.parametrize("path", _examples(), ids=lambda p: p.stem)
def test_dual_optimum_matches_primal_optimum(path: Path) -> None:
    # Strong duality for convex problems with a Slater point (S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 5.2.3, from memory); cvxpy's
    # solve of the primal is the independent reference.
    problem, derivation = _derived(path)
    if path.stem in KEPT_INFIMUM:
        assert not derivation.dual.closed_form
        return
    assert derivation.dual.closed_form, path.stem
    instance = read_instance(str(path.with_suffix(".json")), problem)
    report = verify(derivation, [instance], seeds=[7])
    for check in report.checks:
        assert check.weak_duality_ok, (path.stem, check)
    if path.stem in NONCONVEX:
        # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): the partitioning dual
        # is a lower bound only; a local primal solve gives an upper bound on p*.
        assert all(c.primal_status == "local" and c.dual_status == "optimal"
                   for c in report.checks)
        assert all(c.dual_value <= c.primal_value + 1e-6 for c in report.checks)
        assert report.verdict == "gap"
        return
    # A local primal value bounds p* from above and a local dual value bounds d* from
    # below, so agreement of the two proves both optimal (weak duality, common practice).
    solved = [c for c in report.checks if c.primal_status in ("optimal", "local")
              and c.dual_status in ("optimal", "local")]
    assert solved, (path.stem, report.checks)
    for check in solved:
        scale = max(1.0, abs(check.primal_value))
        assert abs(check.gap) <= 1e-5 * scale, (path.stem, check)


@pytest.mark.parametrize("path", _examples(), ids=lambda p: p.stem)
def test_weak_duality_at_random_points(path: Path) -> None:
    # Weak duality (common practice): every dual-feasible value bounds every
    # primal-feasible value.
    problem, derivation = _derived(path)
    if not derivation.dual.closed_form:
        return
    instance = read_instance(str(path.with_suffix(".json")), problem)
    samples = weak_duality_samples(derivation, instance, n=6, seed=3)
    assert samples.ok, (path.stem, samples)
    assert all(math.isfinite(v) for v in samples.dual_values)


FIXTURES = Path(__file__).resolve().parents[1] / "problems"
INTEGER = {"binary"}


@pytest.mark.parametrize("path", sorted(FIXTURES.glob("*.prob")), ids=lambda p: p.stem)
def test_standard_forms_on_random_instances(path: Path) -> None:
    # cvxpy's solve of the primal is the reference (exact enumeration for the binary
    # program); strong duality for convex problems with a Slater point (Boyd and
    # Vandenberghe, 2004, section 5.2.3, from memory); for an integer program the
    # dual is a lower bound only (weak duality, common practice).
    problem, derivation = _derived(path)
    assert derivation.dual.closed_form, path.stem
    report = verify(derivation, [], seeds=[11, 12])
    assert all(c.weak_duality_ok for c in report.checks), report.checks
    if path.stem in INTEGER:
        assert all(c.dual_value <= c.primal_value + 1e-6 for c in report.checks)
        return
    assert report.verdict == "zero-gap", (path.stem, report.checks)


BOX_QP = """
data A in R^(m,n)
data b in R^m
data c in R^n
data h in R_++
minimize h/2 * ||x||^2 + c' * x
over x in [0, 1]^n
subject to
  fit: A*x == b
"""


def test_scaled_identity_quadratic_over_a_box_has_a_closed_form() -> None:
    # inf over 0 <= t <= 1 of h/2 t^2 + g t is attained at the projection of -g/h onto
    # [0, 1] (common practice); the dual optimum must meet cvxpy's primal optimum on
    # random instances, the primal being convex with affine constraints (S. Boyd and
    # L. Vandenberghe, Convex Optimization, 2004, section 5.2.3, from memory).
    loaded = load(BOX_QP)
    assert loaded.problem is not None
    derivation = derive(loaded.problem)
    assert derivation.dual.closed_form
    report = verify(derivation, [], seeds=[3, 4, 5])
    for check in report.checks:
        assert check.weak_duality_ok, check
        assert check.primal_status == "optimal", check
        assert abs(check.gap) <= 1e-5 * max(1.0, abs(check.primal_value)), check

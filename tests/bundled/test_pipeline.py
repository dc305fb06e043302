"""Every bundled example through the whole pipeline, against independent solves.

Each example is loaded, its instance read (which checks every value against its
declared set), its dual derived, and the dual's optimum on the instance compared
with the optimum of the hand restatement in ``reference_models`` solved by
cvxpy.  A convex example with a strictly feasible instance must show no gap
(Slater's condition: S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
section 5.2.3, from memory).
"""

from __future__ import annotations

from functools import cache

import pytest

from bundled.reference_models import CONVEX, NONCONVEX
from bundled.test_examples import EXAMPLES, NAMES, _instance, _solve, partition_optimum


@cache
def _loaded(name: str) -> object:
    from dualize.model import load_file
    return load_file(EXAMPLES / f"{name}.prob")


def _check(name: str) -> object:
    from dualize.duality import derive
    from dualize.numeric.instance import read_instance
    from dualize.numeric.verify import check_instance
    problem = _loaded(name).problem
    instance = read_instance(str(EXAMPLES / f"{name}.json"), problem)
    return check_instance(derive(problem), instance, None)


@pytest.mark.parametrize("name", NAMES)
def test_example_loads_without_errors(name: str) -> None:
    loaded = _loaded(name)
    assert loaded.problem is not None
    assert [d.rule for d in loaded.diagnostics if d.severity == "error"] == []


@pytest.mark.parametrize("name", NAMES)
def test_instance_fits_declared_sets(name: str) -> None:
    from dualize.numeric.instance import read_instance
    instance = read_instance(str(EXAMPLES / f"{name}.json"), _loaded(name).problem)
    raw = _instance(name)
    assert sorted(instance.values) == sorted(k for k in raw if k not in instance.dims)
    assert all(instance.dims[k] == raw[k] for k in raw if k in instance.dims)


@pytest.mark.parametrize("name", sorted(CONVEX))
def test_derived_dual_optimum_equals_reference_primal(name: str) -> None:
    # cvxpy on the hand restatement as the reference optimum (common practice).
    _, reference = _solve(name)
    check = _check(name)
    assert check.dual_value == pytest.approx(reference, rel=1e-5, abs=1e-6)


def test_partition_dual_is_a_strict_lower_bound() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): weak duality only.
    # On this instance (a 5-cycle) the bound is strictly below the enumerated optimum.
    assert NONCONVEX == ("shift_partition",)
    check = _check("shift_partition")
    assert check.dual_value < partition_optimum() - 1e-3
    assert check.weak_duality_ok


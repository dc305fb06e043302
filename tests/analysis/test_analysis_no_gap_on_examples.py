"""Where the analysis says "guaranteed" on a bundled example's instance, the primal optimum
(cvxpy, the independent reference) equals the optimum of the engine's dual: Slater's
condition implies a zero duality gap (S. Boyd and L. Vandenberghe, Convex Optimization,
2004, section 5.2.3, from memory).  Where it says "not-guaranteed" for a nonconvex
example, the dual is still a bound (weak duality, common practice)."""

from __future__ import annotations

from pathlib import Path

import pytest

EXAMPLES = sorted((Path(__file__).resolve().parents[2] / "examples").glob("*.prob"))
SOLVED = ("optimal", "local")


def _case(path: Path) -> tuple[object, object, object, object]:
    pytest.importorskip("cvxpy")
    from dualize.api import analyze
    from dualize.duality import derive
    from dualize.model import load_file
    from dualize.numeric.instance import read_instance
    from dualize.numeric.reference import solve_dual, solve_primal

    problem = load_file(path).problem
    instance = read_instance(str(path.with_suffix(".json")), problem)
    verdict = analyze(problem, instance)
    derivation = derive(problem)
    return verdict, problem, solve_primal(problem, instance), solve_dual(derivation.dual,
                                                                          instance)


@pytest.mark.parametrize("path", EXAMPLES, ids=[p.stem for p in EXAMPLES])
def test_verdict_matches_the_gap(path: Path) -> None:
    if not path.with_suffix(".json").is_file():
        pytest.skip("no instance")
    verdict, problem, primal, dual = _case(path)
    if primal.status not in SOLVED or dual.status not in SOLVED:
        pytest.skip(f"not solved numerically ({primal.status}, {dual.status})")
    if verdict.strong_duality_status == "guaranteed":
        assert primal.value == pytest.approx(dual.value, rel=1e-5, abs=1e-6)
    minimize = problem.sense == "minimize"  # type: ignore[attr-defined]
    tol = 1e-6 * (1 + abs(primal.value))
    assert (dual.value <= primal.value + tol) if minimize else (dual.value >= primal.value - tol)


def test_most_examples_are_checked() -> None:
    """Guard against a vacuous pass: the examples hold many guaranteed, solvable cases."""
    pytest.importorskip("cvxpy")
    from dualize.api import analyze
    from dualize.model import load_file
    from dualize.numeric.instance import read_instance

    guaranteed = 0
    for path in EXAMPLES:
        problem = load_file(path).problem
        if path.with_suffix(".json").is_file():
            instance = read_instance(str(path.with_suffix(".json")), problem)
            guaranteed += analyze(problem, instance).strong_duality_status == "guaranteed"
    assert guaranteed >= 10

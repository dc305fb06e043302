"""The bundled examples: complete, and their instances feasible and bounded.

Each instance is solved by an independent reference (cvxpy, scipy, or exact
enumeration) from a hand restatement of the problem, and where the problem is a
textbook exercise its optimum is compared with the published value.
"""

from __future__ import annotations

import itertools
import json
from pathlib import Path

import numpy as np
import pytest

from bundled.reference_models import CONVEX, NONCONVEX, as_arrays

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"
NAMES = sorted(p.stem for p in EXAMPLES.glob("*.prob"))


def _instance(name: str) -> dict:
    return as_arrays(json.loads((EXAMPLES / f"{name}.json").read_text("utf-8")))


def _solve(name: str) -> tuple[str, float]:
    builder, _ = CONVEX[name]
    problem = builder(_instance(name))
    problem.solve()
    return problem.status, float(problem.value)


def partition_optimum() -> float:
    """The two-way partitioning optimum by enumeration of every sign vector."""
    W = _instance("shift_partition")["W"]
    signs = (np.array(v) for v in itertools.product((-1.0, 1.0), repeat=W.shape[0]))
    return min(float(x @ W @ x) for x in signs)


def test_every_example_has_a_reference_model() -> None:
    assert len(NAMES) >= 14
    assert NAMES == sorted([*CONVEX, *NONCONVEX])


@pytest.mark.parametrize("name", NAMES)
def test_example_opens_with_scenario_and_title(name: str) -> None:
    lines = (EXAMPLES / f"{name}.prob").read_text("utf-8").splitlines()
    assert lines[0].startswith("# ") and len(lines[0]) > 10
    assert any(line.startswith('title "') and line.endswith('"') for line in lines)


@pytest.mark.parametrize("name", sorted(CONVEX))
def test_instance_names_match_reference_model(name: str) -> None:
    _, keys = CONVEX[name]
    assert tuple(sorted(_instance(name))) == keys


@pytest.mark.parametrize("name", sorted(CONVEX))
def test_instance_is_feasible_and_bounded(name: str) -> None:
    # cvxpy as the independent numeric reference (common practice).
    status, value = _solve(name)
    assert status == "optimal"
    assert np.isfinite(value)


def test_window_scalar_optimum() -> None:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, exercise 5.1
    # (from memory): p* = 5 at x = 2.
    assert _solve("window_scalar")[1] == pytest.approx(5.0, abs=1e-6)


def test_disk_scalar_optimum() -> None:
    # J. Nocedal and S. Wright, Numerical Optimization, 2nd ed., 2006, chapter 12
    # (from memory): x* = (-1, -1), so p* = -2.
    assert _solve("disk_scalar")[1] == pytest.approx(-2.0, abs=1e-6)


def test_least_norm_optimum_matches_closed_form() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): p* = b'(AA')^-1 b
    # when A has full row rank.
    d = _instance("survey_least_norm")
    A, b = d["A"], d["b"]
    assert np.linalg.matrix_rank(A) == A.shape[0]
    closed = float(b @ np.linalg.solve(A @ A.T, b))
    assert _solve("survey_least_norm")[1] == pytest.approx(closed, rel=1e-5)


def test_standard_lp_agrees_with_scipy_highs() -> None:
    # Two reference libraries agree on the optimum (scipy.optimize.linprog
    # documentation, method "highs"; common practice).
    from scipy.optimize import linprog
    d = _instance("flour_blend_lp")
    res = linprog(d["c"], A_eq=d["A"], b_eq=d["b"], bounds=(0, None), method="highs")
    assert res.status == 0
    assert _solve("flour_blend_lp")[1] == pytest.approx(res.fun, rel=1e-6)


def test_inequality_lp_agrees_with_scipy_highs() -> None:
    # scipy.optimize.linprog documentation, method "highs" (common practice).
    from scipy.optimize import linprog
    d = _instance("joinery_lp")
    res = linprog(d["c"], A_ub=d["A"], b_ub=d["b"], bounds=(None, None), method="highs")
    assert res.status == 0
    assert _solve("joinery_lp")[1] == pytest.approx(res.fun, rel=1e-6)


def test_sdp_optimum_is_scaled_generalized_eigenvalue() -> None:
    # Rayleigh quotient (common practice): with A1 positive definite, the least
    # trace(C X) over X psd with trace(A1 X) = b1 > 0 is b1 times the least
    # eigenvalue of A1^(-1/2) C A1^(-1/2).
    from scipy.linalg import eigh
    d = _instance("vibration_sdp")
    assert np.all(np.linalg.eigvalsh(d["A1"]) > 0) and d["b1"] > 0
    least = float(eigh(d["C"], d["A1"], eigvals_only=True)[0])
    assert _solve("vibration_sdp")[1] == pytest.approx(d["b1"] * least, rel=1e-5)


def test_entropy_instance_has_a_strictly_feasible_point() -> None:
    # Slater's condition (Boyd and Vandenberghe, 2004, section 5.2.3, from memory)
    # needs x > 0 (the domain of x log x) with A x <= b and sum(x) = 1; found by a
    # phase-one linear program: maximize s with A x + s <= b, x >= s, sum(x) = 1.
    from scipy.optimize import linprog
    d = _instance("route_entropy")
    m, n = d["A"].shape
    cost = np.r_[np.zeros(n), -1.0]
    upper = np.block([[d["A"], np.ones((m, 1))], [-np.eye(n), np.ones((n, 1))]])
    res = linprog(cost, A_ub=upper, b_ub=np.r_[d["b"], np.zeros(n)],
                  A_eq=np.r_[np.ones(n), 0.0][None, :], b_eq=[1.0],
                  bounds=(None, None), method="highs")
    assert res.status == 0 and -res.fun > 1e-3


def test_symmetric_and_definite_data_are_so() -> None:
    # The declared sets S^n, S^n_++ (docs/language.md) checked by eigenvalues.
    for name, key, definite in [("drone_thrust_qp", "P", True),
                                ("orchard_mean_variance", "S", True),
                                ("vibration_sdp", "C", False),
                                ("vibration_sdp", "A1", False),
                                ("shift_partition", "W", False)]:
        M = _instance(name)[key]
        assert np.array_equal(M, M.T), (name, key)
        if definite:
            assert np.linalg.eigvalsh(M)[0] > 0, (name, key)


def test_partition_dual_bound_is_below_enumerated_optimum() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): the dual of
    # two-way partitioning, maximize -sum(nu) s.t. W + diag(nu) psd, is a lower
    # bound on p*; p* itself by enumeration of all sign vectors.
    import cvxpy as cp
    W = _instance("shift_partition")["W"]
    p_star = partition_optimum()
    nu = cp.Variable(W.shape[0])
    dual = cp.Problem(cp.Maximize(-cp.sum(nu)), [W + cp.diag(nu) >> 0])
    dual.solve()
    assert dual.status == "optimal"
    assert dual.value <= p_star + 1e-6

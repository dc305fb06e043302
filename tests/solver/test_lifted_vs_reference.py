"""Piecewise-linear duals, solved as linear programs after the epigraph lift, against
cvxpy's solve of the primal (cvxpy as reference library, common practice).

LP duality and the epigraph forms of min and of the 1-norm: S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, sections 4.3 and 5.2 (from memory).
"""

from __future__ import annotations

import cvxpy as cp
import numpy as np
import pytest

from tests.solver.conftest import instance_of
from tests.solver.instances import arrays
from tests.solver.test_solver_vs_reference import close

REL = 1e-6
FACE = 1e-8
"""Slack on the optimal value that defines the set of optimal multipliers."""


def unique_entries(variable: cp.Variable, feasible: list, value: cp.Expression,
                   optimum: float) -> np.ndarray:
    """Which entries are the same at every optimal multiplier: each entry minimized and
    maximized over the optimal face (a small LP each, common practice)."""
    face = [*feasible, value >= optimum - FACE * max(1.0, abs(optimum))]
    spread = []
    for i in range(variable.shape[0]):
        ends = []
        for sense in (cp.Minimize, cp.Maximize):
            cp.Problem(sense(variable[i]), face).solve(solver=cp.CLARABEL)
            ends.append(variable.value[i])
        spread.append(ends[1] - ends[0])
    return np.array(spread) <= 1e-5


def random_charging(seed: int, m: int = 4, n: int = 9) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.random((m, n)).round(3).tolist(), "b": (1 + rng.random(m)).tolist(),
            "c": rng.normal(size=n).tolist()}


@pytest.mark.parametrize("data", [instance_of("charging_box"), random_charging(5),
                                  random_charging(6)])
def test_charging_box_matches_primal(solver_module, data):
    # Box LP, dual maximize 1'min(0, A'feeder + c) - b'feeder over feeder >= 0 (Boyd and
    # Vandenberghe, 2004, section 5.2, from memory); cvxpy reference (common practice).
    _, module = solver_module("charging_box")
    assert "epigraph variables" in module.__doc__
    report = module.solve(data)
    A, b, c = arrays(data, "A", "b", "c")
    x = cp.Variable(A.shape[1])
    feeder = A @ x <= b
    primal = cp.Problem(cp.Minimize(c @ x), [x >= 0, x <= 1, feeder])
    primal.solve(solver=cp.CLARABEL)
    assert report["converged"] and report["method"] == "linprog"
    assert report["dual_value"] == pytest.approx(primal.value, rel=REL)
    assert report["primal_value"] == pytest.approx(primal.value, rel=REL)
    assert close(report["primal"]["x"], x.value, rel=1e-5, atol=1e-6)
    assert list(report["multipliers"]) == ["feeder"]
    ours = np.array(report["multipliers"]["feeder"])
    assert np.all(ours >= -1e-12)
    assert np.minimum(0, A.T @ ours + c).sum() - b @ ours == pytest.approx(primal.value, rel=REL)
    y = cp.Variable(A.shape[0])
    dual_value = cp.sum(cp.minimum(0, A.T @ y + c)) - b @ y
    unique = unique_entries(y, [y >= 0], dual_value, primal.value)
    assert unique.any()
    assert close(ours[unique], feeder.dual_value[unique], rel=1e-5, atol=1e-6)


def random_minimax(seed: int, m: int = 8, n: int = 3) -> dict:
    rng = np.random.default_rng(seed)
    return {"A": rng.normal(size=(m, n)).tolist(), "b": rng.normal(size=m).tolist()}


@pytest.mark.parametrize("data", [instance_of("kiln_minimax"), random_minimax(7),
                                  random_minimax(8)])
def test_kiln_minimax_matches_primal(solver_module, data):
    # Chebyshev fit: minimize ||Ax - b||_inf, dual maximize -b'z s.t. A'z = 0, ||z||_1 <= 1,
    # the 1-norm being the dual norm of the inf-norm (Boyd and Vandenberghe, 2004, sections
    # 5.2 and A.1.6, from memory); cvxpy reference (common practice).
    _, module = solver_module("kiln_minimax")
    assert "epigraph variables" in module.__doc__
    report = module.solve(data)
    A, b = arrays(data, "A", "b")
    x, u = cp.Variable(A.shape[1]), cp.Variable(A.shape[0])
    residual = A @ x - b == u
    primal = cp.Problem(cp.Minimize(cp.norm(u, "inf")), [residual])
    primal.solve(solver=cp.CLARABEL)
    assert report["converged"] and report["method"] == "linprog"
    assert report["dual_value"] == pytest.approx(primal.value, rel=REL)
    assert list(report["multipliers"]) == ["z"]
    ours = np.array(report["multipliers"]["z"])
    assert np.abs(A.T @ ours).max() <= 1e-9 and np.abs(ours).sum() <= 1 + 1e-9
    assert -b @ ours == pytest.approx(primal.value, rel=REL)
    z = cp.Variable(A.shape[0])
    unique = unique_entries(z, [A.T @ z == 0, cp.norm(z, 1) <= 1], -b @ z, primal.value)
    assert unique.any()
    assert close(ours[unique], residual.dual_value[unique], rel=1e-5, atol=1e-6)
    if report["primal"]["x"] is None:
        assert report["unrecovered"]["x"]
    else:
        fitted = np.abs(A @ np.array(report["primal"]["x"]) - b).max()
        assert fitted == pytest.approx(primal.value, rel=REL)

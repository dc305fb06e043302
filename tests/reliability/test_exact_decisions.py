"""Finding 3, "strong duality holds" on an infeasible instance: decisions on an instance
in exact arithmetic, and definiteness decided right for badly scaled matrices."""

from __future__ import annotations

import json
from fractions import Fraction

import numpy as np
import pytest

from dualize.analysis.exact_point import exact_affine_point
from dualize.numeric.definite_data import EXACT_SIZE, decide
from tests.reliability.helpers import dualize

BOUNDS = """title "Two bounds that barely miss"
data a in R
data b in R
minimize x
over x in R
subject to
  lo: x >= a
  hi: x <= b
"""


def _files(tmp_path, text: str, data: dict) -> tuple[str, str]:
    prob, inst = tmp_path / "p.prob", tmp_path / "p.json"
    prob.write_text(text, encoding="utf-8")
    inst.write_text(json.dumps(data), encoding="utf-8")
    return str(prob), str(inst)


def _strong(prob: str, inst: str) -> dict:
    run = dualize("derive", prob, "--data", inst, "--format", "json")
    assert run.returncode == 0, run.stderr
    return json.loads(run.stdout)["strong_duality"]


def test_finding3_infeasible_by_1e_8_is_not_declared_strictly_feasible(tmp_path):
    # x >= 1 + 1e-8 and x <= 1 have no common point: no Slater point may be shown.
    strong = _strong(*_files(tmp_path, BOUNDS, {"a": 1.00000001, "b": 1}))
    assert strong["status"] != "guaranteed"


def test_finding3_decimals_are_exact_so_a_tight_feasible_instance_holds(tmp_path):
    # 0.1 <= x <= 0.1 as decimals: the one point x = 1/10 is feasible exactly.
    strong = _strong(*_files(tmp_path, BOUNDS, {"a": 0.1, "b": 0.1}))
    assert strong["status"] == "guaranteed"


def test_finding3_verify_reports_no_zero_gap_at_1e_9(tmp_path):
    prob, inst = _files(tmp_path, BOUNDS, {"a": 1.000000001, "b": 1})
    run = dualize("verify", prob, "--data", inst, "--format", "json")
    report = json.loads(run.stdout)
    assert run.returncode == 1 and report["verdict"] != "zero-gap"
    assert "instance may be infeasible" in report["instances"][0]["note"]


def test_finding3_exact_point_repairs_rounding_of_an_equality():
    # sum(x) == 1 with x = (1/3, 1/3, 1/3): the float point misses by rounding, the exact
    # correction lands on the plane and keeps x >= 0.
    def eq(z):
        return np.array([sum(z, Fraction(0)) - 1], dtype=object)

    def nonneg(z):
        return -z

    point = exact_affine_point([nonneg], [eq], np.full(3, 1 / 3))
    assert point is not None and sum(point, Fraction(0)) == 1 and all(v >= 0 for v in point)


def test_finding3_condition_1e10_positive_definite_is_accepted(tmp_path):
    # diag(1, 1e-10) is positive definite (its eigenvalues are its entries).
    prob, inst = _files(tmp_path, "data P in S^n_++\nminimize x' * P * x\nover x in R^n\n",
                        {"P": [[1, 0], [0, 1e-10]]})
    run = dualize("derive", prob, "--data", inst)
    assert run.returncode == 0, run.stderr
    assert decide(np.diag([1.0, 1e-10]), strict=True) == "yes"


@pytest.mark.parametrize("n", [5, EXACT_SIZE + 20])
def test_finding3_badly_scaled_definite_matrices(n):
    # D A D with A = I + 0.1 * ones is positive definite for any positive diagonal D
    # (Sylvester's law of inertia; Golub and Van Loan, 2013, section 8.1, from memory),
    # here with a condition number near 1e12; a negative entry flipped onto the
    # diagonal makes it indefinite.
    d = np.logspace(0, -6, n)
    matrix = (np.eye(n) + 0.1 * np.ones((n, n))) * d[:, None] * d[None, :]
    assert decide(matrix, strict=True) == "yes"
    assert np.linalg.eigvalsh(matrix)[0] < 1e-10 * np.abs(matrix).max() * n
    broken = matrix.copy()
    broken[-1, -1] = -broken[-1, -1]
    assert decide(broken, strict=True) == "no"


def test_finding3_semidefinite_versus_definite_exactly():
    ones = np.ones((3, 3))  # rank one: semidefinite, not definite (common practice)
    assert decide(ones, strict=False) == "yes" and decide(ones, strict=True) == "no"
    assert decide(np.array([[0.0, 1.0], [1.0, 0.0]]), strict=False) == "no"
    assert decide(np.diag([1.0, -1e-3]), strict=False) == "no"


def test_finding3_rounding_of_a_singular_gram_matrix_is_not_refused():
    # M M' in floating point is semidefinite up to rounding: its exact binary value may
    # have an eigenvalue of -1e-17, which says nothing about the data (common practice).
    rng = np.random.default_rng(7)
    m = rng.standard_normal((5, 2))
    assert decide(m @ m.T, strict=False) != "no"

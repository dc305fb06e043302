"""Deliberately wrong duals, each caught with the verdict the mathematics calls for."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np

from dualize.checking import check_claim
from dualize.numeric.instance import read_instance
from tests.checking.paths import claim_text, example

SEEDS = (0, 1, 2, 3)
INVALID = "invalid: exceeds the primal optimum"
UNBOUNDED = "claim infeasible or unbounded where the true dual is not"


def test_sign_error_is_invalid_and_the_counterexample_replays(tmp_path: Path) -> None:
    # Weak duality (common practice; Boyd and Vandenberghe, Convex Optimization, 2004,
    # section 5.2.2, from memory): no dual value exceeds p*.  Adding h'l where the QP dual
    # subtracts it raises the objective by 2 h'l, above p* wherever the optimal l prices a
    # constraint with h > 0.
    problem = example("drone_thrust_qp")
    target = tmp_path / "qp.counterexample.json"
    report = check_claim(problem, claim_text("qp_sign_error"), seeds=SEEDS,
                         counterexample_path=str(target))
    assert report.verdict == INVALID
    assert report.counterexample_path == str(target)
    replay = read_instance(str(target), problem)
    for name, value in report.counterexample.values.items():
        np.testing.assert_array_equal(np.asarray(replay.values[name]), np.asarray(value))
    again = check_claim(problem, claim_text("qp_sign_error"), instances=[replay], seeds=())
    assert again.verdict == INVALID
    [row] = again.instances
    assert row.exceeds and row.values.claim_value > row.values.primal_value


def test_sign_error_on_the_bundled_instance() -> None:
    # The same slip on the bundled instance (h = (1, 0.5) > 0): an independent solve of the
    # primal with scipy's SLSQP (common practice) confirms that the claim passes p*.
    from scipy.optimize import minimize

    problem = example("drone_thrust_qp")
    path = str(Path(__file__).resolve().parents[2] / "examples" / "drone_thrust_qp.json")
    inst = read_instance(path, problem)
    report = check_claim(problem, claim_text("qp_sign_error"), instances=[inst], seeds=())
    assert report.verdict == INVALID
    P, q, G, h = (np.asarray(inst.values[k]) for k in ("P", "q", "G", "h"))
    res = minimize(lambda x: 0.5 * x @ P @ x + q @ x, np.zeros(3), method="SLSQP",
                   constraints=[{"type": "ineq", "fun": lambda x: h - G @ x}])
    assert res.success
    assert report.instances[0].values.claim_value > res.fun + 1e-4


def test_soft_margin_without_the_upper_bound_is_caught() -> None:
    # Cortes and Vapnik, 1995 (from memory): the soft-margin dual has 0 <= alpha <= C.
    # Without alpha <= C the claim is the hard-margin dual, unbounded on inseparable data
    # and above p* wherever the bound was active.
    report = check_claim(example("parts_soft_margin"), claim_text("soft_margin_no_box"),
                         seeds=SEEDS)
    assert report.verdict in (INVALID, UNBOUNDED)
    assert any("alpha ≤ C" in r or "α ≤ C" in r for r in report.symbolic.reasons)
    assert report.counterexample is not None


def test_norm_minimization_without_the_dual_norm_ball_is_unbounded() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): g(nu) is finite only on
    # ||A'nu||_* <= 1.  Without the ball, -b'nu over all of R^m is unbounded when b != 0.
    report = check_claim(example("antenna_norm_min"), claim_text("norm_min_no_ball"),
                         seeds=SEEDS)
    assert report.verdict == UNBOUNDED
    assert all(row.values.claim_status == "unbounded" for row in report.instances)
    assert all(row.values.dual_status == "optimal" for row in report.instances)
    assert not report.ok


def test_half_instead_of_a_quarter_is_a_valid_bound_at_half_the_optimum() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): the least-norm dual is
    # -(1/4) nu'AA'nu - b'nu with optimum p* = b'(AA')^-1 b.  With 1/2 instead, the
    # objective is below the true one at every nu (nu'AA'nu >= 0), so it is still a lower
    # bound (not invalid); its maximum, at nu = -(AA')^-1 b, is b'(AA')^-1 b / 2 = p*/2.
    report = check_claim(example("survey_least_norm"), claim_text("least_norm_half"),
                         seeds=SEEDS)
    assert report.verdict == "valid bound, not tight"
    assert report.counterexample is None
    for row in report.instances:
        v = row.values
        assert math.isclose(v.claim_value, v.primal_value / 2, rel_tol=1e-6)
    largest = max(row.values.primal_value / 2 for row in report.instances)
    assert math.isclose(report.max_gap, largest, rel_tol=1e-6)


def test_counterexample_file_is_plain_instance_json(tmp_path: Path) -> None:
    # The instance file format of docs/language.md: only data names and dimension symbols.
    problem = example("drone_thrust_qp")
    target = tmp_path / "c.json"
    check_claim(problem, claim_text("qp_sign_error"), seeds=SEEDS,
                counterexample_path=str(target))
    data = json.loads(target.read_text())
    assert sorted(data) == sorted(["P", "q", "G", "h", "m", "n"])
    assert [p.name for p in tmp_path.iterdir()] == ["c.json"]

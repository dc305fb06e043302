"""Published duals, written by hand in our language, checked against the derivation.

Each claim under tests/claims/ is a textbook dual of a bundled example; the
check must call it "equivalent", and say whether by proof or by numbers.
"""

from __future__ import annotations

import math

import pytest

from dualize.checking import check_claim
from tests.checking.paths import claim_path, claim_text, example

SEEDS = (0, 1, 2)

TEXTBOOK = [
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.1.3 (from memory):
    # minimize x'x s.t. Ax = b has g(nu) = -(1/4) nu'AA'nu - b'nu.
    ("survey_least_norm", "least_norm_dual"),
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): the standard-form LP
    # minimize c'x s.t. Ax = b, x >= 0 has the dual maximize -b'nu s.t. A'nu + c >= 0.
    ("flour_blend_lp", "lp_standard_dual"),
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): the inequality-form LP
    # minimize c'x s.t. Ax <= b has the dual maximize -b'l s.t. A'l + c = 0, l >= 0.
    ("joinery_lp", "lp_inequality_dual"),
    # C. Cortes and V. Vapnik, Support-vector networks, Machine Learning 20, 1995 (from
    # memory): maximize 1'a - 1/2 a'Da s.t. y'a = 0, 0 <= a <= C, D_ij = y_i y_j x_i'x_j.
    ("parts_soft_margin", "soft_margin_dual"),
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory), entropy maximization,
    # with the multiplier of 1'x = 1 maximized in closed form (section 5.2.4, from memory):
    # maximize -b'l - log sum_i exp(-a_i'l) s.t. l >= 0.
    ("route_entropy", "entropy_dual"),
    # S.-J. Kim, K. Koh, M. Lustig, S. Boyd, D. Gorinevsky, An interior-point method for
    # large-scale l1-regularized least squares, IEEE J. Sel. Topics Signal Processing, 2007
    # (from memory): maximize -(1/4) nu'nu - nu'y s.t. ||A'nu||_inf <= lambda.
    ("spectrum_lasso", "lasso_dual"),
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): minimize ||x|| s.t. Ax = b
    # has g(nu) = b'nu on ||A'nu||_* <= 1 (their nu is minus ours: they price b - Ax).
    ("antenna_norm_min", "norm_min_dual"),
    # Boyd and Vandenberghe, 2004, section 5.2 and the conjugate of x'Px/2 in section 3.3
    # (from memory): the QP dual maximize -1/2 (q + G'l)'P^-1(q + G'l) - h'l, l >= 0.
    ("drone_thrust_qp", "qp_dual"),
    # Boyd and Vandenberghe, 2004, section 5.7.1 (from memory): norm approximation
    # minimize ||Ax - b|| has the dual maximize b'nu s.t. ||nu||_* <= 1, A'nu = 0 (the
    # derivation prices the residual with the opposite sign: nu -> -nu).
    ("kiln_minimax", "minimax_dual"),
    # Common practice (an LP over a box kept as a domain; the infimum of a linear function
    # over [0, 1]^n is the sum of its negative coefficients): maximize -b'l +
    # sum min(c + A'l, 0) s.t. l >= 0.
    ("charging_box", "box_lp_dual"),
]


@pytest.mark.parametrize(("primal", "claim"), TEXTBOOK)
def test_textbook_dual_is_equivalent(primal: str, claim: str) -> None:
    problem = example(primal)
    report = check_claim(problem, claim_text(claim), seeds=SEEDS, claim_path=claim_path(claim))
    assert report.verdict == "equivalent", report.messages
    assert report.method == "symbolic", report.symbolic.reasons
    assert report.ok and report.counterexample is None
    for row in report.instances:
        v = row.values
        assert v.claim_status == "optimal", v
        # Weak and strong duality (common practice): these problems are convex with
        # strictly feasible random instances, so the claim's optimum is p*.
        assert math.isclose(v.claim_value, v.primal_value, rel_tol=1e-5, abs_tol=1e-6)


NUMERIC_ONLY = [
    # Boyd and Vandenberghe, 2004, section 5.7.1 (from memory), analytic centering:
    # maximize sum log nu + m - b'nu s.t. A'nu = 0, on the bundled bounded polyhedron.  The
    # derivation states nu <= 0 explicitly (with the opposite sign of nu), which the claim
    # leaves to the domain of log, so only numbers equate the two.
    ("robot_analytic_center", "analytic_center_dual", "robot_analytic_center.json"),
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): before eliminating it, the
    # standard-form LP dual keeps lambda >= 0 with A'nu - lambda + c = 0; the derivation
    # eliminated lambda, so the variables do not pair and only numbers equate the two.
    ("flour_blend_lp", "lp_standard_with_slack", None),
]


@pytest.mark.parametrize(("primal", "claim", "data"), NUMERIC_ONLY)
def test_textbook_dual_in_another_form_is_equivalent_by_numbers(primal: str, claim: str,
                                                                 data: str | None) -> None:
    from dualize.numeric.instance import read_instance
    from tests.checking.paths import EXAMPLES

    problem = example(primal)
    given = [read_instance(str(EXAMPLES / data), problem)] if data else []
    report = check_claim(problem, claim_text(claim), instances=given,
                         seeds=() if data else SEEDS)
    assert report.verdict == "equivalent", report.messages
    assert report.method == "numeric"
    for row in report.instances:
        v = row.values
        assert math.isclose(v.claim_value, v.primal_value, rel_tol=1e-5, abs_tol=1e-6)


def test_renamed_variable_is_matched_by_shape() -> None:
    # The derivation names the least-norm multiplier nu1 (an unlabelled constraint);
    # the claim calls it nu.
    report = check_claim(example("survey_least_norm"), claim_text("least_norm_dual"),
                         seeds=(0,))
    [match] = report.matching.pairs
    assert (match.claim, match.derived, match.how) == ("nu", "nu1", "shape")


def test_opposite_sign_convention_is_proved_with_the_sign_turned() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory) price b - Ax, so their
    # least-norm dual is -(1/4) nu'AA'nu + b'nu: the same problem under nu -> -nu.
    report = check_claim(example("survey_least_norm"), claim_text("least_norm_flipped_nu"),
                         seeds=SEEDS)
    assert report.verdict == "equivalent" and report.method == "symbolic"
    assert report.symbolic.flipped == ("nu",)
    assert all(row.agrees for row in report.instances)


def test_maximization_dual_is_an_upper_bound_claim() -> None:
    # Common practice (the budget split maximize sum log x s.t. 1'x = B, x >= 0, rederived
    # by hand from the conjugate (-log)*(s) = -log(-s) - 1 in Boyd and Vandenberghe, 2004,
    # section 3.3, from memory): minimize B nu - sum log(nu 1 - mu) - n over mu >= 0,
    # whose optimum n log(B/n) equals p* (at mu = 0, nu = n/B).
    problem = example("lab_budget_max")
    text = ("minimize B * nu - sum(log(nu * ones(n) - mu)) - sum(ones(n))\n"
            "over nu in R, mu in R^n_+\n")
    report = check_claim(problem, text, seeds=SEEDS)
    assert report.verdict == "equivalent", report.messages
    assert [(m.claim, m.derived) for m in report.matching.pairs] == [("nu", "budget"),
                                                                      ("mu", "floor")]
    for row in report.instances:
        v = row.values
        assert math.isclose(v.claim_value, v.primal_value, rel_tol=1e-5, abs_tol=1e-6)


def test_maximization_claim_below_the_optimum_is_invalid() -> None:
    # Weak duality for a maximization (common practice): every dual value is at least p*.
    # Subtracting n more gives n log(B/n) - n < p*, an "upper bound" below the optimum.
    problem = example("lab_budget_max")
    text = ("minimize B * nu - sum(log(nu * ones(n) - mu)) - 2 * sum(ones(n))\n"
            "over nu in R, mu in R^n_+\n")
    report = check_claim(problem, text, seeds=(0,))
    assert report.verdict == "invalid: exceeds the primal optimum"
    [row] = report.instances
    assert report.counterexample is not None
    n = report.counterexample.dims["n"]
    assert math.isclose(row.values.claim_value, row.values.primal_value - n, rel_tol=1e-5)


def test_partition_dual_is_equivalent_though_below_the_primal() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.5 (from memory): for minimize x'Wx s.t.
    # x_i^2 = 1, g(nu) = -1'nu on W + diag(nu) succeq 0, and only weak duality holds.  The
    # bundled instance has a gap: the claim equals d* and stays below p*, found here by
    # enumerating every sign vector.
    import itertools
    import json

    import numpy as np

    from dualize.numeric.instance import read_instance
    from tests.checking.paths import EXAMPLES

    problem = example("shift_partition")
    path = EXAMPLES / "shift_partition.json"
    report = check_claim(problem, claim_text("partition_dual"),
                         instances=[read_instance(str(path), problem)], seeds=())
    assert report.verdict == "equivalent" and report.method == "symbolic"
    W = np.asarray(json.loads(path.read_text())["W"], dtype=float)
    best = min(float(np.array(x) @ W @ np.array(x))
               for x in itertools.product((-1.0, 1.0), repeat=W.shape[0]))
    [row] = report.instances
    assert row.values.claim_value < best - 1e-3
    assert any("not certifiably convex" in m for m in report.messages)

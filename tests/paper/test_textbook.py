"""Published duals typeset as papers print them, translated and compared with the
derived dual (objective by ``same_expression``, constraints by ``same_constraint``)."""

from __future__ import annotations

import pytest

from tests.paper.helpers import agreement, by_label, claim_objective_equals

CASES = [
    # C. Cortes and V. Vapnik, Support-vector networks, Machine Learning 20, 1995 (from
    # memory): maximize sum_i a_i - 1/2 sum_ij y_i y_j a_i a_j x_i'x_j s.t. sum_i a_i y_i = 0,
    # 0 <= a_i <= C; the index form and the matrix form 1'a - 1/2 a' diag(y) X X' diag(y) a.
    ("svm:index", "parts_soft_margin", 3),
    ("svm:matrix", "parts_soft_margin", 3),
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.2.1 (from memory):
    # the inequality-form LP's dual maximize -b'lambda s.t. A'lambda + c = 0, lambda >= 0.
    ("lp:matrix", "joinery_lp", 2),
    ("lp:index", "joinery_lp", 2),
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): the least-norm dual
    # g(nu) = -1/4 nu'AA'nu - b'nu, unconstrained; -1/4 ||A'nu||^2 is the same quantity.
    ("ln:matrix", "survey_least_norm", 0),
    ("ln:index", "survey_least_norm", 0),
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory), with the multiplier of
    # 1'x = 1 maximized away: maximize -b'lambda - log sum_j exp(-a_j'lambda), lambda >= 0,
    # a_j the columns of A (the index runs to n, so a_j is a column).
    ("ent:matrix", "route_entropy", 1),
    ("ent:index", "route_entropy", 1),
]


@pytest.mark.parametrize(("label", "problem", "count"), CASES)
def test_textbook_dual_translates_to_the_derived_dual(label: str, problem: str,
                                                      count: int) -> None:
    t = by_label("duals.tex", label, problem)
    assert t.ok, t.diagnostics
    objective, constraints, mine = agreement(t, problem)
    assert objective, t.text
    assert all(constraints) and mine == count == len(constraints), t.text


def test_soft_margin_sign_mistake_flips_the_quadratic_term() -> None:
    # Cortes and Vapnik, 1995 (from memory), with +1/2 where the dual has -1/2.
    t = by_label("mistakes.tex", "svm:sign", "parts_soft_margin")
    objective, constraints, _ = agreement(t, "parts_soft_margin")
    assert not objective and all(constraints)
    assert claim_objective_equals(
        t, "sum(alpha) + 1/2 * alpha' * diag(y) * X * X' * diag(y) * alpha")


def test_soft_margin_dropped_upper_bound_is_the_one_missing() -> None:
    # Cortes and Vapnik, 1995 (from memory): the box 0 <= a <= C with its upper side lost.
    t = by_label("mistakes.tex", "svm:dropped", "parts_soft_margin")
    objective, constraints, mine = agreement(t, "parts_soft_margin")
    assert objective and mine == 2
    assert constraints.count(False) == 1
    assert "alpha <= C" not in (t.text or "")


def test_least_norm_factor_mistake_is_one_half_for_one_quarter() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.3 (from memory): the factor is 1/4.
    t = by_label("mistakes.tex", "ln:factor", "survey_least_norm")
    objective, _, _ = agreement(t, "survey_least_norm")
    assert not objective
    assert claim_objective_equals(t, "-1/2 * nu1' * A * A' * nu1 - b' * nu1")


def test_entropy_sign_mistake_is_inside_the_exponential() -> None:
    # Boyd and Vandenberghe, 2004, section 5.1.6 (from memory): exp(-A'lambda), not exp(A'lambda).
    t = by_label("mistakes.tex", "ent:sign", "route_entropy")
    objective, constraints, _ = agreement(t, "route_entropy")
    assert not objective and all(constraints)
    assert claim_objective_equals(t, "-b' * capacity - log(sum(exp(A' * capacity)))")


def test_lp_transpose_mistake_is_a_located_shape_error() -> None:
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory): A'lambda has c's length;
    # A lambda does not conform, and the message points at the constraint in the draft.
    t = by_label("mistakes.tex", "lp:shape", "joinery_lp")
    assert not t.ok
    (d,) = [d for d in t.diagnostics if d.rule == "paper-claim"]
    assert d.span is not None and d.span.line == 29 and "shape" in " ".join(d.notes) + d.message

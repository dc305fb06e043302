"""The strong-duality verdict on textbook problems.

Sources (S. Boyd and L. Vandenberghe, Convex Optimization, 2004; from memory):
section 5.2.3 (Slater's condition and its refinement for affine constraints),
exercise 5.21 (a convex problem where Slater fails and there is a gap), exercise 5.1
(a scalar problem where Slater holds), section 5.1.5 (two-way partitioning: weak
duality only), section 5.1.3 (LP in standard form).
"""

from __future__ import annotations

from analysis_fixtures import load_problem

from dualize.api import analyze


def verdict(text: str, instance: object = None) -> tuple[str, str, object]:
    a = analyze(load_problem(text), instance)
    return a.strong_duality_status, a.strong_duality_reason, a.witness


def test_exercise_5_21_has_no_slater_point() -> None:
    # minimize exp(-x) s.t. x^2/y <= 0 over y > 0: convex, p* = 1, d* = 0 (exercise 5.21)
    status, reason, witness = verdict(
        "minimize exp(-x)\nover x in R, y in R_++\nsubject to\n  c: x^2 / y <= 0\n")
    assert status == "not-guaranteed"
    assert "no strictly feasible point" in reason and witness is None
    a = analyze(load_problem(
        "minimize exp(-x)\nover x in R, y in R_++\nsubject to\n  c: x^2 / y <= 0\n"))
    assert a.convex is True
    assert "slater-fails" in [d.rule for d in a.diagnostics]


def test_square_below_zero_has_no_strict_point() -> None:
    # minimize x s.t. x^2 <= 0: the only feasible point is 0, never strictly (section 5.2.3)
    status, reason, _ = verdict("minimize x\nover x in R\nsubject to\n  c: x^2 <= 0\n")
    assert status == "not-guaranteed"
    assert "x**2" in reason


def test_exercise_5_1_slater_point_is_shown() -> None:
    # minimize x^2 + 1 s.t. (x-2)(x-4) <= 0: feasible set [2, 4], x = 3 is strictly inside
    status, reason, witness = verdict(
        "minimize x^2 + 1\nover x in R\nsubject to\n  c: (x - 2) * (x - 4) <= 0\n")
    assert status == "guaranteed"
    assert witness is not None and 2 < witness["x"] < 4


def test_equality_lp_is_tight_when_feasible_refined_condition() -> None:
    # standard-form LP with only affine constraints (section 5.2.3, refined condition)
    text = ("data A in R^(m,n)\ndata b in R^m\ndata c in R^n\n"
            "minimize c' * x\nover x in R^n\nsubject to\n  nu: A*x == b\n  lam: x >= 0\n")
    status, reason, _ = verdict(text)
    assert status == "guaranteed"
    assert "whenever the problem is feasible" in reason


def test_partitioning_is_weak_duality_only() -> None:
    # two-way partitioning, x_i^2 = 1 (section 5.1.5): nonconvex equality
    a = analyze(load_problem("data W in S^n\nminimize x' * W * x\nover x in R^n\n"
                             "subject to\n  nu: x .* x == 1\n"))
    assert a.convex is False
    assert a.strong_duality_status == "not-guaranteed"
    assert "weak duality only" in a.strong_duality_reason
    assert ("nu", "nonaffine-equality") in a.constraint_classes


def test_norm_ball_origin_is_strictly_feasible_by_declared_fact() -> None:
    # ||x|| <= r with r in R_++: x = 0 gives -r < 0 (common practice)
    status, reason, witness = verdict(
        "data r in R_++\ndata c in R^n\nminimize c' * x\nover x in R^n\n"
        "subject to\n  ball: ||x|| <= r\n")
    assert status == "guaranteed" and witness == {"x": 0.0}
    assert "every variable is 0" in reason


def test_norm_ball_with_data_of_unknown_sign_is_undecided() -> None:
    status, reason, _ = verdict(
        "data r in R\ndata c in R^n\nminimize c' * x\nover x in R^n\n"
        "subject to\n  ball: ||x|| <= r\n")
    assert status == "unknown"
    assert "cannot be decided on symbolic data" in reason and "--data" in reason


def test_no_constraints_is_trivially_tight() -> None:
    status, _, _ = verdict("data c in R^n\nminimize ||x - c||\nover x in R^n\n")
    assert status == "guaranteed"


def test_integer_variables_are_nonconvex() -> None:
    a = analyze(load_problem("data c in R^n\nminimize c' * x\nover x in {0,1}^n\n"
                             "subject to\n  cap: sum(x) <= 3\n"))
    assert a.convex is False and a.strong_duality_status == "not-guaranteed"
    assert ("x", "integrality") in a.constraint_classes


def test_constraint_classes() -> None:
    a = analyze(load_problem(
        "data A in R^(m,n)\ndata b in R^m\ndata F in S^n\n"
        "minimize sum(x)\nover x in R^n, X in S^n\nsubject to\n"
        "  aff: A*x <= b\n  ball: ||x|| <= 1\n  eqa: sum(x) == 1\n  neq: x' * x == 1\n"
        "  sup: ||x|| >= 1\n  lmi: X succeq F\n"))
    assert dict(a.constraint_classes) == {
        "aff": "affine-inequality", "ball": "convex-inequality", "eqa": "affine-equality",
        "neq": "nonaffine-equality", "sup": "nonconvex-inequality",
        "lmi": "linear-matrix-inequality"}
    assert a.convex is False


def test_soft_margin_is_feasible_with_large_slacks() -> None:
    # the soft-margin problem of C. Cortes and V. Vapnik, Support-vector networks, 1995
    # (from memory): w = 0, b = 0 and large slacks satisfy every constraint strictly, for
    # any data, so strong duality holds outright (not only "if feasible")
    text = ("data X in R^(m,n)\ndata y in R^m\ndata C in R_++\n"
            "minimize 1/2 * ||w||^2 + C * sum(s)\nover w in R^n, b in R, s in R^m\n"
            "subject to\n  alpha: y .* (X*w + b) >= 1 - s\n  beta: s >= 0\n")
    status, reason, _ = verdict(text)
    assert status == "guaranteed"
    assert "every entry of s equal to t" in reason and "if feasible" not in reason


def test_slack_with_a_positive_coefficient_is_not_a_slack() -> None:
    # s <= u bounds s above, so s is no slack; x is one (x >= 1 - s holds for x large),
    # but s = 0 needs u >= 0, which the data's set does not say: no point is claimed
    from dualize.analysis.slack_point import slack_candidate, slacks_of

    p = load_problem("data u in R^n\nminimize sum(x)\nover x in R^n, s in R^n\n"
                     "subject to\n  lo: x >= 1 - s\n  hi: s <= u\n")
    assert [v.name for v in slacks_of(p)] == ["x"]
    a = analyze(p)
    assert slack_candidate(p, _convexity(p)) is None
    assert "whenever the problem is feasible" in a.strong_duality_reason


def _convexity(p: object) -> object:
    from dualize.analysis.convexity import analyse_convexity

    return analyse_convexity(p)


def test_small_psd_variable_is_not_given_a_grid_point() -> None:
    # X = 0 is not in the interior of S^2_+: no witness may be shown for it (section 5.2.3
    # asks for a point in the relative interior of the domain)
    a = analyze(load_problem("minimize trace(X)\nover X in S^2_+\nsubject to\n"
                             "  c: trace(X) >= 1\n"))
    assert a.witness is None or "X" not in a.witness

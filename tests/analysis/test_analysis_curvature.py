"""Curvature of building blocks and compositions, against textbook facts.

Source throughout unless noted: S. Boyd and L. Vandenberghe, Convex Optimization,
Cambridge University Press, 2004, chapter 3 (from memory): section 3.1.5 lists the
basic convex and concave functions, section 3.2 the operations that preserve
convexity (nonnegative sums, affine maps, pointwise maximum, composition rules
3.2.4).  The composition rules follow M. Grant, S. Boyd and Y. Ye, Disciplined
convex programming, 2006 (from memory).
"""

from __future__ import annotations

import pytest
from analysis_fixtures import objective_curvature

VEC = "x in R^n"
DATA = ("data A in R^(m,n)\ndata b in R^m\ndata P in S^n_+\ndata c in R^n\n"
        "data t in R_++\ndata W in S^n")


@pytest.mark.parametrize("objective, over, expected", [
    # 3.1.5: exponential, powers, logarithm, negative entropy, norms, max
    ("exp(3 * x)", "x in R", "convex"),
    ("exp(-x)", "x in R", "convex"),
    ("log(x)", "x in R_++", "concave"),
    ("-log(x)", "x in R_++", "convex"),  # the log barrier
    ("x .* log(x)", "x in R_++", "convex"),  # negative entropy
    ("sum(x .* log(x))", "x in R^n_++", "convex"),
    ("x^2", "x in R", "convex"),
    ("x^4", "x in R", "convex"),
    ("x^(3/2)", "x in R_+", "convex"),  # x^a, a >= 1, on R_+
    ("x^(1/2)", "x in R_+", "concave"),  # x^a, 0 <= a <= 1
    ("sqrt(x)", "x in R_+", "concave"),
    ("x^(-1)", "x in R_++", "convex"),  # x^a, a <= 0, on R_++
    ("1 / x", "x in R_++", "convex"),
    ("||x||", VEC, "convex"),
    ("||x||_1", VEC, "convex"),
    ("||x||_inf", VEC, "convex"),
    ("max(x, 0)", "x in R", "convex"),  # the hinge
    ("min(x, 1)", "x in R", "concave"),
    ("|x|", "x in R", "convex"),
    ("log(sum(exp(x)))", VEC, "convex"),  # log-sum-exp, 3.1.5
    ("x^2 / y", "x in R, y in R_++", "convex"),  # quadratic-over-linear, 3.1.5
    ("||x||^2 / y", "x in R^n, y in R_++", "convex"),
])
def test_basic_functions(objective: str, over: str, expected: str) -> None:
    assert objective_curvature(objective, over) == expected


@pytest.mark.parametrize("objective, expected", [
    ("x' * P * x", "convex"),  # quadratic form with P psd (3.1.4, second-order test)
    ("x' * x", "convex"),
    ("||A*x - b||^2", "convex"),  # least squares
    ("(A*x - b)' * (A*x - b)", "convex"),
    ("1/2 * x' * P * x + c' * x", "convex"),
    ("-(x' * P * x)", "concave"),
    ("c' * x + 3", "affine"),
    ("t * ||x||_1 + ||A*x - b||", "convex"),  # nonnegative weighted sum, 3.2.1
    ("-t * ||x||", "concave"),
    ("exp(||x||)", "convex"),  # composition: convex nondecreasing of convex, 3.2.4
    ("log(t + c' * x)", "concave"),  # concave of affine, 3.2.2
    ("sqrt(t - ||x||)", "concave"),  # concave nondecreasing of concave, 3.2.4
    # 1/g is convex for g concave and positive (3.2.4); here g may be negative, where
    # 1/g is defined and concave, so no rule may fire
    ("1 / (t - ||x||)", "unknown"),
    ("max(||x||, c' * x)", "convex"),  # pointwise maximum, 3.2.3
    ("||max(x, 0)||", "convex"),  # norm nondecreasing on R^n_+ of convex nonneg
    ("x' * W * x", "unknown"),  # W only symmetric: indefinite in general
])
def test_compositions(objective: str, expected: str) -> None:
    assert objective_curvature(objective, VEC, DATA) == expected


@pytest.mark.parametrize("objective, over, expected", [
    # (x - 2)(x - 4) = x^2 - 6x + 8: Hessian 2 > 0, convex though the product rule rejects
    # it (Boyd and Vandenberghe, 2004, exercise 5.1, from memory)
    ("(x - 2) * (x - 4)", "x in R", "convex"),
    ("-(x - 1) * (x + 1)", "x in R", "concave"),
    # x1 * x2 has the constant indefinite Hessian [[0, 1], [1, 0]] (3.1.4): neither
    ("x1 * x2", "x1 in R, x2 in R", "unknown"),
    ("(x1 + x2) * (x1 + x2) + x1", "x1 in R, x2 in R", "convex"),
    ("x^3", "x in R", "unknown"),  # Hessian 6x changes sign on R
    ("x^3", "x in R_+", "convex"),  # x^a, a >= 1, on R_+
])
def test_hessian_fallback(objective: str, over: str, expected: str) -> None:
    assert objective_curvature(objective, over) == expected


def test_hessian_proves_neither() -> None:
    """The internal verdict keeps "neither" so the problem is reported nonconvex."""
    from analysis_fixtures import load_problem

    from dualize.analysis.hessian import curvature_with_fallback

    p = load_problem("minimize x1 * x2\nover x1 in R, x2 in R\n")
    assert curvature_with_fallback(p.objective, p, {}) == "neither"


@pytest.mark.parametrize("expr, over, expected", [
    ("exp(x)", "x in R", "pos"),
    ("||x||", VEC, "nonneg"),
    ("x", "x in R_++", "pos"),
    ("-t * x", "x in R_+", "nonpos"),
    ("x^2", "x in R", "nonneg"),
    ("x", "x in R", "unknown"),
])
def test_sign(expr: str, over: str, expected: str) -> None:
    from analysis_fixtures import load_problem

    from dualize.analysis import sign
    from dualize.analysis.convexity import variable_signs

    p = load_problem(f"{DATA}\nminimize {expr}\nover {over}\n")
    assert sign(p.objective, variable_signs(p)) == expected

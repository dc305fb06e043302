"""Huber's function, the logistic loss and the relative entropy, spelled our way.

Each has its conjugate derived by the engine (never looked up) and checked
numerically; the duals are checked against published forms and against cvxpy.
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from dualize.duality.conjugate import conjugate
from dualize.model.functions import LOGCOST, QUADLIN, SOFTPLUS
from tests.duality.test_engine_textbook import _check, _claim, _derive

T = sympy.Symbol("t", real=True)
S = sympy.Symbol("s", real=True)


def test_huber_conjugate_is_half_square_on_the_unit_interval() -> None:
    # Huber's function with threshold 1 has the conjugate s^2/2 on [-1, 1] (the infimal
    # convolution of t^2/2 and |t|: conjugates add, s^2/2 plus the indicator of
    # |s| <= 1; R. T. Rockafellar, Convex Analysis, 1970, section 16, from memory).
    c = conjugate(QUADLIN.to_sympy(T), T)
    assert sympy.simplify(c.value - S**2 / 2) == 0
    assert c.domain == sympy.Interval(-1, 1)
    assert c.checked


def test_logistic_loss_conjugate_is_the_binary_entropy() -> None:
    # log(1 + e^-t) has the conjugate (-s) log(-s) + (1 + s) log(1 + s) on [-1, 0]
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.3 and
    # from memory: the conjugate of log(1 + e^t) is s log s + (1 - s)
    # log(1 - s) on [0, 1], reflected by t -> -t).
    c = conjugate(LOGCOST.to_sympy(T), T)
    want = -S * sympy.log(-S) + (1 + S) * sympy.log(1 + S)
    for s in (-0.9, -0.5, -0.1):
        assert abs(float(c.value.subs(S, s)) - float(want.subs(S, s))) < 1e-12
    assert c.domain == sympy.Interval(-1, 0)
    d = conjugate(SOFTPLUS.to_sympy(T), T)
    assert d.domain == sympy.Interval(0, 1)


LOGREG = "data X in R^(m,n)\ndata y in R^m\ndata lam in R_++"


def test_logistic_regression_dual_has_its_entropy_terms() -> None:
    # Regularized logistic regression, minimize sum_i log(1 + exp(-y_i x_i'w)) +
    # lam/2 ||w||^2, has the dual maximize sum_i H(a_i) - 1/(2 lam) ||X' diag(y) a||^2
    # over 0 <= a <= 1, H the binary entropy -a log a - (1 - a) log(1 - a)
    # (T. Jaakkola and D. Haussler, Probabilistic kernel regression models, 1999, from
    # memory).  Our split multiplier is z = -a.
    d = _derive(LOGREG + "\nminimize sum(logcost(y .* (X*w))) + lam/2 * ||w||^2\n"
                "over w in R^n")
    claim = _claim(LOGREG, "maximize sum(z .* log(-z)) - sum((z + 1) .* log(z + 1)) - "
                   "1/(2*lam) * z' * diag(y) * X * X' * diag(y) * z\nover z in R^m\n"
                   "subject to\n  z >= -1\n  z <= 0")
    _check(d, claim)


HUBER = "data A in R^(m,n)\ndata b in R^m"


def test_huber_regression_dual_is_a_box_constrained_qp() -> None:
    # minimize sum quadlin(A x - b) + 1/2 ||x||^2: splitting u = A x - b, the dual is
    # maximize -1/2 ||A'z||^2 - 1/2 ||z||^2 - b'z over |z| <= 1 (conjugates of Huber's
    # function and of 1/2||x||^2; Boyd and Vandenberghe, 2004, section 5.7, from memory).
    d = _derive(HUBER + "\nminimize sum(quadlin(A*x - b)) + 1/2 * ||x||^2\nover x in R^n")
    claim = _claim(HUBER, "maximize -1/2 * z' * A * A' * z - 1/2 * sum(z^2) - b' * z\n"
                   "over z in R^m\nsubject to\n  z >= -1\n  z <= 1")
    _check(d, claim)


@pytest.mark.parametrize("text", [
    LOGREG + "\nminimize sum(logcost(y .* (X*w))) + lam/2 * ||w||^2\nover w in R^n",
    HUBER + "\nminimize sum(quadlin(A*x - b)) + 1/2 * ||x||^2\nover x in R^n",
    "data q in R^n_++\nminimize sum(relent(p, q))\nover p in R^n_+\nsubject to\n"
    "  total: sum(p) == 1",
])
def test_dual_optimum_meets_cvxpy_on_random_instances(text: str) -> None:
    # Strong duality for these convex problems (Boyd and Vandenberghe, 2004, section
    # 5.2.3, from memory); cvxpy's primal solve is the reference.
    pytest.importorskip("cvxpy")
    from dualize.duality import derive
    from dualize.model import load
    from dualize.numeric.verify import verify

    loaded = load(text)
    assert loaded.problem is not None
    report = verify(derive(loaded.problem), [], seeds=[1, 2])
    assert report.verdict == "zero-gap", report.messages


def test_numeric_forms_agree_with_the_definitions() -> None:
    # The numpy forms against the definitions, at points on both sides of the kinks
    # (common practice).
    u = np.array([-3.0, -1.0, -0.25, 0.0, 0.5, 1.0, 2.5])
    huber = np.where(np.abs(u) <= 1, u**2 / 2, np.abs(u) - 0.5)
    assert np.allclose(QUADLIN.numpy.callable()(u), huber)
    assert np.allclose(LOGCOST.numpy.callable()(u), np.log1p(np.exp(-u)))


def test_joint_relative_entropy_dual_is_an_exponential_cone_condition() -> None:
    # inf over u, v > 0 of u log(u/v) + g u + h v is 0 where h >= exp(-g - 1) and minus
    # infinity elsewhere: the perspective of w log w, whose conjugate is exp(s - 1)
    # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, sections 3.2.6 and 3.3,
    # from memory).  Here g = a 1 and h = A'fit.
    data = "data A in R^(m,n)\ndata b in R^m"
    d = _derive(data + "\nminimize sum(relent(u, v))\nover u in R^n_+, v in R^n_++\n"
                "subject to\n  a: sum(u) == 1\n  fit: A*v == b")
    claim = _claim(data, "maximize -b' * fit - a\nover a in R, fit in R^m\nsubject to\n"
                   "  A' * fit - exp(-a * ones(n) - ones(n)) >= 0")
    _check(d, claim)
    assert any(s.rule == "minimize-perspective" for s in d.steps)

"""softplus(u) = log(1 + exp(u)): one entry of the function table, used end to end.

The function was added through dualize/model/functions.py alone; these tests
check each stage that reads the table: the resolver, the curvature rules, the
conjugate engine, the numpy form and a derived dual against cvxpy.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import sympy

from dualize.analysis.convexity_calculus import curvature
from dualize.duality import derive
from dualize.duality.conjugate import conjugate
from dualize.model import expr as ir
from dualize.model import load
from dualize.numeric.evaluate import evaluate
from dualize.numeric.instance import Instance

SCORING = """
# A quality lab scores parts as pass or fail from a few gauge readings.
title "Pass-fail scoring with a softplus loss"
data X in R^(m,n)
data y in R^m
data c in R_++
minimize sum(softplus(-y .* (X*w))) + c/2*||w||^2
over w in R^n
"""


def _objective(text: str) -> ir.Expr:
    loaded = load(text)
    assert loaded.problem is not None, loaded.diagnostics
    return loaded.problem.objective


@pytest.mark.parametrize(
    ("body", "expected"),
    [
        # softplus is convex and increasing, so softplus(convex) is convex and
        # -softplus(.) concave; softplus(concave) is not decided by the rules
        # (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.2.4,
        # composition rules, from memory).
        ("sum(softplus(A*x - b))", "convex"),
        ("sum(softplus(x .^ 2))", "convex"),
        ("-sum(softplus(x))", "concave"),
        ("sum(softplus(sqrt(x)))", "unknown"),
    ],
)
def test_softplus_curvature(body: str, expected: str) -> None:
    text = f"data A in R^(m,n)\ndata b in R^m\nminimize {body}\nover x in R^n\n"
    assert curvature(_objective(text)) == expected


def test_the_written_out_form_and_softplus_are_both_convex() -> None:
    # log(1 + exp(u)) is convex (Boyd and Vandenberghe, 2004, section 3.1.5, from
    # memory). The plain composition rules cannot conclude it (log is concave
    # increasing, 1 + exp(u) convex); the engine recognises the log-of-one-plus-exp
    # pattern as softplus, so both spellings are decided convex.
    spelled = "data A in R^(m,n)\nminimize sum(log(1 + exp(A*x)))\nover x in R^n\n"
    named = "data A in R^(m,n)\nminimize sum(softplus(A*x))\nover x in R^n\n"
    assert curvature(_objective(spelled)) == "convex"
    assert curvature(_objective(named)) == "convex"


def test_softplus_conjugate_is_the_negative_binary_entropy() -> None:
    # (log(1 + e^t))* = s log s + (1 - s) log(1 - s) on [0, 1], with value 0 at both
    # ends (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.3,
    # from memory; the binary entropy is common knowledge).
    t = sympy.Symbol("t", real=True)
    conj = conjugate(sympy.log(1 + sympy.exp(t)), t)
    assert conj.checked
    assert conj.domain == sympy.Interval(0, 1)
    assert sorted((float(p), float(v)) for p, v in conj.boundary) == [(0.0, 0.0), (1.0, 0.0)]
    value = sympy.lambdify(conj.s, conj.value, "math")
    for s in (0.01, 0.2, 0.5, 0.77, 0.999):
        assert value(s) == pytest.approx(s * math.log(s) + (1 - s) * math.log(1 - s), abs=1e-12)


def test_numpy_form_does_not_overflow() -> None:
    # log(1 + e^u) = u + log(1 + e^-u): about u for large u and e^u for very
    # negative u (common practice); log(1 + e^0) = log 2.
    u = ir.Symbol("u", "data", ir.vector(4))
    values = evaluate(ir.Apply("softplus", u), {"u": np.array([-800.0, -30.0, 0.0, 800.0])}, {})
    out = np.asarray(values).ravel()
    assert np.all(np.isfinite(out))
    assert out[0] == pytest.approx(0.0, abs=1e-300)
    assert out[1] == pytest.approx(math.exp(-30.0), rel=1e-12)
    assert out[2] == pytest.approx(math.log(2.0), rel=1e-15)
    assert out[3] == pytest.approx(800.0, rel=1e-15)


def _cvxpy_primal(x: np.ndarray, y: np.ndarray, c: float) -> float:
    """The scoring problem restated by hand in cvxpy (its logistic atom is softplus)."""
    cp = pytest.importorskip("cvxpy")
    w = cp.Variable(x.shape[1])
    loss = cp.sum(cp.logistic(-cp.multiply(y, x @ w))) + c / 2 * cp.sum_squares(w)
    problem = cp.Problem(cp.Minimize(loss))
    problem.solve()
    assert problem.status == "optimal"
    return float(problem.value)


@pytest.mark.parametrize("seed", [1, 2, 3])
def test_scoring_dual_meets_the_cvxpy_primal(seed: int) -> None:
    # Unconstrained convex primal after the split u = -diag(y) X w: strong duality
    # holds (Boyd and Vandenberghe, 2004, section 5.2.3, from memory), so the
    # derived dual's optimum must equal cvxpy's primal optimum on random instances.
    pytest.importorskip("cvxpy")
    from dualize.numeric.reference import solve_dual

    loaded = load(SCORING)
    assert loaded.problem is not None
    derivation = derive(loaded.problem)
    assert derivation.dual.closed_form
    rng = np.random.default_rng(seed)
    m, n = 15, 4
    x = rng.normal(size=(m, n))
    y = np.where(rng.random(m) < 0.5, -1.0, 1.0)
    c = float(rng.uniform(0.5, 2.0))
    instance = Instance({"X": x, "y": y, "c": c}, {"m": m, "n": n})
    dual = solve_dual(derivation.dual, instance)
    assert dual.status == "optimal", dual
    primal = _cvxpy_primal(x, y, c)
    assert dual.value == pytest.approx(primal, rel=1e-5, abs=1e-6)


def test_printed_forms() -> None:
    from dualize.render.latex_printer import latex_expr
    from dualize.render.text_printer import text_expr

    u = ir.Symbol("u", "variable", ir.vector(3))
    assert text_expr(ir.Apply("softplus", u)) == "softplus(u)"
    assert latex_expr(ir.Apply("softplus", u)) == r"\operatorname{softplus}(u)"


def _gradient_module():  # type: ignore[no-untyped-def]
    try:
        from dualize.solvergen import calculus
    except ImportError:
        from dualize.render import calculus
    return calculus


def test_derivative_matches_finite_differences() -> None:
    # d/du log(1 + e^u) = 1 / (1 + e^-u), the logistic sigmoid (common knowledge);
    # checked against central differences of the numpy form, even where e^u overflows.
    u = ir.Symbol("u", "variable", ir.vector(5))
    grad = _gradient_module().gradient(ir.SumAll(ir.Apply("softplus", u)), u)
    point = np.array([-750.0, -3.0, 0.0, 2.5, 750.0])
    got = np.asarray(evaluate(grad, {"u": point}, {})).ravel()
    assert np.all(np.isfinite(got))
    sigmoid = np.array([0.0, 1 / (1 + math.exp(3.0)), 0.5, 1 / (1 + math.exp(-2.5)), 1.0])
    assert np.allclose(got, sigmoid, rtol=1e-12, atol=1e-300)
    h = 1e-6
    middle = point[1:4]
    numeric = (np.logaddexp(0, middle + h) - np.logaddexp(0, middle - h)) / (2 * h)
    assert np.allclose(got[1:4], numeric, rtol=1e-7)


def test_softplus_takes_one_argument() -> None:
    loaded = load("data a in R^n\nminimize sum(softplus(x, a))\nover x in R^n\n")
    assert loaded.problem is None
    assert [d.rule for d in loaded.diagnostics] == ["argument-count"]

"""Every entry of the function table keeps its own promises, checked entry by entry.

The facts an entry states (sign, curvature, monotonicity) drive the analyses,
and its forms (sympy, numpy, numeric reference, derivative) must all be the
same function; a new entry is checked here without a test of its own.  The
checks are numeric (finite differences and sample points, common practice).
"""

from __future__ import annotations

import numpy as np
import pytest
import sympy

from dualize.model import expr as ir
from dualize.model import load
from dualize.model.functions import TABLE, ArgumentDomain, Function

ENTRIES = sorted(TABLE.values(), key=lambda f: f.name)
H = 1e-4


def _points(function: Function) -> np.ndarray:
    if function.domain is ArgumentDomain.REALS:
        return np.array([-3.0, -1.3, -0.4, 0.35, 0.9, 1.7, 3.2])
    return np.array([0.05, 0.3, 0.8, 1.5, 2.7, 6.0])


def _numpy(function: Function, u: np.ndarray) -> np.ndarray:
    return np.asarray(function.numpy.callable()(u), dtype=float)


@pytest.mark.parametrize("function", ENTRIES, ids=lambda f: f.name)
def test_sympy_and_numpy_forms_agree(function: Function) -> None:
    t = sympy.Symbol("t", real=True)
    exact = sympy.lambdify(t, function.to_sympy(t), "mpmath")
    points = _points(function)
    expected = [float(exact(float(p))) for p in points]
    assert np.allclose(_numpy(function, points), expected, rtol=1e-12, atol=1e-12)


@pytest.mark.parametrize("function", ENTRIES, ids=lambda f: f.name)
def test_stated_sign_curvature_and_monotonicity_hold(function: Function) -> None:
    u = _points(function)
    f, up, down = (_numpy(function, u + d) for d in (0.0, H, -H))
    if function.sign == "pos":
        assert np.all(f > 0)
    elif function.sign == "nonneg":
        assert np.all(f >= 0)
    second = (up - 2 * f + down) / H**2
    if function.curvature == "convex":
        assert np.all(second >= -1e-5)
    elif function.curvature == "concave":
        assert np.all(second <= 1e-5)
    slope = (up - down) / (2 * H)
    if function.monotone == "inc":
        assert np.all(slope >= 0)
    elif function.monotone == "dec":
        assert np.all(slope <= 0)
    elif function.monotone == "by-sign":
        assert np.all(slope[u < 0] <= 0) and np.all(slope[u > 0] >= 0)


@pytest.mark.parametrize("function", [f for f in ENTRIES if f.derivative is not None],
                         ids=lambda f: f.name)
def test_derivative_matches_central_differences(function: Function) -> None:
    from dualize.numeric.evaluate import evaluate

    u = _points(function)
    arg = ir.Symbol("u", "data", ir.vector(len(u)))
    node = ir.Apply(function.name, arg)
    assert function.derivative is not None
    got = np.asarray(evaluate(function.derivative(arg, node), {"u": u}, {})).ravel()
    numeric = (_numpy(function, u + H) - _numpy(function, u - H)) / (2 * H)
    assert np.allclose(got, numeric, rtol=1e-5, atol=1e-6)  # truncation error O(h^2)


@pytest.mark.parametrize("function", ENTRIES, ids=lambda f: f.name)
def test_the_numeric_reference_form_is_the_same_function(function: Function) -> None:
    cp = pytest.importorskip("cvxpy")
    u = _points(function)
    a, b = function.reference_affine
    value = a * getattr(cp, function.reference)(cp.Constant(b * u)).value
    assert np.allclose(np.asarray(value, dtype=float).ravel(), _numpy(function, u),
                       rtol=1e-9, atol=1e-9)


@pytest.mark.parametrize("function", [f for f in ENTRIES if f.spellings],
                         ids=lambda f: f.name)
def test_every_spelling_resolves_to_the_entry(function: Function) -> None:
    for spelling in function.spellings:
        loaded = load(f"minimize sum({spelling}(x))\nover x in R^3\n")
        assert loaded.problem is not None, loaded.diagnostics
        nodes = [n for n in ir.walk(loaded.problem.objective) if isinstance(n, ir.Apply)]
        assert [n.func for n in nodes] == [function.name]


@pytest.mark.parametrize("function", ENTRIES, ids=lambda f: f.name)
def test_printed_forms_show_the_argument(function: Function) -> None:
    from dualize.render.latex_printer import latex_expr
    from dualize.render.text_printer import text_expr

    node = ir.Apply(function.name, ir.Symbol("w", "variable", ir.vector(3)))
    assert "w" in text_expr(node)
    assert "w" in latex_expr(node)

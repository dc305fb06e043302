"""The two rewrites made before a symbolic comparison, each an exact identity."""

from __future__ import annotations

from dualize.checking.canonical import canonical
from dualize.duality.compare import same_expression
from dualize.model import load
from dualize.model.expr import Norm


def _objective(text: str):  # type: ignore[no-untyped-def]
    loaded = load("data A in R^(m,n)\ndata c in R^n\n" + text)
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return loaded.problem.objective


def test_negative_factor_leaves_a_norm() -> None:
    # Absolute homogeneity of norms (common practice): ||-2 e|| = 2 ||e||.
    e = canonical(_objective("minimize ||-2 * (A*x)||_1\nover x in R^n"))
    assert same_expression(e, canonical(_objective("minimize 2 * ||A*x||_1\nover x in R^n")))
    assert not same_expression(e, _objective("minimize ||A*x||_1\nover x in R^n"))


def test_abs_of_a_negated_vector() -> None:
    # |-e| = |e| entrywise (common practice).
    e = canonical(_objective("minimize sum(|-x|)\nover x in R^n"))
    assert same_expression(e, _objective("minimize sum(|x|)\nover x in R^n"))


def test_min_puts_the_constant_first() -> None:
    # min(a, b) = min(b, a) (common practice).
    a = canonical(_objective("minimize sum(min(c + A'*x, 0))\nover x in R^m"))
    b = canonical(_objective("minimize sum(min(0, A'*x + c))\nover x in R^m"))
    assert same_expression(a, b)


def test_positive_factor_stays_inside() -> None:
    e = _objective("minimize ||3 * x||\nover x in R^n")
    assert isinstance(canonical(e), Norm) and canonical(e) == e

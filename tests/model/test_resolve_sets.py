"""Sets -> shapes, facts and domains (the IR conventions the derivation relies on)."""

import pytest
import sympy

from dualize.model import load
from dualize.model.expr import SCALAR, Number, Scale, Shape
from dualize.model.problem import Problem

m = sympy.Symbol("m", integer=True, positive=True)
n = sympy.Symbol("n", integer=True, positive=True)
ONE = sympy.Integer(1)


def problem(text: str) -> Problem:
    loaded = load(text)
    assert loaded.problem is not None, loaded.diagnostics
    return loaded.problem


@pytest.mark.parametrize("set_text, shape, facts", [
    ("R", SCALAR, set()),
    ("R_+", SCALAR, {"nonneg"}),
    ("R_++", SCALAR, {"nonneg", "pos"}),
    ("R^n", Shape(n, ONE), set()),
    ("R^n_+", Shape(n, ONE), {"nonneg"}),
    ("R^n_++", Shape(n, ONE), {"nonneg", "pos"}),
    ("R^(m,n)", Shape(m, n), set()),
    ("R^(m x n)", Shape(m, n), set()),
    ("R^(m × n)", Shape(m, n), set()),
    ("R^(m,n)_+", Shape(m, n), {"nonneg"}),
    ("S^n", Shape(n, n), {"symmetric"}),
    ("S^n_+", Shape(n, n), {"symmetric", "psd"}),
    ("S^n_++", Shape(n, n), {"symmetric", "psd", "pd"}),
    ("R^3", Shape(sympy.Integer(3), ONE), set()),
    ("R^(2,3)", Shape(sympy.Integer(2), sympy.Integer(3)), set()),
    ("ℝ^n", Shape(n, ONE), set()),
])
def test_data_sets_give_shape_and_facts(set_text: str, shape: Shape, facts: set[str]) -> None:
    p = problem(f"data D in {set_text}\nminimize x over x in R")
    symbol = p.data[0].symbol
    assert symbol.role == "data"
    assert symbol.shape == shape
    assert symbol.facts == frozenset(facts)
    assert p.data[0].set_text == set_text


@pytest.mark.parametrize("set_text, kind, facts", [
    ("R^n", "free", set()),
    ("R^n_+", "nonneg", {"nonneg"}),
    ("R^n_++", "pos", {"nonneg", "pos"}),
    ("S^n", "symmetric", {"symmetric"}),
    ("S^n_+", "psd", {"symmetric", "psd"}),
    ("S^n_++", "pd", {"symmetric", "psd", "pd"}),
    ("Z^n", "integer", {"integer"}),
    ("{0,1}^n", "binary", {"binary", "integer", "nonneg"}),
])
def test_variable_sets_give_domains(set_text: str, kind: str, facts: set[str]) -> None:
    p = problem(f"minimize sum(sum(x)) over x in {set_text}")
    v = p.variables[0]
    assert v.symbol.role == "variable"
    assert v.domain.kind == kind
    assert v.symbol.facts == frozenset(facts)


def test_scalar_integer_and_binary_variables() -> None:
    p = problem("minimize z + b over z in Z, b in {0,1}")
    assert [v.symbol.shape for v in p.variables] == [SCALAR, SCALAR]
    assert [v.domain.kind for v in p.variables] == ["integer", "binary"]


def test_box_domains_with_number_and_data_bounds() -> None:
    p = problem("data C in R_++\nminimize sum(x) + y + z over x in [0, 1]^n, y in [-1, C], "
                "z in [-C, 2.5]")
    x, y, z = p.variables
    assert x.domain.kind == "box" and x.symbol.shape == Shape(n, ONE)
    assert (x.domain.lo, x.domain.hi) == (Number(sympy.Integer(0)), Number(sympy.Integer(1)))
    assert x.symbol.facts == frozenset({"nonneg"})
    assert y.domain.lo == Number(sympy.Integer(-1)) and y.domain.hi == p.data[0].symbol
    assert z.domain.lo == Scale(Number(sympy.Integer(-1)), p.data[0].symbol)
    assert z.domain.hi == Number(sympy.Rational(5, 2))


def test_dimension_symbols_are_positive_integers_in_order_of_appearance() -> None:
    p = problem("data A in R^(m,n)\ndata b in R^m\nminimize sum(x) over x in R^k")
    assert [d.name for d in p.dims] == ["m", "n", "k"]
    assert all(d.is_integer and d.is_positive for d in p.dims)

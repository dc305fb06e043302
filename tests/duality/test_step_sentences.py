"""Step sentences: the problem's own symbols, fresh names, the term each block adds.

References: the conjugate of exp is s log s - s (Boyd and Vandenberghe, Convex
Optimization, 2004, example 3.21, from memory); the numeric reference (cvxpy, via
``verify``) for the dual of a problem whose variable is named u.
"""

from __future__ import annotations

from dualize.duality import derive
from dualize.model.loading import load
from dualize.numeric.verify import verify
from dualize.render.text import TextFormatter


def derived(text: str):  # type: ignore[no-untyped-def]
    loaded = load(text)
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return derive(loaded.problem)


NAMED_U = """title "A variable named u inside an elementwise function of an affine argument"
data A in R^(m,n)
data b in R^m
minimize sum(exp(A*u - b)) + sum(u .* u)
over u in R^n
"""


def test_a_variable_named_u_is_not_captured_by_the_split() -> None:
    derivation = derived(NAMED_U)
    names = [v.name for v in derivation.multipliers]
    assert "u" not in names
    report = verify(derivation, seeds=(0, 1))
    assert report.verdict == "zero-gap", report


def test_no_constraints_no_sentence_about_adding_them() -> None:
    lagrangian = derived(NAMED_U).steps[0]
    assert lagrangian.rule == "lagrangian"
    assert "adds each constraint" not in lagrangian.text
    assert "no constraints" in lagrangian.text


def test_the_conjugate_step_names_the_term_it_contributes() -> None:
    steps = [s for s in derived(NAMED_U).steps if s.rule == "conjugate"]
    assert steps
    formulas = dict(steps[0].formulas)
    assert {"#term", "#phi", "#conj", "#value"} <= set(formulas)
    sentence = TextFormatter().prose(steps[0].text, steps[0].formulas)
    assert "contributes" in sentence and "log" in sentence
    assert "$" not in sentence and "sum_i" not in sentence and "*log" not in sentence


def test_a_smooth_block_is_stationary_where_its_gradient_vanishes() -> None:
    derivation = derived(NAMED_U)
    notes = [c.note for c in derivation.kkt if c.group == "stationarity" and c.equation is None]
    assert notes and all("gradient" in n and "subdifferential" not in n for n in notes)


def test_a_nonsmooth_block_keeps_the_subdifferential() -> None:
    text = ('title "l1"\ndata A in R^(m,n)\ndata b in R^m\nminimize ||x||_1\nover x in R^n\n'
            "subject to\n  fit: A*x == b\n")
    derivation = derived(text)
    notes = [c.note for c in derivation.kkt if c.group == "stationarity" and c.equation is None]
    assert notes and all("subdifferential" in n for n in notes)

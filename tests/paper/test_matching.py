"""Which problem name a paper symbol stands for (map, name, shape), and where findings of
the translated claim point in the draft."""

from __future__ import annotations

from tests.paper.helpers import agreement, fragment

# Boyd and Vandenberghe, Convex Optimization, 2004, section 5.1.6 (from memory): the
# entropy dual, with its free multiplier nu of 1'x = 1 kept:
# g(lambda, nu) = -b'lambda - nu - exp(-nu - 1) sum_i exp(-a_i'lambda).
ENTROPY_TWO = (r"\max_{\lambda \succeq 0,\, \nu} -b^\top\lambda - \nu - e^{-\nu - 1}"
               r" \sum_{i=1}^n \exp(-a_i^\top \lambda)")


def test_two_variables_matched_by_shape() -> None:
    t = fragment(ENTROPY_TWO, "route_entropy")
    assert t.ok, t.diagnostics
    assert [(m.paper, m.ours, m.how) for m in t.matches] == [
        ("lambda", "capacity", "shape"), ("nu", "total", "shape")]
    assert "exp(-total - 1)" in (t.text or "")


def test_a_map_overrides_matching_and_a_bad_map_is_refused() -> None:
    t = fragment(ENTROPY_TWO, "route_entropy", "map lambda=capacity, nu=total")
    assert [m.how for m in t.matches] == ["map", "map"]
    wrong = fragment(ENTROPY_TWO, "route_entropy", "map lambda=price")
    (d,) = wrong.diagnostics
    assert d.rule == "paper-name" and "price" in d.message and d.span is not None
    assert (d.span.line, d.span.column) == (3, 7)


def test_a_map_may_name_data() -> None:
    # Boyd and Vandenberghe, 2004, section 5.2.1 (from memory), with the cost vector
    # called q in the paper and c in the problem file.
    body = r"\max_{\lambda \succeq 0} -b^\top\lambda \quad \text{s.t.} \quad A^\top\lambda + q = 0"
    t = fragment(body, "joinery_lp", "map q=c")
    objective, constraints, _ = agreement(t, "joinery_lp")
    assert objective and all(constraints)


def test_ambiguous_shapes_are_refused_not_guessed() -> None:
    # Both multipliers of the soft-margin primal are vectors of length m: a paper name
    # that is neither may stand for either (common practice: ask, do not guess).
    t = fragment(r"\max_{\mu} \sum_{i=1}^m \mu_i", "parts_soft_margin")
    (d,) = t.diagnostics
    assert d.rule == "paper-name" and "several" in d.message


def test_load_errors_point_into_the_draft() -> None:
    # A 1-by-1 objective is required; b lambda' is a matrix (common practice: shapes
    # must conform), reported at the objective's place in the draft.
    t = fragment(r"\max_{\lambda \succeq 0} -b \lambda^\top", "joinery_lp")
    (d,) = t.diagnostics
    assert d.rule == "paper-claim" and d.path == "fragment.tex"
    assert d.span is not None and d.span.line == 3 and d.span.column >= 25
    assert t.tex_span(1, 1) is None

"""The verdicts of one report never contradict each other.

"Strong duality holds" rests on convexity (Slater's condition, S. Boyd and
L. Vandenberghe, Convex Optimization, 2004, section 5.2.3, from memory), so it
must never stand beside "convexity could not be decided" or "not convex"; a
derived dual that is printed in closed form for a convex problem must come with
a convexity verdict that says so.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from dualize.analysis import analyze
from dualize.model import load, load_file
from dualize.render.document import convexity_sentence, strong_duality_sentence

ROOT = Path(__file__).resolve().parents[2]
FILES = sorted((ROOT / "examples").glob("*.prob")) + sorted(
    (ROOT / "tests" / "problems").glob("*.prob"))


def _consistent(problem) -> tuple[str, str]:  # type: ignore[no-untyped-def]
    analysis = analyze(problem)
    convexity, duality = convexity_sentence(analysis), strong_duality_sentence(analysis)
    if duality.startswith("Strong duality holds"):
        assert not convexity.startswith("Convexity could not be decided"), (convexity, duality)
    if analysis.convex is None:
        assert analysis.strong_duality_status != "guaranteed", duality
    return convexity, duality


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.stem)
def test_bundled_and_fixture_reports_are_consistent(path: Path) -> None:
    loaded = load_file(path)
    assert loaded.problem is not None
    _consistent(loaded.problem)


@pytest.mark.parametrize("text", [
    # Convex by the composition rules (Boyd and Vandenberghe, 2004, sections 3.1.5 and
    # 3.2, from memory): softplus, relative entropy to positive weights and jointly,
    # the scalar x log x, and a positively weighted diagonal quadratic form.
    "data X in R^(m,n)\ndata y in R^m\nminimize sum(log(1 + exp(-y .* (X*w))))\nover w in R^n",
    "data q in R^n_++\nminimize sum(p .* log(p ./ q))\nover p in R^n_+\nsubject to\n"
    "  t: sum(p) == 1",
    "minimize sum(u .* log(u ./ v))\nover u in R^n_++, v in R^n_++\nsubject to\n"
    "  a: sum(u) == 1\n  b: sum(v) == 1",
    "minimize x * log(x)\nover x in R_++\nsubject to\n  c: x <= 2",
    "data d in R^n_++\nminimize x' * diag(d) * x\nover x in R^n\nsubject to\n  s: sum(x) == 1",
])
def test_convex_forms_are_recognised(text: str) -> None:
    loaded = load(text)
    assert loaded.problem is not None
    convexity, duality = _consistent(loaded.problem)
    assert convexity.startswith("The problem is convex"), convexity
    assert duality.startswith("Strong duality holds"), duality


def test_undecided_unconstrained_problem_is_not_called_strongly_dual() -> None:
    # No composition rule decides exp(x) .* sqrt(x) (a product of two varying factors): a
    # problem without constraints whose curvature is unknown gets no strong-duality claim
    # (common practice).
    loaded = load("minimize sum(exp(x) .* sqrt(x))\nover x in R^n_++")
    assert loaded.problem is not None
    analysis = analyze(loaded.problem)
    assert analysis.convex is None
    assert analysis.strong_duality_status != "guaranteed"


def test_relative_entropy_needs_known_signs() -> None:
    # u log(u/q) is concave in u where u and q are negative (second derivative 1/u), so
    # with q of unknown sign no convexity is claimed (Boyd and Vandenberghe, 2004,
    # section 3.1.5, from memory).
    loaded = load("data q in R^n\nminimize sum(relent(p, q))\nover p in R^n_+\n")
    assert loaded.problem is not None
    assert analyze(loaded.problem).convex is None

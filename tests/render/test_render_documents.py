"""Whole documents in every format, from hand-built textbook derivations.

The derivations are the soft-margin dual of C. Cortes and V. Vapnik,
Support-vector networks, 1995, and the inequality-form LP dual of S. Boyd and
L. Vandenberghe, Convex Optimization, 2004, section 5.2.1 (both from memory);
see render_builders.py.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from render_builders import (
    FakeAnalysis,
    long_lagrangian_derivation,
    lp_derivation,
    svm_analysis,
    svm_derivation,
)

from dualize.render.json_out import render_json
from dualize.render.latex import render_latex, repr_latex
from dualize.render.markdown import render_markdown, repr_markdown
from dualize.render.text import render_text

SCHEMA = Path(__file__).resolve().parents[2] / "docs" / "derivation.schema.json"

CASES = {
    "svm": (svm_derivation, svm_analysis),
    "lp-inner": (lambda: lp_derivation(inner=True, domain="nonneg"), FakeAnalysis),
    "lp-unbounded": (lambda: lp_derivation(unbounded=True), lambda: None),
    "lp-domain": (lambda: lp_derivation(domain="nonneg"), lambda: None),
}


@pytest.fixture(params=sorted(CASES))
def case(request: pytest.FixtureRequest) -> tuple:
    make_derivation, make_analysis = CASES[request.param]
    return make_derivation(), make_analysis()


def test_json_validates_against_the_documented_schema(case: tuple) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    document = json.loads(render_json(*case))
    jsonschema.Draft202012Validator(schema).validate(document)


def test_json_contents_for_the_soft_margin_dual() -> None:
    document = json.loads(render_json(svm_derivation(), svm_analysis()))
    assert list(document)[:3] == ["version", "file", "primal"]
    assert document["version"] == 1
    assert document["primal"]["data"][0]["shape"] == "m x n"
    assert [v["shape"] for v in document["primal"]["variables"]] == ["n", "1", "m"]
    assert document["dual"]["closed_form"] is True
    assert document["dual"]["variables"] == [
        {"name": "alpha", "shape": "m", "set": "nonneg", "origin": "alpha"}]
    assert document["dual"]["constraints"][0]["latex"] == r"y^\top \alpha = 0"
    assert document["strong_duality"]["witness"] == {"b": 0, "s": [2, 2, 2.5], "w": [0, 0]}
    assert document["diagnostics"][0]["line"] == 10
    assert document["recovery"][1]["formula"] is None


def test_json_without_analysis_claims_no_verdict() -> None:
    document = json.loads(render_json(lp_derivation(inner=True), None))
    assert document["convexity"]["convex"] is None
    assert document["strong_duality"] == {"status": "unknown", "reason": "no analysis was run",
                                          "witness": None}
    assert document["dual"]["closed_form"] is False
    assert document["dual"]["inner"][0]["name"] == "x"


def test_text_puts_verdicts_first_and_colours_only_when_asked() -> None:
    plain = render_text(svm_derivation(), svm_analysis())
    assert plain.index("Verdicts") < plain.index("Diagnostics") < plain.index("Problem")
    assert "\x1b[" not in plain
    assert "slater-unknown" in plain
    coloured = render_text(svm_derivation(), svm_analysis(), color=True)
    assert "\x1b[32;1mStrong duality holds" in coloured
    assert re.sub(r"\x1b\[[0-9;]*m", "", coloured) == plain


def test_text_shows_the_dual_in_unicode() -> None:
    out = render_text(svm_derivation(), svm_analysis())
    assert "maximize    𝟏ᵀ α - ½ αᵀ diag(y) X Xᵀ diag(y) α" in out
    assert "subject to  yᵀ α = 0" in out
    assert "y ⊙ (X w + b 𝟏) ≥ 𝟏 - s   (α)" in out


def test_unbounded_dual_is_said_plainly() -> None:
    derivation = lp_derivation(unbounded=True)
    assert "-∞ for every choice of multipliers" in render_text(derivation)
    assert r"$-\infty$ for every choice of multipliers" in render_latex(derivation)
    assert "maximize" not in render_latex(derivation).split("Dual problem")[1]


def test_inner_minimization_is_shown_with_its_domain() -> None:
    latex = render_latex(lp_derivation(inner=True, domain="nonneg"))
    assert r"\inf_{x \in \mathbb{R}^{n}_{+}} \left(" in latex


def test_markdown_uses_one_dollar_block_per_display(case: tuple) -> None:
    out = render_markdown(*case)
    fences = [line for line in out.splitlines() if line.strip() == "$$"]
    assert len(fences) % 2 == 0 and fences
    assert "align*" not in out
    assert out.count("\\begin{aligned}") == len(fences) // 2
    assert re.search(r"^## Dual problem$", out, re.MULTILINE)


def test_latex_problem_is_an_aligned_block_with_sense_and_variables() -> None:
    out = render_latex(svm_derivation(), svm_analysis())
    assert r"\underset{w,\, b,\, s}{\text{minimize}} \quad & " in out
    assert r"\text{subject to} \quad & y \odot (X w + b \mathbf{1}) \geq \mathbf{1} - s" in out
    assert "\\begin{align*}\nL(w, b, s, \\alpha, \\beta) &= " in out
    assert r"\documentclass" not in out


def test_notebook_representations() -> None:
    latex = repr_latex(svm_derivation())
    assert latex.startswith("$$\n\\begin{aligned}") and latex.count("$$") == 4
    markdown = repr_markdown(svm_derivation())
    assert markdown.startswith("# Soft-margin separating hyperplane")
    assert "Verdicts" not in markdown


def test_markdown_guards_math_lines_from_block_syntax() -> None:
    # CommonMark 0.30, sections 5.2 and 4.2 (from memory): a line opening with "- " or
    # "1. " starts a list item, one opening with "#" a heading.
    from dualize.render.markdown import display

    shown = display("\\begin{aligned}\n-x &= 0 \\\\\n# &= 1\n\\end{aligned}")
    assert shown.splitlines()[2:4] == ["{}-x &= 0 \\\\", "{}# &= 1"]


def test_text_prose_is_wrapped_to_the_terminal_width() -> None:
    from dualize.render.text import WIDTH

    long_reason = " ".join(["every constraint is affine"] * 12)
    analysis = FakeAnalysis(True, (long_reason,), "guaranteed", long_reason)
    out = render_text(svm_derivation(), analysis)
    verdicts = out.split("Problem")[0].splitlines()
    assert len(verdicts) > 6 and max(len(line) for line in verdicts) <= WIDTH


def test_long_sums_break_after_whole_terms() -> None:
    from dualize.render.latex import LINE_WIDTH, visible_width

    out = render_latex(long_lagrangian_derivation())
    block = out.split("\\begin{align*}\n")[1].split("\n\\end{align*}")[0]
    rows = block.split(" \\\\\n")
    assert len(rows) >= 2
    assert all(r.startswith("&\\quad + ") for r in rows[1:])
    assert all(visible_width(r) <= LINE_WIDTH + 12 for r in rows)
    assert "".join(rows).count("\\lambda_{") == 12


def test_long_sums_continue_on_aligned_lines_in_text() -> None:
    from dualize.render.text import WIDTH

    out = render_text(long_lagrangian_derivation())
    rows = out.split("Lagrangian\n")[1].split("\n\n")[0].splitlines()
    assert len(rows) >= 2 and all(len(r) <= WIDTH for r in rows)
    assert rows[1].lstrip().startswith("+ λ")
    assert rows[1].index("+") == rows[0].index("=") + 2  # under the first term
    assert "".join(rows).count("ᵀ x") == 12

"""The derivation as a paper would print it: typeset, not transcribed.

References outside the project: pdflatex's own log (common practice: a page
without "Overfull \\hbox" keeps every line inside the text block), and the
typesetting of duals in S. Boyd and L. Vandenberghe, Convex Optimization, 2004,
chapter 5 (from memory): "nu <= 1" rather than "-nu >= -1", scalar quotients as
fractions, long objectives broken after whole terms.
"""

from __future__ import annotations

import json
import re
import shutil
from functools import cache
from pathlib import Path

import pytest
import sympy
from latex_compile import compile_log as pdflatex_log

from dualize.model import expr as ir
from dualize.render.caution import CAUTION
from dualize.render.document import signs_as_written
from dualize.render.json_out import render_json
from dualize.render.latex import render_latex
from dualize.render.latex_breaks import DISPLAY_WIDTH, broken, top_level_terms, visible_width
from dualize.render.markdown import render_markdown
from dualize.render.text import render_text

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted(p.relative_to(ROOT).as_posix() for p in (ROOT / "examples").glob("*.prob"))
CORPUS = sorted(p.relative_to(ROOT).as_posix() for p in (ROOT / "tests/problems").glob("*.prob"))


@cache
def derived(path: str) -> tuple:
    """The problem's derivation and analysis, computed once per session."""
    from dualize.analysis import analyze
    from dualize.duality import derive
    from dualize.model import load_file

    loaded = load_file(ROOT / path)
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return derive(loaded.problem), analyze(loaded.problem)



@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex missing")
@pytest.mark.parametrize("path", EXAMPLES + CORPUS)
def test_every_page_keeps_its_lines_inside_the_margins(path: str, tmp_path: Path) -> None:
    log = pdflatex_log(render_latex(*derived(path), standalone=True), tmp_path)
    overfull = re.findall(r"Overfull \\hbox \(([\d.]+)pt too wide\)", log)
    assert not overfull, f"{path}: lines too wide by {overfull} pt"
    assert "\n! " not in log


@pytest.mark.parametrize("path", EXAMPLES + CORPUS)
def test_step_sentences_carry_no_ascii_mathematics(path: str) -> None:
    latex = render_latex(*derived(path))
    body = latex.split(r"\paragraph{Derivation.}")[-1].split(r"\paragraph{Dual problem.}")[0]
    body = re.sub(r"\\\[.*?\\\]|\\begin\{align\*\}.*?\\end\{align\*\}", "", body,
                  flags=re.S)
    sentences = [line for line in body.splitlines()
                 if line and not line.startswith(("\\", "&")) and " &" not in line]
    for sentence in sentences:
        words = re.sub(r"\$[^$]*\$", "", sentence)
        assert not re.search(r"\|\||\w'|\*|sum\(|\^|\w\\_\w|phi", words), sentence


def test_the_caution_is_a_comment_in_latex_and_a_footnote_when_standalone() -> None:
    derivation, analysis = derived("examples/joinery_lp.prob")
    fragment = render_latex(derivation, analysis)
    head = fragment.split(r"\paragraph")[0]
    assert "Caution" in head and all(line.startswith("%") for line in head.splitlines())
    body = fragment[len(head):]
    assert "licensed" not in body and r"\paragraph{Caution.}" not in body
    standalone = render_latex(derivation, analysis, standalone=True)
    assert standalone.startswith("% Caution")
    assert re.search(r"\\section\*\{.*\\footnote\{A dual bound", standalone)


def test_the_caution_stays_in_the_terminal_markdown_and_json() -> None:
    derivation, analysis = derived("examples/joinery_lp.prob")
    for shown in (render_text(derivation, analysis), render_markdown(derivation, analysis)):
        assert "licensed professional practice" in " ".join(shown.split())
    assert json.loads(render_json(derivation, analysis))["caution"] == CAUTION


def vector(name: str, role: str = "multiplier") -> ir.Symbol:
    return ir.Symbol(name, role, ir.Shape(sympy.Symbol("n"), 1))


def test_constraints_keep_the_signs_a_paper_writes() -> None:
    # Boyd and Vandenberghe, 2004, sec. 5.2.1 (from memory): "nu <= 1", "A'nu + c >= 0".
    nu, ones = vector("nu"), ir.Ones(sympy.Symbol("n"))
    minus = ir.Number(sympy.Integer(-1))
    lhs, rel, rhs = signs_as_written(ir.Scale(minus, nu), ">=", ir.Scale(minus, ones))
    assert (lhs, rel, rhs) == (nu, "<=", ones)
    lhs, rel, rhs = signs_as_written(ir.Scale(minus, nu), "=", ir.Zero(nu.shape))
    assert (lhs, rel) == (nu, "=")
    assert signs_as_written(nu, ">=", ir.Scale(minus, ones))[1] == ">="  # left side positive
    assert signs_as_written(ir.Scale(minus, nu), "<=", ones)[1] == "<="  # right side positive


def test_long_formulas_break_after_whole_top_level_terms() -> None:
    terms = [rf"\lambda_{{{i}}} \lVert A_{{{i}}} x - (b_{{{i}}} + c) \rVert_{{2}}"
             for i in range(1, 9)]
    formula = " + ".join(terms)
    assert top_level_terms(formula) == [terms[0]] + ["+ " + t for t in terms[1:]]
    rows = broken(formula).split(" \\\\\n&\\quad ")
    assert len(rows) > 1
    assert all(visible_width(row) <= DISPLAY_WIDTH for row in rows)
    assert top_level_terms(r"a - \left( b + c \right) - (d - e)") == [
        "a", r"- \left( b + c \right)", "- (d - e)"]

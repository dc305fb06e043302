"""Every rendered LaTeX document compiles with pdflatex, with no undefined commands.

pdflatex is the reference here (common practice: a document that pdflatex
compiles without "Undefined control sequence" uses only commands that exist).
Skipped where TeX is not installed; CI installs it.
"""

from __future__ import annotations

import shutil
from dataclasses import replace
from pathlib import Path

import pytest
from latex_compile import compile_log
from render_builders import (
    FakeAnalysis,
    long_lagrangian_derivation,
    lp_derivation,
    svm_analysis,
    svm_derivation,
)

from dualize.model import expr as ir
from dualize.render.latex import render_latex

pytestmark = pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex missing")

UNUSUAL = "Café ∂f/∂x ≈ ∑ł — “quoted” … xₖ ⟨a, b⟩ ⊆ ℕ, 50% of $5 & #3 ~ ^ \\ {}"


def unusual_characters() -> str:
    """Sentences and names with characters outside ASCII and outside our tables."""
    derivation = svm_derivation()
    problem = replace(derivation.problem, title=UNUSUAL,
                      objective=ir.Symbol("é", "variable", ir.SCALAR))
    return render_latex(replace(derivation, problem=problem, notes=(UNUSUAL,)),
                        FakeAnalysis(None, (UNUSUAL,)), standalone=True)


DOCUMENTS = {
    "long_lagrangian": lambda: render_latex(long_lagrangian_derivation(), standalone=True),
    "unusual_characters": unusual_characters,
    "svm": lambda: render_latex(svm_derivation(), svm_analysis(), standalone=True),
    "lp_inner": lambda: render_latex(lp_derivation(inner=True, domain="nonneg"),
                                     FakeAnalysis(None, ("x ⪰ 0 & 50% _odd_ #chars",)),
                                     standalone=True),
    "lp_unbounded": lambda: render_latex(lp_derivation(unbounded=True), standalone=True),
    "fragment": lambda: (
        "\\documentclass{article}\n\\usepackage{amsmath,amssymb}\n\\begin{document}\n"
        + render_latex(svm_derivation()) + "\\end{document}\n"),
}



@pytest.mark.parametrize("name", sorted(DOCUMENTS))
def test_document_compiles_without_undefined_commands(name: str, tmp_path: Path) -> None:
    log = compile_log(DOCUMENTS[name](), tmp_path)
    assert "Undefined control sequence" not in log
    assert "! " not in log  # no TeX error of any kind

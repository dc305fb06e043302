"""Every bundled example, from problem text through the engine, in every format.

The references are outside the project: the JSON Schema of docs/ checked by the
jsonschema library, pdflatex for the LaTeX (common practice: a document that
compiles without "Undefined control sequence" uses only defined commands), and
textbook forms of two duals cited below.
"""

from __future__ import annotations

import json
import shutil
import subprocess
from functools import cache
from pathlib import Path

import pytest

from dualize.render.json_out import render_json
from dualize.render.latex import render_latex
from dualize.render.markdown import render_markdown
from dualize.render.text import render_text

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = sorted(p.stem for p in (ROOT / "examples").glob("*.prob"))
SCHEMA = ROOT / "docs" / "derivation.schema.json"


@cache
def derived(name: str) -> tuple:
    """The example's derivation and analysis (computed once per test session)."""
    from dualize.analysis import analyze
    from dualize.duality import derive
    from dualize.model import load_file

    loaded = load_file(ROOT / "examples" / f"{name}.prob")
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return derive(loaded.problem), analyze(loaded.problem)


@pytest.mark.parametrize("name", EXAMPLES)
def test_json_of_every_example_validates(name: str) -> None:
    jsonschema = pytest.importorskip("jsonschema")
    schema = json.loads(SCHEMA.read_text(encoding="utf-8"))
    document = json.loads(render_json(*derived(name)))
    jsonschema.Draft202012Validator(schema).validate(document)
    assert document["file"].endswith(f"{name}.prob")


@pytest.mark.parametrize("name", EXAMPLES)
def test_text_and_markdown_of_every_example(name: str) -> None:
    derivation, analysis = derived(name)
    text = render_text(derivation, analysis)
    assert text.index("Verdicts") < text.index("Problem") < text.index("Dual problem")
    markdown = render_markdown(derivation, analysis)
    fences = [line for line in markdown.splitlines() if line == "$$"]
    assert fences and len(fences) % 2 == 0


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex missing")
@pytest.mark.parametrize("name", EXAMPLES)
def test_latex_of_every_example_compiles(name: str, tmp_path: Path) -> None:
    (tmp_path / "doc.tex").write_text(render_latex(*derived(name), standalone=True),
                                      encoding="utf-8")
    subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"],
                   cwd=tmp_path, capture_output=True, timeout=120, check=False)
    log = (tmp_path / "doc.log").read_text(encoding="latin-1")
    assert (tmp_path / "doc.pdf").exists(), log[-2000:]
    assert "Undefined control sequence" not in log
    assert "\n! " not in log


def test_soft_margin_dual_reads_as_published() -> None:
    # C. Cortes and V. Vapnik, Support-vector networks, 1995 (from memory): maximize
    # 1'a - 1/2 a' D a subject to y'a = 0 and 0 <= a <= C.
    derivation, analysis = derived("parts_soft_margin")
    document = json.loads(render_json(derivation, analysis))
    latex = document["dual"]["objective"]["latex"]
    assert latex.startswith(r"\mathbf{1}^\top \alpha - \tfrac{1}{2} \alpha^\top")
    constraints = {c["latex"] for c in document["dual"]["constraints"]}
    assert any(c.endswith(r"\leq C \mathbf{1}") for c in constraints)


def test_least_norm_dual_reads_as_published() -> None:
    # S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 5.1.3 (from
    # memory): g(nu) = -(1/4) nu' A A' nu - b'nu.
    derivation, _ = derived("survey_least_norm")
    text = render_text(derivation)
    assert "maximize    -¼ ν₁ᵀ A Aᵀ ν₁ - bᵀ ν₁" in text

"""Names of the language as readers of papers expect them.

The Greek spellings are those of docs/language.md (renderers show them as letters);
the LaTeX commands are LaTeX's own names for the Greek letters (L. Lamport,
LaTeX: A Document Preparation System, 2nd ed., 1994, table 3.3; from memory).
"""

from __future__ import annotations

import pytest

from dualize.render.names import latex_name, prose_pieces, split_name, text_name


@pytest.mark.parametrize(("name", "base", "subscript"), [
    ("lambda1", "lambda", "1"), ("nu12", "nu", "12"), ("x_max", "x", "max"),
    ("alpha", "alpha", None), ("A2", "A", "2"), ("w", "w", None), ("s_2", "s", "2"),
])
def test_split_name(name: str, base: str, subscript: str | None) -> None:
    parts = split_name(name)
    assert (parts.base, parts.subscript) == (base, subscript)


@pytest.mark.parametrize(("name", "latex", "text"), [
    ("theta", r"\theta", "θ"), ("Omega", r"\Omega", "Ω"), ("rho2", r"\rho_{2}", "ρ₂"),
    ("sigma_i", r"\sigma_{i}", "σᵢ"), ("omicron", "o", "ο"), ("mu_beta", r"\mu_{\beta}", "μ_β"),
])
def test_greek_names(name: str, latex: str, text: str) -> None:
    assert latex_name(name) == latex
    assert text_name(name) == text


def test_unicode_greek_letters_are_names_too() -> None:
    assert latex_name("λ") == r"\lambda"
    assert text_name("λ") == "λ"


def test_prose_pieces_pick_greek_names_and_relations_only() -> None:
    pieces = prose_pieces("the beta of alphabet: nu2 >= 0, x <= 1")
    assert [p for p in pieces if p[0] != "text"] == [
        ("name", "beta"), ("name", "nu2"), ("relation", ">="), ("relation", "<=")]
    assert "".join(p[1] for p in pieces) == "the beta of alphabet: nu2 >= 0, x <= 1"

"""A derivation in the output format asked for by name (text, latex, markdown, json).

``FORMATS`` is the one list of formats: ``dualize derive --format`` offers it,
and a new format is a printer module plus one entry here.  The module imports
nothing heavy, so the command line can read the list at start-up.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from dualize.analysis.report import Analysis
    from dualize.duality.result import Derivation

FORMATS = ("text", "latex", "markdown", "json")  # the order --help shows


def render(derivation: Derivation, fmt: str, analysis: Analysis | None = None,
           standalone: bool = False, color: bool = False) -> str:
    """The derivation in ``fmt``; ``standalone`` (LaTeX) makes a whole document,
    ``color`` (text) adds terminal colours."""
    if fmt == "latex":
        from dualize.render.latex import render_latex

        return render_latex(derivation, analysis, standalone=standalone)
    if fmt == "markdown":
        from dualize.render.markdown import render_markdown

        return render_markdown(derivation, analysis)
    if fmt == "json":
        from dualize.render.json_out import render_json

        return render_json(derivation, analysis)
    if fmt != "text":
        raise ValueError(f"unknown output format {fmt!r}; known: {', '.join(FORMATS)}")
    from dualize.render.text import render_text

    return render_text(derivation, analysis, color=color)

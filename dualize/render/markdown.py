"""A derivation as Markdown: headings per part, one ``$$`` block per display.

Inside ``$$`` only what MathJax and KaTeX both read is used (``aligned``, not
``align*``), so the page renders in notebooks and common Markdown viewers alike.
"""

from __future__ import annotations

import re
from typing import Any

from dualize.duality.result import Derivation
from dualize.render.document import (
    Analysis,
    DocumentView,
    Line,
    build_view,
    unbounded_sentence,
)
from dualize.render.latex import LatexFormatter, align_block, problem_block
from dualize.render.latex_breaks import CONTINUATION, broken
from dualize.render.templating import fill

__all__ = ["MarkdownFormatter", "render_markdown", "repr_markdown"]

_MARKDOWN_SPECIAL = frozenset("\\*_`$[]#")


class MarkdownFormatter(LatexFormatter):
    """LaTeX mathematics with Markdown prose."""

    def words(self, text: str) -> str:
        return "".join("\\" + c if c in _MARKDOWN_SPECIAL else c for c in text)

    def inline(self, math: str) -> str:
        """Inline mathematics; a formula too wide for a line gets a ``$$`` block of its own."""
        if not self.displays(math):
            return f"${math}$"
        rows = broken(math, joint=" \\\\\n&" + CONTINUATION)
        return "\n\n" + display("\\begin{aligned}\n&" + rows + "\n\\end{aligned}") + "\n\n"


def markdown_prose(text: str) -> str:
    """Sentences with Markdown's special characters escaped and mathematics inline."""
    return MarkdownFormatter().prose(text)


def display(body: str) -> str:
    """One display formula as its own ``$$`` block, safe from Markdown's block syntax."""
    return "$$\n" + "\n".join(_guard(line) for line in body.splitlines()) + "\n$$"


_BLOCK_MARKER = re.compile(r"^(?:[-+*#>=]|\d+[.)])")


def _guard(line: str) -> str:
    """A math line that Markdown would read as a list item or heading gets an empty group."""
    return "{}" + line if _BLOCK_MARKER.match(line) else line


def aligned(lines: tuple[Line, ...]) -> str:
    """Equations aligned at their relation signs, in an ``aligned`` environment."""
    return align_block(lines, "aligned")


def _verdict_rows(view: DocumentView) -> list[str]:
    if view.verdict is None:
        return []
    verdict = view.verdict
    rows = [f"**Convexity.** {verdict.convexity}",
            f"**Strong duality** ({verdict.status}). {verdict.strong_duality}"]
    if verdict.witness:
        points = ", ".join(f"${w.lhs} = {w.rhs}$" for w in verdict.witness)
        rows.append(f"Witness point: {points}.")
    return rows


def _diagnostic_rows(view: DocumentView) -> list[str]:
    rows = []
    for d in view.diagnostics:
        hint = f" (hint: {d.hint})" if d.hint else ""
        rows.append(f"- `{d.location}` **{d.severity}** `{d.rule}`: {d.message}{hint}")
    return rows


def _context(view: DocumentView) -> dict[str, Any]:
    return {
        "title": view.title,
        "file": view.file,
        "verdicts": _verdict_rows(view),
        "diagnostics": _diagnostic_rows(view),
        "primal": display(problem_block(view.primal)),
        "lagrangian": display(aligned((view.lagrangian,))) if view.lagrangian else "",
        "steps": [{"text": s.text, "math": display(aligned(s.lines)) if s.lines else ""}
                  for s in view.steps],
        "dual": "" if view.dual.unbounded else display(problem_block(view.dual)),
        "unbounded": unbounded_sentence(view.dual, r"$-\infty$", r"$+\infty$"),
        "kkt": [{"group": k.group[:1].upper() + k.group[1:], "statements": k.statements,
                 "math": display(aligned(k.equations)) if k.equations else ""}
                for k in view.kkt],
        "recovery": [{"math": display(aligned(((Line(r.variable, "=", r.formula),)
                                               if r.formula is not None else ()) + r.relations))
                      if r.formula is not None or r.relations else "", "variable": r.variable,
                      "note": r.note} for r in view.recovery],
        "notes": view.notes,
        "caution": view.caution,
    }


def render_markdown(derivation: Derivation, analysis: Analysis | None = None) -> str:
    """The whole derivation as Markdown with ``$$`` math blocks."""
    view = build_view(derivation, analysis, MarkdownFormatter())
    return fill("derivation.md.j2", **_context(view))


def repr_markdown(derivation: Derivation) -> str:
    """What a notebook shows for a derivation: the Markdown document without verdicts."""
    return render_markdown(derivation, None)

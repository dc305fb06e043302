"""A derivation as LaTeX: problems in ``aligned`` blocks, steps in ``align*``.

``render_latex`` gives a fragment to paste into a paper (or, with
``standalone=True``, a complete article that compiles with pdflatex);
``repr_latex`` gives the two problems alone, in display math, for notebooks.
"""

from __future__ import annotations

import re
import textwrap
from typing import Any

from dualize.duality.result import Derivation
from dualize.model import expr as ir
from dualize.render.caution import CAUTION
from dualize.render.document import (
    Analysis,
    DocumentView,
    Line,
    ProblemView,
    build_view,
    unbounded_sentence,
)
from dualize.render.formatter import TargetFormatter
from dualize.render.latex_breaks import (
    DISPLAY_WIDTH,
    INLINE_WIDTH,
    broken,
    displayed,
    visible_width,
)
from dualize.render.latex_chars import math_symbol, text_character
from dualize.render.latex_printer import RELATIONS, IRLatexPrinter, latex_expr
from dualize.render.templating import fill

__all__ = ["LatexFormatter", "latex_expr", "render_latex", "repr_latex"]

_SET_BASE: dict[str, tuple[str, str]] = {
    "free": (r"\mathbb{R}", ""), "nonneg": (r"\mathbb{R}", "_{+}"),
    "pos": (r"\mathbb{R}", "_{++}"), "integer": (r"\mathbb{Z}", ""),
    "binary": (r"\{0, 1\}", ""), "symmetric": (r"\mathbb{S}", ""),
    "psd": (r"\mathbb{S}", "_{+}"), "pd": (r"\mathbb{S}", "_{++}"),
}


def latex_prose(text: str, formulas: tuple[tuple[str, object], ...] = ()) -> str:
    """Plain sentences made safe for LaTeX; names, signs and marked formulas in math mode."""
    return LatexFormatter().prose(text, formulas)


def _escape_text(text: str) -> str:
    """Escape LaTeX's special characters; runs of Unicode math signs become one formula."""
    out: list[str] = []
    math: list[str] = []
    for char in text:
        symbol = math_symbol(char)
        if symbol is not None:
            math.append(symbol if symbol[0] in "^_" or not math else " " + symbol)
            continue
        if math:
            out.append("$" + "".join(math) + "$")
            math = []
        out.append(text_character(char))
    if math:
        out.append("$" + "".join(math) + "$")
    return "".join(out)


_GROWING = re.compile(r"\{?\\left\(((?:(?!\\left|\\right|\\frac).)*?) ?\\right\)\}?")


def plain_parentheses(latex: str) -> str:
    """``{\\left(x \\right)}`` as ``(x)``, innermost first, where no fraction needs tall ones."""
    while True:
        shown = _GROWING.sub(r"(\1)", latex)
        if shown == latex:
            return shown
        latex = shown


def latex_size(size: Any) -> str:
    """A dimension (``n``, ``3``, ``n + 1``) through sympy's printer."""
    return IRLatexPrinter().doprint(size)


def latex_set(kind: str, shape: ir.Shape, lo: ir.Expr | None = None,
              hi: ir.Expr | None = None) -> str:
    """The set a variable lives in, as papers write it: ``\\mathbb{R}^{n}_{+}``."""
    if kind in ("symmetric", "psd", "pd"):
        power = f"^{{{latex_size(shape.rows)}}}"
    elif shape.is_scalar:
        power = ""
    elif shape.cols == 1:
        power = f"^{{{latex_size(shape.rows)}}}"
    else:
        power = f"^{{{latex_size(shape.rows)} \\times {latex_size(shape.cols)}}}"
    if kind == "box":
        return rf"[{_bound(lo)}, {_bound(hi)}]{power}"
    base, suffix = _SET_BASE[kind]
    return base + power + suffix


def _bound(node: ir.Expr | None) -> str:
    return "?" if node is None else latex_expr(node)


class LatexFormatter(TargetFormatter):
    """The LaTeX spelling of every piece a document shows."""

    printer = IRLatexPrinter
    relations = RELATIONS
    set_of = staticmethod(latex_set)
    words = staticmethod(_escape_text)

    def displays(self, math: str) -> bool:
        return visible_width(math) > INLINE_WIDTH

    def inline(self, math: str) -> str:
        """Inline mathematics; a formula too wide for a line is displayed instead."""
        if self.displays(math):
            return "\n" + displayed(math) + "\n"
        return f"${math}$"

    def scalar(self, value: Any) -> str:
        """sympy's LaTeX of a scalar function, with ``\\log{\\left(t \\right)}`` written
        ``\\log(t)`` as papers write it where nothing tall stands inside."""
        return plain_parentheses(super().scalar(value))

    def gradient(self, variable: str, of: str) -> str:
        return rf"\nabla_{{{variable}}} {of}"


def problem_block(view: ProblemView) -> str:
    """``\\begin{aligned} \\underset{x}{\\text{minimize}} \\quad & f \\\\ ... \\end{aligned}``."""
    over = r",\, ".join(view.over)
    sense = rf"\text{{{view.sense}}}"
    lead = rf"\underset{{{over}}}{{{sense}}}" if over else sense
    objective = broken(_objective(view), first=visible_width(lead) + 4)
    rows = [rf"{lead} \quad & {objective}"]
    for index, line in enumerate(view.lines):
        lead = r"\text{subject to} \quad " if index == 0 else ""
        rows.append(f"{lead}& {_relation_row(line)}{_tag(line)}")
    return "\\begin{aligned}\n" + " \\\\\n".join(rows) + "\n\\end{aligned}"


def _objective(view: ProblemView) -> str:
    if not view.inner:
        return view.objective
    over = r",\, ".join(view.inner)
    return rf"\{view.inner_op}_{{{over}}} \left( {view.objective} \right)"


def _relation_row(line: Line) -> str:
    return f"{line.lhs} {line.relation} {line.rhs}"


def _tag(line: Line) -> str:
    if line.tag:
        return rf" && \quad ({line.tag})"
    return rf" && \quad \text{{({line.note})}}" if line.note else ""


def align_block(lines: tuple[Line, ...], environment: str = "align*") -> str:
    """Equations of one step, aligned at their relation signs (``align*`` in a paper,
    ``aligned`` inside a Markdown ``$$`` block)."""
    rows = [_align_row(line) for line in lines]
    return (f"\\begin{{{environment}}}\n" + " \\\\\n".join(rows)
            + f"\n\\end{{{environment}}}")


def _align_row(line: Line) -> str:
    if not line.relation:
        return rf"& \text{{{line.note}}}"
    return f"{line.lhs} &{line.relation} {broken_rhs(line)}{_note(line)}"


LINE_WIDTH = DISPLAY_WIDTH
"""Visible characters of mathematics that fit beside a left-hand side on a page."""


def broken_rhs(line: Line) -> str:
    """A long right-hand side broken after whole terms onto rows ``& \\quad + ...``."""
    return broken(line.rhs, first=visible_width(line.lhs))


def _note(line: Line) -> str:
    return rf" \quad \text{{({line.note})}}" if line.note else ""


def _inline(line: Line) -> str:
    return f"${line.lhs} {line.relation} {line.rhs}$"


def _context(view: DocumentView) -> dict[str, Any]:
    """The rendered pieces the template places."""
    return {
        "title": view.title,
        "primal": problem_block(view.primal),
        "lagrangian": align_block((view.lagrangian,)) if view.lagrangian else "",
        "steps": [{"text": s.text, "math": align_block(s.lines) if s.lines else ""}
                  for s in view.steps],
        "dual": "" if view.dual.unbounded else problem_block(view.dual),
        "unbounded": unbounded_sentence(view.dual, r"$-\infty$", r"$+\infty$"),
        "kkt": [{"group": k.group[:1].upper() + k.group[1:], "statements": k.statements,
                 "math": align_block(k.equations) if k.equations else ""} for k in view.kkt],
        "recovery": [{"math": align_block(((Line(r.variable, "=", r.formula),)
                                           if r.formula is not None else ()) + r.relations)
                      if r.formula is not None or r.relations else "", "variable": r.variable,
                      "note": r.note} for r in view.recovery],
        "verdict": view.verdict,
        "witness": ", ".join(_inline(w) for w in view.verdict.witness) if view.verdict else "",
        "notes": view.notes,
        "caution": view.caution,
    }


def render_latex(derivation: Derivation, analysis: Analysis | None = None,
                 standalone: bool = False) -> str:
    """The whole derivation in LaTeX; ``standalone`` wraps it in a compilable article."""
    view = build_view(derivation, analysis, LatexFormatter())
    comment = f"Lagrange dual of {derivation.problem.path}; needs amsmath and amssymb."
    return fill("derivation.tex.j2", standalone=standalone, comment=comment,
                caution_comment=comment_lines(CAUTION), **_context(view))


def comment_lines(text: str, width: int = 76) -> list[str]:
    """The caution as the lines of a LaTeX comment block: kept with the file, silent on the
    page, so a paper can include the fragment as it is."""
    return textwrap.wrap("Caution: " + text.replace("%", r"\%"), width)


def repr_latex(derivation: Derivation) -> str:
    """The primal and the dual problem in display math, as notebooks show LaTeX."""
    view = build_view(derivation, None, LatexFormatter())
    blocks = [problem_block(view.primal)]
    if not view.dual.unbounded:
        blocks.append(problem_block(view.dual))
    return "\n".join(f"$$\n{b}\n$$" for b in blocks) + "\n"


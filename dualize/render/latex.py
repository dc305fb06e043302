"""A derivation as LaTeX: problems in ``aligned`` blocks, steps in ``align*``.

``render_latex`` gives a fragment to paste into a paper (or, with
``standalone=True``, a complete article that compiles with pdflatex);
``repr_latex`` gives the two problems alone, in display math, for notebooks.
"""

from __future__ import annotations

import re
from typing import Any

from dualize.duality.result import Derivation, DualVariable
from dualize.model import expr as ir
from dualize.model.problem import Variable
from dualize.render.document import (
    Analysis,
    DocumentView,
    Line,
    ProblemView,
    build_view,
    unbounded_sentence,
)
from dualize.render.latex_chars import math_symbol, text_character
from dualize.render.latex_printer import IRLatexPrinter, latex_expr, latex_relation, latex_terms
from dualize.render.names import PROSE_RELATIONS, latex_name, prose_pieces
from dualize.render.templating import fill

__all__ = ["LatexFormatter", "latex_expr", "render_latex", "repr_latex"]

_SET_BASE: dict[str, tuple[str, str]] = {
    "free": (r"\mathbb{R}", ""), "nonneg": (r"\mathbb{R}", "_{+}"),
    "pos": (r"\mathbb{R}", "_{++}"), "integer": (r"\mathbb{Z}", ""),
    "binary": (r"\{0, 1\}", ""), "symmetric": (r"\mathbb{S}", ""),
    "psd": (r"\mathbb{S}", "_{+}"), "pd": (r"\mathbb{S}", "_{++}"),
}


def latex_prose(text: str) -> str:
    """Plain sentences made safe for LaTeX; Greek names and math signs go to math mode."""
    out = []
    for kind, piece in prose_pieces(text):
        if kind == "name":
            out.append(f"${latex_name(piece)}$")
        elif kind == "relation":
            out.append(f"${latex_relation(PROSE_RELATIONS[piece])}$")
        else:
            out.append(_escape_text(piece))
    return "".join(out)


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


class LatexFormatter:
    """The LaTeX spelling of every piece a document shows."""

    def __init__(self, **settings: Any) -> None:
        self.settings = settings

    def expr(self, node: ir.Expr) -> str:
        return latex_expr(node, **self.settings)

    def relation(self, relation: str) -> str:
        return latex_relation(relation)

    def name(self, name: str) -> str:
        return latex_name(name)

    def domain(self, variable: Variable) -> str:
        d = variable.domain
        return latex_set(d.kind, variable.symbol.shape, d.lo, d.hi)

    def dual_set(self, variable: DualVariable) -> str:
        return latex_set("symmetric" if variable.set == "symmetric" else "free",
                         variable.symbol.shape)

    def prose(self, text: str) -> str:
        return latex_prose(text)

    def terms(self, node: ir.Expr) -> tuple[str, ...]:
        return latex_terms(node, **self.settings)

    def gradient(self, variable: str, of: str) -> str:
        return rf"\nabla_{{{variable}}} {of}"


def problem_block(view: ProblemView) -> str:
    """``\\begin{aligned} \\underset{x}{\\text{minimize}} \\quad & f \\\\ ... \\end{aligned}``."""
    over = r",\, ".join(view.over)
    sense = rf"\text{{{view.sense}}}"
    lead = rf"\underset{{{over}}}{{{sense}}}" if over else sense
    rows = [rf"{lead} \quad & {_objective(view)}"]
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


def align_block(lines: tuple[Line, ...]) -> str:
    """Equations of one step, aligned at their relation signs."""
    rows = [_align_row(line) for line in lines]
    return "\\begin{align*}\n" + " \\\\\n".join(rows) + "\n\\end{align*}"


def _align_row(line: Line) -> str:
    if not line.relation:
        return rf"& \text{{{line.note}}}"
    return f"{line.lhs} &{line.relation} {broken_rhs(line)}{_note(line)}"


LINE_WIDTH = 64
"""Visible characters of mathematics that fit beside a left-hand side on a page."""


def broken_rhs(line: Line) -> str:
    """A long sum broken after whole terms onto continuation rows ``& \\quad + ...``."""
    if visible_width(line.rhs) + visible_width(line.lhs) <= LINE_WIDTH or len(
            line.rhs_terms) < 2:
        return line.rhs
    rows: list[list[str]] = [[]]
    width = visible_width(line.lhs)
    for term in line.rhs_terms:
        if rows[-1] and width + visible_width(term) > LINE_WIDTH:
            rows.append([])
            width = 4
        rows[-1].append(term)
        width += visible_width(term) + 1
    return " \\\\\n&\\quad ".join(" ".join(row) for row in rows)


def visible_width(latex: str) -> int:
    """A rough count of the characters a formula shows: commands count one, markup none."""
    shown = re.sub(r"\\(left|right|quad|,|;|!)", "", latex)
    shown = re.sub(r"\\(mathbf|mathrm|operatorname|text|tfrac|frac)", "", shown)
    shown = re.sub(r"\\[A-Za-z]+", "x", shown)
    return len(re.sub(r"[{}^_\s]", "", shown))


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
                **_context(view))


def repr_latex(derivation: Derivation) -> str:
    """The primal and the dual problem in display math, as notebooks show LaTeX."""
    view = build_view(derivation, None, LatexFormatter())
    blocks = [problem_block(view.primal)]
    if not view.dual.unbounded:
        blocks.append(problem_block(view.dual))
    return "\n".join(f"$$\n{b}\n$$" for b in blocks) + "\n"


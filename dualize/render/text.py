"""A derivation for the terminal: Unicode mathematics, verdicts first.

The reader at a terminal wants the verdicts (convexity, strong duality, lint
findings) before the algebra; colour is used only when the caller says so (the
command line decides from the terminal and ``NO_COLOR``).
"""

from __future__ import annotations

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
from dualize.render.names import PROSE_RELATIONS, prose_pieces, text_name, unicode_subscript
from dualize.render.templating import fill
from dualize.render.text_printer import text_expr, text_relation

__all__ = ["TextFormatter", "render_text", "text_expr"]

_STYLES: dict[str, str] = {
    "heading": "1", "error": "31;1", "warning": "33;1", "info": "36",
    "guaranteed": "32;1", "not-guaranteed": "31;1", "unknown": "33;1", "dim": "2",
}
_SET_BASE: dict[str, tuple[str, str]] = {
    "free": ("ℝ", ""), "nonneg": ("ℝ", "_+"), "pos": ("ℝ", "_++"), "integer": ("ℤ", ""),
    "binary": ("{0,1}", ""), "symmetric": ("𝕊", ""), "psd": ("𝕊", "_+"), "pd": ("𝕊", "_++"),
}
INDENT = "  "


def paint(text: str, style: str, color: bool) -> str:
    """``text`` in an ANSI style when colour is on; unchanged otherwise."""
    if not color or not text:
        return text
    return f"\x1b[{_STYLES[style]}m{text}\x1b[0m"


def text_prose(text: str) -> str:
    """Sentences with Greek names as letters and ``>=`` as ``≥``."""
    out = []
    for kind, piece in prose_pieces(text):
        if kind == "name":
            out.append(text_name(piece))
        elif kind == "relation":
            out.append(text_relation(PROSE_RELATIONS[piece]))
        else:
            out.append(piece)
    return "".join(out)


def text_set(kind: str, shape: ir.Shape, lo: ir.Expr | None = None,
             hi: ir.Expr | None = None) -> str:
    """``ℝ^n``, ``ℝ^(m×n)``, ``𝕊^n_+``, ``[0, C]^n``: sets the way users type them."""
    if kind in ("symmetric", "psd", "pd") or shape.cols == 1:
        power = "" if shape.is_scalar else f"^{_size(shape.rows)}"
    else:
        power = f"^({shape.rows}×{shape.cols})"
    if kind == "box":
        bounds = ", ".join("?" if b is None else text_expr(b) for b in (lo, hi))
        return f"[{bounds}]{power}"
    base, suffix = _SET_BASE[kind]
    return base + power + suffix


def _size(size: Any) -> str:
    shown = str(size)
    return shown if shown.isalnum() else f"({shown})"


class TextFormatter:
    """The terminal spelling of every piece a document shows."""

    def expr(self, node: ir.Expr) -> str:
        return text_expr(node)

    def relation(self, relation: str) -> str:
        return text_relation(relation)

    def name(self, name: str) -> str:
        return text_name(name)

    def domain(self, variable: Variable) -> str:
        d = variable.domain
        return text_set(d.kind, variable.symbol.shape, d.lo, d.hi)

    def dual_set(self, variable: DualVariable) -> str:
        kind = "symmetric" if variable.set == "symmetric" else "free"
        return text_set(kind, variable.symbol.shape)

    def prose(self, text: str) -> str:
        return text_prose(text)

    def gradient(self, variable: str, of: str) -> str:
        small = unicode_subscript(variable)
        return f"∇{small} {of}" if small else f"∇_{variable} {of}"


def problem_rows(view: ProblemView) -> list[str]:
    """The problem as a left-labelled table: sense, over, subject to, with tags aligned."""
    objective = view.objective
    if view.inner:
        objective = f"{view.inner_op} over {', '.join(view.inner)} of ({objective})"
    rows = [("minimize" if view.sense == "minimize" else "maximize", objective, ""),
            ("over", ", ".join(view.over), "")]
    for index, line in enumerate(view.lines):
        tag = f"({line.tag})" if line.tag else (f"({line.note})" if line.note else "")
        rows.append(("subject to" if index == 0 else "", relation_text(line), tag))
    width = max(len(r[1]) for r in rows[2:]) if len(rows) > 2 else 0
    return [f"{label:<12}{body.ljust(width) if tag else body}{'   ' + tag if tag else ''}"
            for label, body, tag in rows]


def relation_text(line: Line) -> str:
    return f"{line.lhs} {line.relation} {line.rhs}"


def equation_rows(lines: tuple[Line, ...]) -> list[str]:
    """Equations with their relation signs in one column."""
    width = max((len(line.lhs) for line in lines), default=0)
    return [f"{line.lhs.rjust(width)} {line.relation} {line.rhs}"
            + (f"   ({line.note})" if line.note else "") if line.relation else line.note
            for line in lines]


def _verdict_rows(view: DocumentView, color: bool) -> list[str]:
    if view.verdict is None:
        return []
    verdict = view.verdict
    rows = [f"convexity       {verdict.convexity}",
            f"strong duality  {paint(verdict.strong_duality, verdict.status, color)}"]
    if verdict.witness:
        points = ", ".join(f"{w.lhs} = {w.rhs}" for w in verdict.witness)
        rows.append(f"                witness: {points}")
    return rows


def _diagnostic_rows(view: DocumentView, color: bool) -> list[str]:
    rows = []
    for d in view.diagnostics:
        severity = paint(d.severity, d.severity, color)
        rows.append(f"{d.location}: {severity} [{d.rule}] {d.message}")
        if d.hint:
            rows.append(f"{INDENT}hint: {d.hint}")
    return rows


def _context(view: DocumentView, color: bool) -> dict[str, Any]:
    return {
        "title": paint(view.title, "heading", color),
        "file": view.file,
        "heading": lambda text: paint(text, "heading", color),
        "verdicts": _verdict_rows(view, color),
        "diagnostics": _diagnostic_rows(view, color),
        "primal": problem_rows(view.primal),
        "lagrangian": equation_rows((view.lagrangian,)) if view.lagrangian else [],
        "steps": [{"text": s.text, "rows": equation_rows(s.lines)} for s in view.steps],
        "dual": [] if view.dual.unbounded else problem_rows(view.dual),
        "unbounded": unbounded_sentence(view.dual, "-∞", "+∞"),
        "kkt": [{"group": k.group, "rows": equation_rows(k.lines)} for k in view.kkt],
        "recovery": [_recovery_row(r.variable, r.formula, r.note) for r in view.recovery],
        "notes": view.notes,
    }


def _recovery_row(variable: str, formula: str | None, note: str) -> str:
    if formula is None:
        return f"{variable}: {note}" if note else f"{variable}: not determined"
    return f"{variable} = {formula}" + (f"   ({note})" if note else "")


def render_text(derivation: Derivation, analysis: Analysis | None = None,
                color: bool = False) -> str:
    """The whole derivation as Unicode text; ANSI colour only when ``color`` is True."""
    view = build_view(derivation, analysis, TextFormatter())
    return fill("derivation.txt.j2", indent=INDENT, **_context(view, color))


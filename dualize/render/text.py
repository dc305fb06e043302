"""A derivation for the terminal: Unicode mathematics, verdicts first.

The reader at a terminal wants the verdicts (convexity, strong duality, lint
findings) before the algebra; colour is used only when the caller says so (the
command line decides from the terminal and ``NO_COLOR``).
"""

from __future__ import annotations

from typing import Any

from dualize.duality.result import Derivation
from dualize.model import expr as ir
from dualize.render.document import (
    Analysis,
    DocumentView,
    Line,
    ProblemView,
    build_view,
    unbounded_sentence,
)
from dualize.render.formatter import TargetFormatter
from dualize.render.names import unicode_subscript
from dualize.render.templating import fill
from dualize.render.text_printer import (
    RELATIONS,
    IRTextPrinter,
    text_expr,
    text_relation,
    unicode_scalar,
)

__all__ = ["TextFormatter", "render_text", "text_expr", "text_relation"]

_STYLES: dict[str, str] = {
    "heading": "1", "error": "31;1", "warning": "33;1", "info": "36",
    "guaranteed": "32;1", "not-guaranteed": "31;1", "unknown": "33;1", "dim": "2",
}
_SET_BASE: dict[str, tuple[str, str]] = {
    "free": ("ℝ", ""), "nonneg": ("ℝ", "_+"), "pos": ("ℝ", "_++"), "integer": ("ℤ", ""),
    "binary": ("{0,1}", ""), "symmetric": ("𝕊", ""), "psd": ("𝕊", "_+"), "pd": ("𝕊", "_++"),
}
INDENT = "  "
WIDTH = 96


def paint(text: str, style: str, color: bool) -> str:
    """``text`` in an ANSI style when colour is on; unchanged otherwise."""
    if not color or not text:
        return text
    return f"\x1b[{_STYLES[style]}m{text}\x1b[0m"


def text_prose(text: str, formulas: tuple[tuple[str, object], ...] = ()) -> str:
    """Sentences with Greek names as letters, ``>=`` as ``≥`` and formulas in Unicode."""
    return TextFormatter().prose(text, formulas)


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


class TextFormatter(TargetFormatter):
    """The terminal spelling of every piece a document shows."""

    printer = IRTextPrinter
    relations = RELATIONS
    set_of = staticmethod(text_set)

    def words(self, text: str) -> str:
        return text

    def inline(self, math: str) -> str:
        return math

    def scalar(self, value: Any) -> str:
        return unicode_scalar(value)

    def gradient(self, variable: str, of: str) -> str:
        small = unicode_subscript(variable)
        return f"∇{small} {of}" if small else f"∇_{variable} {of}"


def problem_rows(view: ProblemView) -> list[str]:
    """The problem as a left-labelled table: sense, over, subject to, with tags aligned."""
    objective = view.objective
    if view.inner:
        objective = f"{view.inner_op} over {', '.join(view.inner)} of ({objective})"
    rows = [("minimize" if view.sense == "minimize" else "maximize", objective, "")]
    rows.append(("over", ", ".join(view.over), "") if view.over else ("", "", ""))
    for index, line in enumerate(view.lines):
        tag = f"({line.tag})" if line.tag else (f"({line.note})" if line.note else "")
        rows.append(("subject to" if index == 0 else "", relation_text(line), tag))
    width = max(len(r[1]) for r in rows[2:]) if len(rows) > 2 else 0
    return [f"{label:<12}{body.ljust(width) if tag else body}{'   ' + tag if tag else ''}"
            for label, body, tag in rows if label or body]


def relation_text(line: Line) -> str:
    return f"{line.lhs} {line.relation} {line.rhs}"


def equation_rows(lines: tuple[Line, ...], room: int = WIDTH - 6) -> list[str]:
    """Equations with their relation signs in one column; long sums continue below."""
    width = max((len(line.lhs) for line in lines), default=0)
    rows: list[str] = []
    for line in lines:
        if not line.relation:
            rows.append(line.note)
            continue
        head = f"{line.lhs.rjust(width)} {line.relation} "
        body = _broken(line, room - len(head))
        body[-1] += f"   ({line.note})" if line.note else ""
        rows += [head + body[0]] + [" " * len(head) + more for more in body[1:]]
    return rows


def _broken(line: Line, room: int) -> list[str]:
    """The right-hand side as lines, broken after whole terms when wider than ``room``."""
    if len(line.rhs) <= room or len(line.rhs_terms) < 2:
        return [line.rhs]
    rows: list[str] = [""]
    for term in line.rhs_terms:
        if rows[-1] and len(rows[-1]) + 1 + len(term) > room:
            rows.append("")
        rows[-1] = f"{rows[-1]} {term}" if rows[-1] else term
    return rows


def wrap(text: str, first: str = "", rest: str | None = None, width: int = WIDTH) -> list[str]:
    """Prose broken into lines of at most ``width`` columns (formulas are never broken)."""
    import textwrap

    rest = " " * len(first) if rest is None else rest
    return textwrap.wrap(text, width=width, initial_indent=first, subsequent_indent=rest,
                         break_long_words=False, break_on_hyphens=False) or [first.rstrip()]


def _labelled(label: str, text: str, style: str | None, color: bool) -> list[str]:
    """``label`` in a 16-column margin, ``text`` wrapped beside it and painted line by line."""
    lines = wrap(text, width=WIDTH - 16 - len(INDENT))
    margin = [label.ljust(16)] + [" " * 16] * (len(lines) - 1)
    return [m + (paint(line, style, color) if style else line) for m, line in zip(
        margin, lines, strict=True)]


_CONVEXITY_STYLE = {True: "guaranteed", False: "not-guaranteed", None: "unknown"}


def _verdict_rows(view: DocumentView, convex: bool | None, color: bool) -> list[str]:
    if view.verdict is None:
        return []
    verdict = view.verdict
    rows = _labelled("convexity", verdict.convexity, _CONVEXITY_STYLE[convex], color)
    rows += _labelled("strong duality", verdict.strong_duality, verdict.status, color)
    if verdict.witness:
        points = ", ".join(f"{w.lhs} = {w.rhs}" for w in verdict.witness)
        rows += _labelled("", f"witness: {points}", None, color)
    return rows


def _diagnostic_rows(view: DocumentView, color: bool) -> list[str]:
    rows = []
    for d in view.diagnostics:
        severity = paint(d.severity, d.severity, color)
        rows.append(f"{d.location}: {severity} [{d.rule}]")
        rows += wrap(d.message, INDENT, width=WIDTH - len(INDENT))
        if d.hint:
            rows += wrap(f"hint: {d.hint}", INDENT, width=WIDTH - len(INDENT))
    return rows


def _context(view: DocumentView, convex: bool | None, color: bool) -> dict[str, Any]:
    return {
        "title": paint(view.title, "heading", color),
        "file": view.file,
        "heading": lambda text: paint(text, "heading", color),
        "verdicts": _verdict_rows(view, convex, color),
        "diagnostics": _diagnostic_rows(view, color),
        "primal": problem_rows(view.primal),
        "lagrangian": equation_rows((view.lagrangian,)) if view.lagrangian else [],
        "steps": [{"text": wrap(s.text, f"{i}. ", width=WIDTH - len(INDENT)),
                   "rows": equation_rows(s.lines)} for i, s in enumerate(view.steps, 1)],
        "dual": [] if view.dual.unbounded else problem_rows(view.dual),
        "unbounded": unbounded_sentence(view.dual, "-∞", "+∞"),
        "kkt": [{"group": k.group, "rows": equation_rows(k.lines)} for k in view.kkt],
        "recovery": [line for r in view.recovery
                     for line in _recovery_rows(r.variable, r.formula, r.note)
                     + [INDENT + row for row in equation_rows(r.relations)]],
        "notes": [line for note in view.notes for line in wrap(note, width=WIDTH - 2)],
        "caution": wrap(view.caution, width=WIDTH - 2),
    }


def _recovery_rows(variable: str, formula: str | None, note: str) -> list[str]:
    if formula is None:
        return wrap(note or "not determined", f"{variable}: ", width=WIDTH - len(INDENT))
    rows = [f"{variable} = {formula}"]
    return rows + (wrap(note, INDENT, width=WIDTH - len(INDENT)) if note else [])


def render_text(derivation: Derivation, analysis: Analysis | None = None,
                color: bool = False) -> str:
    """The whole derivation as Unicode text; ANSI colour only when ``color`` is True."""
    view = build_view(derivation, analysis, TextFormatter())
    convex = None if analysis is None else analysis.convex
    return fill("derivation.txt.j2", indent=INDENT, **_context(view, convex, color))


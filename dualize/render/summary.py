"""Long derivations shown at a length that grows linearly with the problem.

A problem with thousands of constraints has a Lagrangian with thousands of
terms, thousands of multipliers and as many KKT conditions.  Shown in full, a
2-D layout of such sums grows with the square of their length; a reader gains
nothing from the 8,000th line of the same form.  The document views (text,
LaTeX, Markdown) therefore show:

- a sum of more than :data:`MAX_TERMS` terms as its first terms, an ellipsis and
  its last term, with the count;
- a list of more than :data:`MAX_LINES` relations grouped by form (the relation
  with its numbers and subscripts masked): the first of each form, followed by
  one line that says how many more of that form there are, from which label to
  which ("892 more of this form: c1 to c999");
- a list of more than :data:`MAX_NAMES` names as its first
  :data:`SHOWN_NAMES` names, an ellipsis and the last name.

The JSON output is not summarized: it carries every term and every line.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from typing import Any

from dualize.model import expr as ir

MAX_TERMS = 12
SHOWN_TERMS = 3
MAX_LINES = 40
MAX_FORMS = 30
MAX_NAMES = 12
SHOWN_NAMES = 4
_NUMBERS = re.compile(r"[0-9\u2080-\u2089\u2070\u00b9\u00b2\u00b3\u2074-\u2079.]+")


def ellipsis(fmt: Any) -> str:
    """The target's ellipsis: ``\\cdots`` in LaTeX mathematics, ``⋯`` elsewhere."""
    own = getattr(fmt, "ellipsis", None)
    if isinstance(own, str):
        return own
    return r"\cdots" if fmt.relation("<=").startswith("\\") else "⋯"


def _long(node: ir.Expr) -> bool:
    return isinstance(node, ir.Add) and len(node.terms) > MAX_TERMS


def _head(node: ir.Add) -> ir.Expr:
    return ir.Add(tuple(node.terms[:SHOWN_TERMS]))


def short_expr(node: ir.Expr, fmt: Any) -> str:
    """``fmt.expr(node)``, with a long top-level sum cut to its first and last terms."""
    if not _long(node):
        return fmt.expr(node)
    assert isinstance(node, ir.Add)
    last = fmt.expr(node.terms[-1])
    joiner = " " if last.startswith("-") else " + "
    return f"{fmt.expr(_head(node))} + {ellipsis(fmt)}{joiner}{last}"


def short_terms(node: ir.Expr, fmt: Any) -> tuple[str, ...]:
    """``fmt.terms(node)`` (the pieces a display breaks lines at), cut the same way."""
    if not _long(node):
        return fmt.terms(node)
    assert isinstance(node, ir.Add)
    last = fmt.expr(node.terms[-1])
    tail = last if last.startswith("-") else f"+ {last}"
    return (*fmt.terms(_head(node)), f"+ {ellipsis(fmt)}", tail)


def term_count_note(node: ir.Expr) -> str:
    """``"8001 terms"`` for a cut sum, else ``""``."""
    return f"{len(node.terms)} terms" if _long(node) else ""  # type: ignore[attr-defined]


def short_names(names: Sequence[str], fmt: Any) -> list[str]:
    """The first names, an ellipsis and the last name when there are many."""
    if len(names) <= MAX_NAMES:
        return list(names)
    return [*names[:SHOWN_NAMES], ellipsis(fmt), names[-1]]


def form_key(*parts: str) -> tuple[str, ...]:
    """A relation's form: its pieces with numbers and subscripts masked."""
    return tuple(_NUMBERS.sub("#", p) for p in parts)


def grouped(lines: Sequence[Any], fmt: Any, make: Any) -> list[Any]:
    """``lines`` (document ``Line``s) summarized by form when there are many.

    ``make(note)`` builds the line that stands for the rest of a form.
    """
    if len(lines) <= MAX_LINES:
        return list(lines)
    forms: dict[tuple[str, ...], list[Any]] = {}
    for line in lines:
        forms.setdefault(form_key(line.lhs, line.relation, line.rhs), []).append(line)
    out: list[Any] = []
    for members in list(forms.values())[:MAX_FORMS]:
        out.append(members[0])
        if len(members) > 1:
            out.append(make(fmt.prose(_more(members))))
    rest = sum(len(m) for m in list(forms.values())[MAX_FORMS:])
    if rest:
        out.append(make(fmt.prose(f"and {rest} more of {len(forms) - MAX_FORMS} other "
                                  "forms (the JSON output lists every one)")))
    return out


def _more(members: list[Any]) -> str:
    tags = [m.tag for m in members[1:] if m.tag]
    where = f": {_plain(tags[0])} to {_plain(tags[-1])}" if tags else ""
    return f"{len(members) - 1} more of this form{where}"


def _plain(tag: str) -> str:
    """A rendered tag back in plain letters and digits for a sentence."""
    subscripts = str.maketrans("₀₁₂₃₄₅₆₇₈₉", "0123456789")
    return re.sub(r"[\\{}$]|_", "", tag.translate(subscripts)).replace("mathrm", "")


def short_reasons(reasons: Sequence[str]) -> list[str]:
    """Convexity reasons such as ``constraint c7: affine inequality``, grouped by what
    follows the label when there are many."""
    if len(reasons) <= MAX_LINES:
        return list(reasons)
    groups: dict[str, list[str]] = {}
    other: list[str] = []
    for reason in reasons:
        head, sep, tail = reason.partition(": ")
        if sep and head.startswith("constraint "):
            groups.setdefault(tail, []).append(head.removeprefix("constraint "))
        else:
            other.append(reason)
    out = list(other)
    for tail, labels in groups.items():
        if len(labels) == 1:
            out.append(f"constraint {labels[0]}: {tail}")
        else:
            shown = ", ".join(labels[:3]) + (f", ..., {labels[-1]}" if len(labels) > 3 else "")
            out.append(f"{len(labels)} constraints ({shown}): {tail}")
    return out

"""Line breaks for long formulas, where an author would put them.

A display that is wider than the page is broken after whole terms of its
top-level sum (never inside parentheses, braces or ``\\left ... \\right``), the
continuation rows indented by ``\\quad``, as textbooks set long duals.  Widths are
counted in visible characters of mathematics (``visible_width``); a display holds
``DISPLAY_WIDTH`` of them and an inline formula ``INLINE_WIDTH`` before it is set
as a display of its own.  With 10 pt type these fit the text block of a standard
article (about 345 pt); docs/output-formats.md states the same figures.
"""

from __future__ import annotations

import re

DISPLAY_WIDTH = 58
"""Visible characters of mathematics that fit on one displayed line."""

INLINE_WIDTH = 36
"""An inline formula wider than this is displayed instead, so that it cannot overrun."""

CONTINUATION = r"\quad "


def visible_width(latex: str) -> int:
    """A rough count of the characters a formula shows: commands count one, markup none,
    and a binary operator or relation two (TeX sets space on both sides of it)."""
    shown = re.sub(r"\\(left|right|quad|,|;|!)", "", latex)
    shown = re.sub(r"\\(mathbf|mathrm|operatorname|text|tfrac|frac)", "", shown)
    spaced = len(re.findall(r" [-+=] | \\(leq|geq|odot|oslash|succeq|preceq|in) ", shown))
    shown = re.sub(r"\\[A-Za-z]+", "x", shown)
    return len(re.sub(r"[{}^_\s]", "", shown)) + spaced


_OPEN, _CLOSE = "({[", ")}]"
_DELIMITER = re.compile(r"\\(left|right|lVert|rVert|lvert|rvert|langle|rangle)(?![A-Za-z])")


def top_level_terms(latex: str) -> list[str]:
    """The formula cut before each ``+`` or ``-`` of its outermost sum, signs kept."""
    terms: list[str] = []
    depth, start, index = 0, 0, 0
    while index < len(latex):
        command = _DELIMITER.match(latex, index)
        if command:
            depth += 1 if command.group(1) in ("left", "lVert", "lvert", "langle") else -1
            index = command.end()
            continue
        char = latex[index]
        if char == "\\":
            index += 2
            continue
        depth += (char in _OPEN) - (char in _CLOSE)
        if depth == 0 and char in "+-" and index > start and latex[index - 1] == " " and \
                latex[index + 1:index + 2] == " " and not _after_relation(latex[start:index]):
            terms.append(latex[start:index].strip())
            start = index
        index += 1
    terms.append(latex[start:].strip())
    return [t for t in terms if t]


def _after_relation(before: str) -> bool:
    """True when the sign follows a relation (``= -x``): a unary minus, not a break point."""
    stripped = before.rstrip()
    return stripped.endswith(("=", r"\leq", r"\geq", r"\in", "&", "(", ","))


def packed_rows(terms: list[str], width: int, first: int = 0) -> list[str]:
    """Terms packed greedily into rows of at most ``width`` visible characters; the
    first row already holds ``first`` characters (a left-hand side)."""
    rows: list[list[str]] = [[]]
    used = first
    for term in terms:
        if rows[-1] and used + visible_width(term) > width:
            rows.append([])
            used = 4
        rows[-1].append(term)
        used += visible_width(term) + 1
    return [" ".join(row) for row in rows]


def broken(latex: str, width: int = DISPLAY_WIDTH, first: int = 0,
           joint: str = " \\\\\n&" + CONTINUATION) -> str:
    """The formula with row breaks (``joint``) after whole top-level terms, when too wide."""
    if visible_width(latex) + first <= width:
        return latex
    return joint.join(packed_rows(top_level_terms(latex), width, first))


def displayed(latex: str) -> str:
    """A formula set on lines of its own, broken after whole terms when too wide."""
    if visible_width(latex) <= DISPLAY_WIDTH:
        return "\\[\n" + latex + "\n\\]"
    rows = broken(latex, joint=" \\\\\n&" + CONTINUATION)
    return "\\[\n\\begin{aligned}\n&" + rows + "\n\\end{aligned}\n\\]"

"""Quick fixes: the hints that name exactly one rewrite, as text edits.

A hint becomes a fix only when the rewrite is unambiguous: a did-you-mean
suggestion for a misspelt name or function, a function a reader may expect
that the language writes as mathematics (``abs(e)`` is ``|e|``, ``norm(e)`` is
``||e||``, ``transpose(e)`` is ``(e)'``), the elementwise division ``./`` for a
``/`` by a non-scalar, and the closing quote of a title.  Hints that offer a
choice (finish the expression or remove the operator; declare the data in S^n
or symmetrize) stay hints.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from dualize.diagnostics import Diagnostic

DID_YOU_MEAN = re.compile(r"did you mean `([^`]+)`\?")
WRITTEN_AS = {"abs": ("|", "|"), "norm": ("||", "||"), "transpose": ("(", ")'")}
PAIRS = {"(": ")", "[": "]", "{": "}"}


@dataclass(frozen=True)
class Fix:
    """Replace the characters ``start:end`` of the text with ``new_text``."""

    title: str
    start: int
    end: int
    new_text: str


def fix_for(d: Diagnostic, text: str) -> Fix | None:
    """The one rewrite a finding's hint names, or None."""
    if d.span is None or not d.hint:
        return None
    for rule in (_did_you_mean, _written_as, _elementwise_division, _close_title):
        found = rule(d, text)
        if found is not None:
            return found
    return None


def _did_you_mean(d: Diagnostic, text: str) -> Fix | None:
    match = DID_YOU_MEAN.fullmatch(d.hint or "")
    if match is None or d.rule not in ("undeclared-name", "unknown-function"):
        return None
    name = match.group(1)
    return Fix(f"Replace with `{name}`", d.span.start, d.span.end, name)  # type: ignore[union-attr]


def _written_as(d: Diagnostic, text: str) -> Fix | None:
    """``abs(e)`` -> ``|e|`` and the like, when the call has exactly one argument."""
    span = d.span
    name = text[span.start:span.end] if span else ""
    if d.rule != "unknown-function" or name not in WRITTEN_AS:
        return None
    opening = _skip_blanks(text, span.end)  # type: ignore[union-attr]
    if opening >= len(text) or text[opening] != "(":
        return None
    closing = matching(text, opening)
    inner = text[opening + 1:closing] if closing is not None else ""
    if closing is None or not inner.strip() or top_level(inner, ","):
        return None
    left, right = WRITTEN_AS[name]
    return Fix(f"Write {left}…{right} instead of {name}(…)", span.start,  # type: ignore[union-attr]
               closing + 1, f"{left}{inner.strip()}{right}")


def _elementwise_division(d: Diagnostic, text: str) -> Fix | None:
    """A ``/`` by a non-scalar: the one top-level ``/`` of the expression becomes ``./``."""
    if d.rule != "shape-mismatch" or "./" not in (d.hint or ""):
        return None
    start, end = d.span.start, d.span.end  # type: ignore[union-attr]
    places = [i for i in top_level(text[start:end], "/")
              if i == 0 or text[start + i - 1] != "."]
    if len(places) != 1:
        return None
    at = start + places[0]
    return Fix("Divide elementwise with ./", at, at + 1, "./")


def _close_title(d: Diagnostic, text: str) -> Fix | None:
    """An unterminated title: the quote goes at the end of its line, unless a `#` on
    the line leaves open whether it starts a comment or belongs to the title."""
    if d.rule != "unterminated-string":
        return None
    start = d.span.start  # type: ignore[union-attr]
    end = text.find("\n", start)
    end = len(text) if end < 0 else end
    line = text[start:end].rstrip("\r")
    if "#" in line:
        return None
    at = start + len(line.rstrip())
    return Fix('Close the title with "', at, at, '"')


def _skip_blanks(text: str, at: int) -> int:
    while at < len(text) and text[at] in " \t":
        at += 1
    return at


def matching(text: str, opening: int) -> int | None:
    """The index of the bracket that closes the one at ``opening`` (on the same
    statement), or None when it is not closed."""
    stack = [PAIRS[text[opening]]]
    for i in range(opening + 1, len(text)):
        ch = text[i]
        if ch in PAIRS:
            stack.append(PAIRS[ch])
        elif ch in ")]}":
            if ch != stack.pop():
                return None
            if not stack:
                return i
        elif ch == "#":
            return None
    return None


def top_level(text: str, char: str) -> list[int]:
    """Where ``char`` occurs in ``text`` outside brackets."""
    depth, found = 0, []
    for i, ch in enumerate(text):
        if ch in PAIRS:
            depth += 1
        elif ch in ")]}":
            depth -= 1
        elif ch == char and depth == 0:
            found.append(i)
    return found

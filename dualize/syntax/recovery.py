"""More than one syntax error per file: blank the failing statement and parse again.

After an error, the statement that holds it (its line, and the lines it continues
onto through a trailing operator, a comma or an open bracket) is replaced by
spaces, which keeps every later position, and the text is parsed again.  Only
errors on strictly later lines are kept, so that one mistake is not reported twice
in other words; an error that swallows the rest of the file stops the search.
"""

from __future__ import annotations

from collections.abc import Callable

from lark import Lark, UnexpectedInput

from dualize.diagnostics import Diagnostic
from dualize.syntax.explain import (
    CLOSING,
    OPERATOR_END,
    blank_comments,
    error_position,
    explain,
)

MAX_ERRORS = 10
FINAL = frozenset({"unexpected-end", "unclosed-bracket"})


def later_errors(first: Diagnostic, first_pos: int, text: str, path: str,
                 parser: Callable[[], Lark]) -> list[Diagnostic]:
    """The syntax errors after ``first``, each in a statement of its own."""
    found: list[Diagnostic] = []
    last, pos = first, first_pos
    while len(found) < MAX_ERRORS - 1 and last.rule not in FINAL and last.span is not None:
        text = blank_statement(text, min(last.span.start, pos), max(last.span.start, pos))
        try:
            parser().parse(text)
            return found
        except UnexpectedInput as err:
            following = explain(err, text, path)
            if following.span is None or following.span.line <= last.span.line:
                return found
            found.append(following)
            last, pos = following, error_position(err, text)
    return found


def blank_statement(text: str, start: int, stop: int) -> str:
    """``text`` with the statement around ``start..stop`` replaced by spaces."""
    begin = text.rfind("\n", 0, start) + 1
    while begin > 0:
        previous = text.rfind("\n", 0, begin - 1) + 1
        if not _continues(text[previous:begin - 1]):
            break
        begin = previous
    end = _line_end(text, stop)
    while end < len(text) and _continues(text[begin:end]):
        end = _line_end(text, end + 1)
    blanked = "".join(ch if ch == "\n" else " " for ch in text[begin:end])
    return text[:begin] + blanked + text[end:]


def _continues(region: str) -> bool:
    """Does the statement go on past this region (trailing operator, open bracket)?"""
    code = blank_comments(region)
    if OPERATOR_END.search(code.rstrip()):
        return True
    depth = 0
    for ch in code:
        depth += ch in CLOSING
        depth -= ch in ")]}"
    return depth > 0


def _line_end(text: str, pos: int) -> int:
    end = text.find("\n", pos)
    return len(text) if end < 0 else end

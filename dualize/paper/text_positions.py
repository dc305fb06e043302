"""Offsets in a .tex file -> 1-based lines and columns (end exclusive)."""

from __future__ import annotations

from bisect import bisect_right

from dualize.syntax.span import Span


class Positions:
    """Spans in ``text`` for offsets counted from ``base`` (the start of a display's body)."""

    def __init__(self, text: str, base: int = 0) -> None:
        self.text = text
        self.base = base
        self.line_starts = [0] + [i + 1 for i, ch in enumerate(text) if ch == "\n"]

    def point(self, offset: int) -> tuple[int, int]:
        """(line, column) of an absolute offset."""
        index = bisect_right(self.line_starts, offset) - 1
        return index + 1, offset - self.line_starts[index] + 1

    def span(self, start: int, end: int) -> Span:
        """The span of the body's ``[start, end)``, in the whole file."""
        a, b = self.base + start, self.base + max(end, start + 1)
        line, column = self.point(a)
        end_line, end_column = self.point(b)
        return Span(line, column, end_line, end_column, a, b)

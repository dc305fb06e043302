"""Source positions: kept on every syntax node, carried into the IR and the diagnostics."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Span:
    """A region of one source file: 1-based lines and columns, end exclusive."""

    line: int
    column: int
    end_line: int
    end_column: int
    start: int = 0  # character offsets into the text
    end: int = 0

    def merge(self, other: Span) -> Span:
        first, last = (self, other) if self.start <= other.start else (other, self)
        return Span(first.line, first.column, last.end_line, last.end_column,
                    first.start, last.end)

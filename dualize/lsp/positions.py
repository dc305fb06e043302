"""Positions between dualize's spans and the protocol's line/character pairs.

dualize counts 1-based lines and columns in characters (code points); the
protocol counts 0-based lines and columns in the code units of the encoding the
client and server agreed on (UTF-16 unless the client offers another).  Lines
are split on "\\n" only, as the parser counts them; a "\\r" before it stays part
of the line's text, which does not move any column before it.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property

from lsprotocol import types as lsp

from dualize.syntax.span import Span


def encoding_name(encoding: object) -> str:
    """``utf-8``, ``utf-16`` or ``utf-32`` from the protocol's enum or its text."""
    return str(getattr(encoding, "value", encoding) or "utf-16").lower()


def units(text: str, encoding: object) -> int:
    """How many code units of ``encoding`` the text takes."""
    name = encoding_name(encoding)
    if name == "utf-8":
        return len(text.encode("utf-8", errors="surrogatepass"))
    if name == "utf-32":
        return len(text)
    return sum(2 if ord(c) > 0xFFFF else 1 for c in text)


def chars_for_units(line: str, count: int, encoding: object) -> int:
    """How many characters of ``line`` make up ``count`` code units (clamped to the line)."""
    used = 0
    for index, char in enumerate(line):
        if used >= count:
            return index
        used += units(char, encoding)
    return len(line)


@dataclass(frozen=True)
class TextMap:
    """One text's lines, for converting positions both ways."""

    text: str
    encoding: object = lsp.PositionEncodingKind.Utf16

    @cached_property
    def lines(self) -> Sequence[str]:
        return self.text.split("\n")

    @cached_property
    def starts(self) -> Sequence[int]:
        out, at = [], 0
        for line in self.lines:
            out.append(at)
            at += len(line) + 1
        return out

    def position(self, line: int, column: int) -> lsp.Position:
        """A 1-based line and character column as a protocol position."""
        row = min(max(line - 1, 0), len(self.lines) - 1)
        text = self.lines[row]
        return lsp.Position(row, units(text[:max(column - 1, 0)], self.encoding))

    def span_range(self, span: Span | None) -> lsp.Range:
        """A span as a protocol range (the file's start when there is no span)."""
        if span is None:
            return lsp.Range(lsp.Position(0, 0), lsp.Position(0, 0))
        start = self.position(span.line, span.column)
        end = self.position(span.end_line, span.end_column)
        return lsp.Range(start, end if (end.line, end.character) >= (start.line,
                                                                      start.character) else start)

    def offset(self, position: lsp.Position) -> int:
        """The character offset into the text of a protocol position (clamped)."""
        if position.line >= len(self.lines):
            return len(self.text)
        row = max(position.line, 0)
        text = self.lines[row]
        return self.starts[row] + chars_for_units(text, max(position.character, 0),
                                                  self.encoding)

    def offset_range(self, start: int, end: int) -> lsp.Range:
        """Character offsets as a protocol range."""
        return lsp.Range(self._at(start), self._at(end))

    def _at(self, offset: int) -> lsp.Position:
        import bisect

        offset = min(max(offset, 0), len(self.text))
        row = bisect.bisect_right(self.starts, offset) - 1
        return self.position(row + 1, offset - self.starts[row] + 1)

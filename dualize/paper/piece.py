"""Translated text that remembers, for each stretch of it, the .tex span it came from."""

from __future__ import annotations

from dataclasses import dataclass

from dualize.syntax.span import Span

Mark = tuple[int, int, Span]


@dataclass(frozen=True)
class Piece:
    """Text of our language, with marks (start, end, .tex span) into that text."""

    text: str
    marks: tuple[Mark, ...] = ()

    def __add__(self, other: Piece | str) -> Piece:
        other = other if isinstance(other, Piece) else Piece(other)
        shift = len(self.text)
        moved = tuple((a + shift, b + shift, s) for a, b, s in other.marks)
        return Piece(self.text + other.text, self.marks + moved)

    def __radd__(self, other: str) -> Piece:
        return Piece(other) + self

    def at(self, span: Span) -> Piece:
        """The same text, marked as a whole as coming from ``span``."""
        return Piece(self.text, ((0, len(self.text), span), *self.marks))


def join(pieces: list[Piece], sep: str) -> Piece:
    out = Piece("")
    for k, p in enumerate(pieces):
        out = out + (sep if k else "") + p
    return out


def innermost(marks: tuple[Mark, ...], offset: int) -> Span | None:
    """The narrowest marked stretch that holds ``offset``."""
    best: Mark | None = None
    for mark in marks:
        a, b, _ = mark
        if a <= offset < max(b, a + 1) and (best is None or b - a < best[1] - best[0]):
            best = mark
    return best[2] if best else None

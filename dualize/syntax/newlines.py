"""Which newlines end a statement.

A newline ends a statement except inside brackets, after a binary operator or
a comma (the language contract), and after a keyword that needs something to
follow (``minimize``, ``data``, ``over``, ``in``, ``title``).  The grammar then
only ever sees statement-ending newlines, so it stays a plain list of lines.
"""

from __future__ import annotations

from collections.abc import Iterator

from lark import Token

NEWLINE = "_NL"
OPENERS = frozenset({"LPAR", "LSQB", "LBRACE"})
CLOSERS = frozenset({"RPAR", "RSQB", "RBRACE"})
CONTINUES = frozenset({
    "PLUS", "MINUS", "PRODUCT_OP", "CARET", "RELATION", "COMMA", "IN",
    "SENSE", "DATA", "OVER", "TITLE",
})


class NewlineFilter:
    """A lark postlexer: drops the newlines that do not end a statement."""

    always_accept = (NEWLINE,)

    def process(self, stream: Iterator[Token]) -> Iterator[Token]:
        depth = 0
        previous: str | None = None
        for token in stream:
            if token.type == NEWLINE:
                if depth > 0 or previous is None or previous in CONTINUES or previous == NEWLINE:
                    continue
            elif token.type in OPENERS:
                depth += 1
            elif token.type in CLOSERS:
                depth = max(depth - 1, 0)
            previous = token.type
            yield token

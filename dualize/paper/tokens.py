"""The token stream between lark's lexer and the LaTeX grammar.

Two things a context-free LALR(1) grammar cannot see are settled here: a plain
norm bar ``\\|`` (or ``|``) opens or closes depending on what came before, and a
run of separators (``,  \\quad  \\\\  \\text{s.t.}  .``) outside brackets is one break
between items, however it is spelled.  Commas inside braces or parentheses stay
commas (``\\sum_{i,j}``, ``\\max_{\\lambda, \\nu}``).
"""

from __future__ import annotations

from collections.abc import Iterator

from lark import Token

SEPARATORS = frozenset({"COMMA", "QUAD", "NEWROW", "SEMI", "PERIOD", "SUBJECT_TO"})
OPENERS = frozenset({"LBRACE", "LPAR", "LSQB"})
CLOSERS = frozenset({"RBRACE", "RPAR", "RSQB"})
BARS = {"NORM_BAR": ("NORM_OPEN", "NORM_CLOSE"), "ABS_BAR": ("ABS_OPEN", "ABS_CLOSE")}


class PaperTokens:
    """Lark postlexer: bars paired, separator runs merged into ``SEP``."""

    # Terminals that only this postlexer turns into grammar tokens (or that no rule
    # accepts, so that an unknown command is named in the error): lark drops
    # unused terminals unless they are listed here.
    always_accept: tuple[str, ...] = ("SUBJECT_TO", "QUAD", "NEWROW", "SEMI", "PERIOD",
                                      "NORM_BAR", "ABS_BAR", "UNKNOWN_COMMAND")

    def process(self, stream: Iterator[Token]) -> Iterator[Token]:
        depth = 0
        bars: list[str] = []
        pending: Token | None = None
        for tok in stream:
            if tok.type in SEPARATORS and (depth == 0 or tok.type != "COMMA"):
                pending = _merged(pending, tok)
                continue
            if pending is not None:
                yield pending
                pending = None
            depth += (tok.type in OPENERS) - (tok.type in CLOSERS)
            yield _paired(tok, bars)
        if pending is not None:
            yield pending


def _merged(pending: Token | None, tok: Token) -> Token:
    """One SEP token for a run; its value lists the kinds (``NEWROW`` marks a row end)."""
    if pending is None:
        return Token.new_borrow_pos("SEP", tok.type, tok)
    return Token.new_borrow_pos("SEP", f"{pending} {tok.type}", pending)


def _paired(tok: Token, bars: list[str]) -> Token:
    """A plain bar closes the innermost bar of its kind if that is open, else opens."""
    if tok.type in ("NORM_OPEN", "NORM_CLOSE"):
        _track(bars, "NORM_BAR", tok.type == "NORM_OPEN")
        return tok
    if tok.type not in BARS:
        return tok
    opening = not bars or bars[-1] != tok.type
    _track(bars, tok.type, opening)
    kind = BARS[tok.type][0 if opening else 1]
    return Token.new_borrow_pos(kind, str(tok), tok)


def _track(bars: list[str], kind: str, opening: bool) -> None:
    if opening:
        bars.append(kind)
    elif bars and bars[-1] == kind:
        bars.pop()

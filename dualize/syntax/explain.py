"""Friendly messages for lark's parse errors.

The common mistakes get their own rule and sentence: an operator left dangling at
the end of a line, an unclosed norm bar or bracket, a relation in the objective,
an unknown character, the end of the file in mid-statement.  Everything else is a
``syntax-error`` that lists what the grammar expected at that point.
"""

from __future__ import annotations

import re

from lark import Token, UnexpectedCharacters, UnexpectedInput

from dualize.diagnostics import Diagnostic, make
from dualize.syntax import rules as R
from dualize.syntax.positions import span_of, token_span
from dualize.syntax.span import Span

OPERATOR_END = re.compile(r"(\.\*|\./|[-+*/^,−]|<=|>=|==|=|≤|≥|⪰|⪯)$")
STATEMENT_START = re.compile(
    r"[ \t]*(title|data|minimi[sz]e|maximi[sz]e|over|subject|s\.t\.)(?!\w)")
KEYWORD_AT = re.compile(r"(over|subject|s\.t\.|data|title|minimi[sz]e|maximi[sz]e)(?!\w)")
PRETTY = {
    "NAME": "a name", "NUMBER": "a number", "RELATION": "a relation (<=, >=, ==)",
    "PLUS": "`+`", "MINUS": "`-`", "PRODUCT_OP": "`*`", "CARET": "`^`",
    "TRANSPOSE": "`'`", "NORM_BAR": "`||`", "ABS_BAR": "`|`", "LPAR": "`(`",
    "RPAR": "`)`", "COMMA": "`,`", "COLON": "`:`", "IN": "`in`", "_NL": "end of line",
    "$END": "end of file", "SENSE": "`minimize` or `maximize`", "OVER": "`over`",
    "SUBJECT_TO": "`subject to`", "DATA": "`data`", "TITLE": "`title`",
    "STRING": "a quoted title", "LSQB": "`[`", "RSQB": "`]`", "LBRACE": "`{`",
    "RBRACE": "`}`", "NORM_SUB": "a norm subscript (_1, _2, _inf)",
    "SET_SIGN": "`_+` or `_++`",
}
CLOSING = {"(": ")", "[": "]", "{": "}"}


def explain(err: UnexpectedInput, text: str, path: str) -> Diagnostic:
    """One diagnostic for a lark error, as specific as the situation allows."""
    if isinstance(err, UnexpectedCharacters):
        return _bad_character(err, text, path)
    token = getattr(err, "token", None)
    pos = error_position(err, text)
    expected = sorted(getattr(err, "expected", None) or getattr(err, "accepts", None) or ())
    for check in (_dangling, _indexing, _unclosed_bracket, _unbalanced_bar,
                  _objective_relation):
        found = check(text, pos, token, path)
        if found is not None:
            return found
    if token is None or token.type == "$END":
        return make(R.UNEXPECTED_END, path, _point(text, pos), what=_statement_kind(text, pos))
    return make(R.SYNTAX_ERROR, path, token_span(token), found=_describe(token),
                expected=_expected_text(expected))


def error_position(err: UnexpectedInput, text: str) -> int:
    """Where the parser stopped: the failing character or token (the text's end at EOF)."""
    if isinstance(err, UnexpectedCharacters):
        return err.pos_in_stream
    token = getattr(err, "token", None)
    return len(text) if token is None or token.type == "$END" else token.start_pos


def _bad_character(err: UnexpectedCharacters, text: str, path: str) -> Diagnostic:
    pos = err.pos_in_stream
    char = text[pos] if pos < len(text) else "\n"
    span = Span(err.line, err.column, err.line, err.column + 1, pos, pos + 1)
    if char == '"':
        return make(R.UNTERMINATED_STRING, path, span, hint='close the title with `"`')
    shown = f"`{char}`" if char.isprintable() and not char.isspace() else ""
    return make(R.UNKNOWN_CHARACTER, path, span, char=f"{shown} (U+{ord(char):04X})".strip(),
                hint=_character_hint(char))


def _character_hint(char: str) -> str | None:
    if char in "<>!":
        return "relations are <=, >= and == (strict inequalities are not part of the language)"
    if char == ".":
        return "elementwise operators are .* and ./; decimals need a digit on both sides"
    return None


def _dangling(text: str, pos: int, token: Token | None, path: str) -> Diagnostic | None:
    """An operator ends a line and the next line starts a new statement (or the file ends)."""
    line_start = text.rfind("\n", 0, pos) + 1
    at_end = token is None or token.type == "$END"
    if at_end:
        before = code_before(text, pos)
    elif STATEMENT_START.match(text, line_start):
        before = code_before(text, line_start)
    else:
        return None
    match = OPERATOR_END.search(before)
    if match is None:
        return None
    return make(R.DANGLING_OPERATOR, path, span_of(text, match.start(), match.end()),
                op=match.group(0), hint="finish the expression, or remove the operator")


def _unclosed_bracket(text: str, pos: int, token: Token | None, path: str) -> Diagnostic | None:
    stack: list[int] = []
    for i, ch in enumerate(blank_comments(text[:pos])):
        if ch in CLOSING:
            stack.append(i)
        elif ch in ")]}" and stack:
            stack.pop()
    if not stack:
        return None
    if "\n" not in text[stack[-1]:pos] and not KEYWORD_AT.match(text, pos):
        return None
    i = stack[-1]
    return make(R.UNCLOSED_BRACKET, path, span_of(text, i, i + 1), bracket=text[i],
                hint=f"add the missing `{CLOSING[text[i]]}`")


def _unbalanced_bar(text: str, pos: int, token: Token | None, path: str) -> Diagnostic | None:
    """An odd number of norm bars (or of single bars) on the failing line."""
    line_start = text.rfind("\n", 0, max(pos - 1, 0)) + 1
    line = blank_comments(text[line_start:_line_end(text, pos)])
    norms = [m.start() for m in re.finditer(r"\|\||‖", line)]
    singles = [m.start() for m in re.finditer(r"(?<!\|)\|(?!\|)", line)]
    for bar, places in (("||", norms), ("|", singles)):
        if len(places) % 2 == 1:
            at = line_start + places[-1]
            return make(R.UNBALANCED_NORM, path, span_of(text, at, at + len(bar)), bar=bar,
                        hint="write `| |e| |` with spaces for an absolute value inside another")
    return None


def _objective_relation(text: str, pos: int, token: Token | None,
                        path: str) -> Diagnostic | None:
    if token is None or token.type != "RELATION":
        return None
    line_start = text.rfind("\n", 0, pos) + 1
    if not re.match(r"\s*(minimi[sz]e|maximi[sz]e)\b", text[line_start:pos]):
        return None
    return make(R.OBJECTIVE_RELATION, path, token_span(token), relation=str(token),
                hint="move the condition under `subject to`")


INDEXED = re.compile(r"[\w)'\]]$")


def _indexing(text: str, pos: int, token: Token | None, path: str) -> Diagnostic | None:
    """``x[1]`` or ``A[i, j]``: a bracket right after a name selects entries, which the
    language does not do; the hint says how to single entries out with data."""
    if token is None or token.type != "LSQB" or not INDEXED.search(text[:pos]):
        return None
    close = text.find("]", pos, _line_end(text, pos))
    end = close + 1 if close >= 0 else pos + 1
    head = re.search(r"[\w']*$", text[:pos])
    written = (head.group(0) if head else "") + text[pos:end]
    return make(R.ENTRY_INDEXING, path, span_of(text, pos, end), written=written,
                hint="relations and functions act entry by entry (x >= 0 bounds every "
                     "entry); to single entries out, declare a selector as data, e.g. "
                     "`data e in R^n` (a unit vector) and write e' * x, or `data S in "
                     "R^(k,n)` and write S * x")


def _statement_kind(text: str, pos: int) -> str:
    line_start = text.rfind("\n", 0, max(pos - 1, 0)) + 1
    word = re.match(r"\s*([\w.]+)", text[line_start:pos])
    first = word.group(1) if word else ""
    if first.startswith(("minimi", "maximi")):
        return "objective"
    return {"title": "title", "data": "data line", "over": "`over` clause"}.get(first, "statement")


def code_before(text: str, pos: int) -> str:
    """The text before ``pos`` without comments and trailing blanks."""
    return blank_comments(text[:pos]).rstrip()


def blank_comments(text: str) -> str:
    """Comments replaced by spaces, so that offsets stay valid."""
    return re.sub(r"#[^\n]*", lambda m: " " * len(m.group(0)), text)


def _line_end(text: str, pos: int) -> int:
    end = text.find("\n", pos)
    return len(text) if end < 0 else end


def _point(text: str, pos: int) -> Span:
    return span_of(text, pos, pos)


def _describe(token: Token) -> str:
    if token.type in {"_NL", "$END"}:
        return PRETTY[token.type]
    return f"`{token}`"


def _expected_text(expected: list[str]) -> str:
    names = sorted({PRETTY.get(e, e) for e in expected if not e.startswith("__ANON")},
                   key=lambda name: (name.startswith("`"), name))
    if len(names) > 8:
        return ", ".join(names[:8]) + ", ..."
    return ", ".join(names) if names else "something else"

"""The reader's vocabulary: Greek spellings, relations, and words for tokens in messages."""

from __future__ import annotations

from collections.abc import Iterable

from lark import Token

RELATIONS = {
    "\\le": "<=", "\\leq": "<=", "\\leqslant": "<=", "≤": "<=",
    "\\ge": ">=", "\\geq": ">=", "\\geqslant": ">=", "≥": ">=",
    "\\succeq": "succeq", "\\succcurlyeq": "succeq", "⪰": "succeq",
    "\\preceq": "preceq", "\\preccurlyeq": "preceq", "⪯": "preceq",
    "=": "==",
}

# Terminal names as an author would call them, for "expected ..." lists.
TOKEN_WORDS = {
    "LETTER": "a letter", "GREEK": "a Greek letter", "NUMBER": "a number",
    "BOLD": "a bold name", "FRAC": "\\frac", "FRAC_DIGITS": "\\frac12",
    "SUM": "\\sum", "FUNC": "a function (\\log, \\exp, \\operatorname{diag}, ...)",
    "SQRT": "\\sqrt", "NORM_OPEN": "a norm \\|", "NORM_CLOSE": "the closing \\|",
    "ABS_OPEN": "|", "ABS_CLOSE": "the closing |", "LPAR": "(", "RPAR": ")",
    "LSQB": "[", "RSQB": "]", "LBRACE": "{", "RBRACE": "}", "PLUS": "+", "MINUS": "-", "SLASH": "/",
    "CDOT": "\\cdot", "EQ": "=", "REL": "a relation (\\le, \\ge, \\succeq, ...)",
    "SEP": "a separator (\\\\, \\quad, a comma, \\text{s.t.})", "SENSE": "\\max or \\min",
    "UNDERSET": "\\underset", "UNDERSCORE": "_", "CIRCUMFLEX": "^",
    "TRANSPOSE": "a transpose (^\\top)", "SUP_ARG": "an exponent", "INFTY": "\\infty",
    "COMMA": ",", "IN": "\\in", "REALS": "\\mathbb{R}", "SET_SIGN": "_+",
    "RANGE": "i = 1, \\dots, m", "IN_RANGE": "\\in \\{1, \\dots, m\\}",
    "FORALL": "\\forall", "ABS_BAR": "|", "NORM_BAR": "\\|", "NEWROW": "\\\\",
    "QUAD": "\\quad", "SEMI": ";", "PERIOD": ".", "SUBJECT_TO": "\\text{s.t.}",
    "UNKNOWN_COMMAND": "a command", "FOR": "\\text{for}", "$END": "the end of the display",
}

GREEK = ("alpha beta gamma delta epsilon varepsilon zeta eta theta vartheta iota kappa "
         "lambda mu nu xi pi rho sigma tau upsilon phi varphi chi psi omega Gamma Delta "
         "Theta Lambda Xi Pi Sigma Phi Psi Omega").split()


def greek_name(command: str) -> str:
    """``\\lambda`` -> ``lambda``; ``\\varepsilon`` -> ``epsilon`` (one name a letter)."""
    word = command.lstrip("\\")
    return word[3:] if word.startswith("var") else word


def relation_of(text: str) -> str:
    return RELATIONS[text]


# Where any operand may stand, the list says "an expression" rather than fourteen tokens.
OPERAND_STARTS = frozenset({"LETTER", "GREEK", "NUMBER", "BOLD", "FRAC", "FRAC_DIGITS", "SUM",
                            "FUNC", "SQRT", "NORM_OPEN", "ABS_OPEN", "LPAR", "LSQB", "LBRACE"})
OPERATORS = frozenset({"PLUS", "MINUS", "CDOT", "SLASH", "TRANSPOSE", "SUP_ARG", "CIRCUMFLEX"})


def expected_text(names: Iterable[str]) -> str:
    """A sorted, de-duplicated list of what could have stood there."""
    given = set(names)
    groups = []
    if {"LETTER", "GREEK"} <= given:
        given -= OPERAND_STARTS
        groups.append("an expression")
    if {"PLUS", "MINUS", "CDOT"} <= given:
        given -= OPERATORS
        groups.append("an operator")
    words = groups + sorted({TOKEN_WORDS.get(n, n) for n in given})
    if not words:
        return "something else"
    if len(words) > 8:
        return ", ".join(words[:8]) + ", ..."
    return ", ".join(words)


def found_text(tok: Token) -> str:
    if tok.type == "UNKNOWN_COMMAND":
        return f"`{tok}` is not a command the reader knows"
    if tok.type == "SEP":
        return "unexpected separator"
    return f"unexpected `{str(tok).strip()}`"

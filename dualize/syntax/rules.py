"""The syntax stage's kinds of diagnostic (one kind per defect, listed in ``KINDS``)."""

from __future__ import annotations

from dualize.diagnostics import RuleKind

_KINDS: list[RuleKind] = []  # filled by this module alone, in order


def _syntax(id: str, template: str, why: str) -> RuleKind:
    kind = RuleKind(id, "error", template, why, "syntax")
    _KINDS.append(kind)
    return kind


SYNTAX_ERROR = _syntax(
    "syntax-error", "unexpected {found}; expected {expected}",
    "The text does not follow the grammar of the problem language, so nothing after "
    "this point can be read reliably.")
UNKNOWN_CHARACTER = _syntax(
    "unknown-character", "unknown character {char}",
    "The character belongs to no token of the language; it is often a typo or a "
    "symbol pasted from a document.")
UNTERMINATED_STRING = _syntax(
    "unterminated-string", "the quoted text is not closed on its line",
    "A title is one line of text between double quotes.")
UNEXPECTED_END = _syntax(
    "unexpected-end", "the file ends before the {what} is complete",
    "A statement was left unfinished at the end of the file.")
DANGLING_OPERATOR = _syntax(
    "dangling-operator", "`{op}` ends the line but nothing follows it",
    "A line that ends with an operator continues on the next line; here the next "
    "line does not supply the missing operand.")
UNBALANCED_NORM = _syntax(
    "unbalanced-norm", "`{bar}` is opened but not closed",
    "Norms `||e||` and absolute values `|e|` need a closing bar of the same kind.")
UNCLOSED_BRACKET = _syntax(
    "unclosed-bracket", "`{bracket}` is never closed",
    "Inside brackets newlines do not end a statement, so an unclosed bracket swallows "
    "the rest of the file.")
ENTRY_INDEXING = _syntax(
    "entry-indexing", "`{written}` selects entries by index, which the language does not do",
    "Expressions are whole vectors and matrices, as in the mathematics of a paper; "
    "entries are singled out by products with data (a unit vector or a selection "
    "matrix), and relations hold entry by entry.")
OBJECTIVE_RELATION = _syntax(
    "objective-relation", "the objective cannot contain the relation `{relation}`",
    "`minimize` and `maximize` take an expression; conditions belong under "
    "`subject to`.")
MISSING_OVER = _syntax(
    "missing-over", "`{sense}` has no `over` clause naming the decision variables",
    "Without `over` the tool cannot tell decision variables from data.")
MISSING_OBJECTIVE = _syntax(
    "missing-objective", "the file states no objective (`minimize` or `maximize`)",
    "A problem file states exactly one optimization problem.")
STATEMENT_ORDER = _syntax(
    "statement-order", "{what} must come {where}",
    "Statements come in a fixed order: title, data lines, the objective with its "
    "`over` clause, then `subject to` and the constraints.")
DUPLICATE_STATEMENT = _syntax(
    "duplicate-statement", "a second {what}: a file states one problem",
    "A file has at most one title, one objective and one `subject to`.")
BAD_CHAIN = _syntax(
    "bad-chain", "a chain takes two relations of one kind, not {found}",
    "`lo <= x <= hi` is read as two constraints; mixing directions has no standard "
    "meaning.")
LABEL_COUNT = _syntax(
    "label-count", "{labels} label(s) for {count} constraint(s)",
    "Each label names one constraint's multiplier: a chain takes one label per "
    "relation.")
TOO_DEEP = _syntax(
    "too-deep", "the expression is nested more than {limit} levels deep",
    "Deeply nested expressions are refused rather than risk exhausting the stack.")
FILE_TOO_LARGE = _syntax(
    "file-too-large", "the file has {size} characters; the limit is {limit}",
    "A problem file states a model, not its data; data belong in an instance file.")
NOT_UTF8 = _syntax(
    "not-utf8", "the file is not UTF-8 text (byte 0x{byte} at offset {offset})",
    "Problem files are UTF-8 text; this looks like a binary file or another encoding.")
BAD_SIZE_SEPARATOR = _syntax(
    "bad-size-separator", "sizes are separated by `,`, `x` or `×`, not `{found}`",
    "A matrix set is written R^(m,n), R^(m x n) or R^(m × n).")
NUMBER_OUT_OF_RANGE = _syntax(
    "number-out-of-range", "the number `{text}` is out of range: {why}",
    "Numbers are exact rationals; an exponent that large would take unbounded time "
    "and memory to expand.")

KINDS: tuple[RuleKind, ...] = tuple(_KINDS)

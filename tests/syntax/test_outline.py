"""Statement order and friendly syntax messages, case by case (rule ids, not wording)."""

import pytest

from dualize.syntax.parser import parse


def rules(text: str) -> list[tuple[str, int, int]]:
    return [(d.rule, d.span.line, d.span.column) for d in parse(text).diagnostics]


@pytest.mark.parametrize("text, expected", [
    ('data a in R\ntitle "late"\nminimize x over x in R', [("statement-order", 2, 1)]),
    ('title "a"\ntitle "b"\nminimize x over x in R', [("duplicate-statement", 2, 1)]),
    ("over x in R\nminimize x", [("statement-order", 1, 1), ("missing-over", 2, 1)]),
    ("minimize x over x in R\nover y in R", [("duplicate-statement", 2, 1)]),
    ("minimize x\ns.t.\nover x in R", [("statement-order", 3, 1), ("missing-over", 1, 1)]),
    ("s.t. x >= 0\nminimize x over x in R", [("statement-order", 1, 1)]),
    ("minimize x over x in R\ns.t.\ns.t.", [("duplicate-statement", 3, 1)]),
    ("minimize x over x in R\ns.t. 0 <= x <= 1 <= 2", [("bad-chain", 2, 18)]),
])
def test_statement_order(text: str, expected: list[tuple[str, int, int]]) -> None:
    assert rules(text) == expected


@pytest.mark.parametrize("text, expected", [
    ("minimize x over x in R\ns.t.\n x <=\n", ("dangling-operator", 3, 4)),
    ("minimize x over x in R\ns.t.\n x >= 1 *  # note\n", ("dangling-operator", 3, 9)),
    ("data a in R,\nminimize x over x in R", ("dangling-operator", 1, 12)),
    ("minimize x over x in R\ns.t.\n ||x >= 1\n", ("unbalanced-norm", 3, 2)),
    ("minimize |x over x in R", ("unbalanced-norm", 1, 10)),
    ("minimize max(x, (1 + x) over x in R", ("unclosed-bracket", 1, 13)),
    ("maximize x == 1 over x in R", ("objective-relation", 1, 12)),
    ("minimize x over x in R\ns.t.\n x ! 1", ("unknown-character", 3, 4)),
    ("minimize x over", ("unexpected-end", 1, 16)),
    ("data A in", ("unexpected-end", 1, 10)),
    ("minimize x over x R", ("syntax-error", 1, 19)),
])
def test_friendly_messages(text: str, expected: tuple[str, int, int]) -> None:
    assert rules(text) == [expected]


def test_a_misplaced_statement_does_not_make_the_rest_out_of_order() -> None:
    text = "s.t. x >= 0\ntitle \"t\"\ndata a in R\nminimize x over x in R\nsubject to\n x <= a"
    assert rules(text) == [("statement-order", 1, 1)]


def test_independent_syntax_errors_on_later_lines_are_all_reported() -> None:
    text = ("data a in R $\nminimize x +\n   y\nover x in R, y in R\nsubject to\n"
            "  x >= 1 1\n  y <= (2 +\n     3) 4\n  x == 2\n  y >= ||x\n")
    assert rules(text) == [("unknown-character", 1, 13), ("syntax-error", 6, 10),
                           ("syntax-error", 8, 9), ("unbalanced-norm", 10, 8)]


def test_recovery_stops_where_the_rest_cannot_be_read() -> None:
    assert [r for r, _, _ in rules("minimize (x over x in R\ns.t.\n x >= 1 1\n")] == [
        "unclosed-bracket"]

"""Every syntax and model diagnostic kind: registered once, explained, and triggered.

Each row is a minimal file that commits one defect; the test checks the rule id and
where the caret points (line and column, 1-based as compilers report them: common
practice).
"""

import pytest

from dualize.diagnostics import RuleKind, table_of
from dualize.lint import rule_table
from dualize.model import load, load_file
from dualize.syntax.parser import MAX_CHARS

TRIGGERS = [
    ('syntax-error', 'minimize x over x in R\ns.t.\n x >= 1 1\n', 3, 9),
    ('unknown-character', 'minimize x $ 2 over x in R\n', 1, 12),
    ('unterminated-string', 'title "Budget\nminimize x over x in R\n', 1, 7),
    ('unexpected-end', 'minimize', 1, 9),
    ('dangling-operator', 'minimize x +\nover x in R\n', 1, 12),
    ('unbalanced-norm', 'minimize ||x + 1 over x in R^n\n', 1, 10),
    ('unclosed-bracket', 'minimize sum(x\nover x in R^n\n', 1, 13),
    ('objective-relation', 'minimize x >= 0 over x in R\n', 1, 12),
    ('missing-over', 'minimize x\ns.t.\n x >= 0\n', 1, 1),
    ('missing-objective', 'data A in R^n\n', 1, 1),
    ('statement-order', 'minimize x over x in R\ndata A in R\n', 2, 1),
    ('duplicate-statement', 'minimize x over x in R\nmaximize x\n', 2, 1),
    ('bad-chain', 'minimize x over x in R\ns.t.\n 0 <= x >= 1\n', 3, 9),
    ('label-count', 'minimize x over x in R\ns.t.\n a, b: x >= 1\n', 3, 2),
    ('too-deep', 'minimize ' + '-' * 250 + 'x over x in R\n', 1, 208),
    ('number-out-of-range', 'minimize 1e99999999 * x over x in R\n', 1, 10),
    ('bad-size-separator', 'data A in R^(m by n)\nminimize x over x in R\n', 1, 16),
    ('undeclared-name', 'minimize y over x in R\n', 1, 10),
    ('declared-twice', 'data a in R\ndata a in R^n\nminimize x over x in R\n', 2, 6),
    ('label-twice', 'minimize x over x in R\ns.t.\n c: x >= 0\n c: x <= 1\n', 4, 2),
    ('label-clash', 'data c in R\nminimize x over x in R\ns.t.\n c: x >= 0\n', 4, 2),
    ('dimension-as-name', 'data n in R\ndata v in R^n\nminimize x over x in R\n', 1, 6),
    ('dimension-as-value', 'data v in R^n\nminimize n * x over x in R\n', 2, 10),
    ('reserved-name', 'data sum in R\nminimize x over x in R\n', 1, 6),
    ('unknown-set', 'data A in Q^n\nminimize x over x in R\n', 1, 11),
    ('bad-set', 'minimize x over x in {0,2}\n', 1, 22),
    ('set-not-allowed', 'data k in Z\nminimize x over x in R\n', 1, 11),
    ('bad-size', 'data v in R^0\nminimize x over x in R\n', 1, 13),
    ('bad-box-bound', 'data v in R^n\nminimize x over x in [0, v]\n', 2, 26),
    ('shape-mismatch', 'data A in R^(m,n)\nminimize sum(A * x) over x in R^m\n', 2, 14),
    ('nonscalar-objective', 'minimize x over x in R^n\n', 1, 10),
    ('unknown-function', 'minimize sine(x) over x in R\n', 1, 10),
    ('other-notation', 'data P in S^n_+\nminimize quad_form(x, P) over x in R^n\n', 2, 10),
    ('entry-indexing', 'minimize x[1] over x in R^n\n', 1, 11),
    ('argument-count', 'minimize max(x) over x in R\n', 1, 10),
    ('wrong-argument', 'data A in R^(m,n)\nminimize trace(A) + x over x in R\n', 2, 10),
    ('inverse-of-variable', 'minimize trace(inv(X)) over X in S^n\n', 1, 16),
    ('bad-exponent', 'minimize x^x over x in R\n', 1, 12),
    ('division-by-zero', 'minimize x / 0 over x in R\n', 1, 14),
    ('number-too-large', 'minimize 2^100000 * x over x in R\n', 1, 10),
    ('not-symmetric',
     'data A in R^(n,n)\nminimize trace(X) over X in S^n\ns.t.\n A*X succeq 0\n', 4, 2),
]
SPECIAL = {"file-too-large", "not-utf8"}


@pytest.mark.parametrize("rule, text, line, column", TRIGGERS, ids=[t[0] for t in TRIGGERS])
def test_kind_is_triggered_at_its_place(rule: str, text: str, line: int, column: int) -> None:
    loaded = load(text, "case.prob")
    assert loaded.problem is None
    assert [d.rule for d in loaded.diagnostics] == [rule]
    found = loaded.diagnostics[0]
    assert (found.span.line, found.span.column) == (line, column)
    assert found.path == "case.prob" and found.severity == "error"
    assert found.span.end_line >= found.span.line


def test_file_too_large() -> None:
    loaded = load("minimize x over x in R\n" + "#" * MAX_CHARS)
    assert [d.rule for d in loaded.diagnostics] == ["file-too-large"]
    assert (loaded.diagnostics[0].span.line, loaded.diagnostics[0].span.column) == (1, 1)


def test_not_utf8(tmp_path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "latin1.prob"
    path.write_bytes("# caf\u00e9 plan\nminimize x over x in R\n".encode("latin-1"))
    loaded = load_file(path)
    assert [d.rule for d in loaded.diagnostics] == ["not-utf8"]
    assert (loaded.diagnostics[0].span.line, loaded.diagnostics[0].span.column) == (1, 6)


def test_every_front_end_kind_has_a_trigger_and_a_why() -> None:
    table = rule_table()
    front = {k for k, kind in table.items() if kind.stage in {"syntax", "model"}}
    triggered = {t[0] for t in TRIGGERS} | SPECIAL
    assert front == triggered
    assert all(kind.why.strip() and kind.template.strip() for kind in table.values())


def test_ids_are_unique_and_registering_twice_fails() -> None:
    table = rule_table()
    assert len(table) == len(set(table))
    some = next(iter(table.values()))
    with pytest.raises(ValueError):
        table_of(table.values(), [RuleKind(some.id, "error", "x", "y", "syntax")])

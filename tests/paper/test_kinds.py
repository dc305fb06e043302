"""The paper reader's diagnostic kinds: registered once, explained, and each triggered
by a test of this folder at its place in a draft."""

from __future__ import annotations

import pytest

from dualize.lint import rule_table
from dualize.paper import rules as R
from dualize.paper.locate import PaperError, find_claims
from tests.paper.helpers import fragment

TRIGGERS = [
    ("paper-syntax", r"\max_{\nu} -b^\top \nu +", 3, 25),
    ("paper-unsupported", r"\max_{\nu} \|\nu\|_3", 3, 12),
    ("paper-index", r"\max_{\nu} \nu_i", 3, 12),
    ("paper-name", r"\max_{\nu} -q^\top \nu", 3, 13),
    ("paper-claim", r"\max_{\nu} -b \nu^\top", 3, 12),
]


@pytest.mark.parametrize(("rule", "body", "line", "column"), TRIGGERS)
def test_kind_is_triggered_at_its_place(rule: str, body: str, line: int, column: int) -> None:
    (d,) = fragment(body, "survey_least_norm").diagnostics
    assert d.rule == rule and d.span is not None
    assert (d.span.line, d.span.column) == (line, column)


def test_no_claim_kind() -> None:
    with pytest.raises(PaperError) as err:
        find_claims("% dualize: claim for p.prob\n\nno display\n", "d.tex")
    assert [d.rule for d in err.value.diagnostics] == ["paper-no-claim"]


def test_every_paper_kind_is_registered_explained_and_triggered() -> None:
    kinds = {k.id: k for k in vars(R).values() if isinstance(k, type(R.PAPER_NAME))}
    table = rule_table()
    assert all(table[i] is kinds[i] for i in kinds)
    assert set(kinds) == {t[0] for t in TRIGGERS} | {"paper-no-claim"}
    assert all(k.stage == "paper" and k.why.strip() and k.severity == "error"
               for k in kinds.values())

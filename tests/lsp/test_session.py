"""The server as an editor meets it: a real client over stdio, one scenario per test.

Expected ranges are computed from the text itself (where the misspelt name is
written), the rule ids are the ones `dualize lint` reports, and the dual
constraint in the hover is the textbook one: for the standard-form linear
program min c'x s.t. Ax = b, x >= 0 the dual asks A'nu + c >= 0 (Boyd and
Vandenberghe, Convex Optimization, 2004, section 5.2.1, from memory).
"""

from __future__ import annotations

from pathlib import Path

from lsprotocol import types as lsp

from tests.lsp.client import Session, matching, position_of, run, uri_of

BROKEN = """data a in R^n
minimize sum(x .* x) + aa' * x
over x in R^n
subject to
  lo: x >= 0
"""
FIXED = """data a in R^n
data q in R
minimize sum(x .* x) + a' * x
over x in R^n
subject to
  lo: x >= 0
"""
STANDARD_LP = """data c in R^n
data A in R^(m,n)
data b in R^m
minimize c' * x
over x in R^n
subject to
  cap: A*x == b
  pos: x >= 0
"""


def test_open_change_hover_derive_shutdown(tmp_path: Path) -> None:
    problem = tmp_path / "broken.prob"
    problem.write_text(BROKEN, encoding="utf-8")
    uri = uri_of(problem)

    async def scenario(s: Session) -> None:
        s.open(uri, BROKEN)
        first = await s.diagnostics(uri, version=1)
        [found] = matching(first, code="undeclared-name")
        assert found.severity == lsp.DiagnosticSeverity.Error
        start = position_of(BROKEN, "aa'")
        assert found.range == lsp.Range(start, lsp.Position(start.line, start.character + 2))
        assert found.source == "dualize"
        assert any("did you mean `a`" in r.message for r in found.related_information or ())

        s.replace(uri, FIXED, 2)
        second = await s.diagnostics(uri, version=2)
        assert not matching(second, code="undeclared-name")
        [unused] = matching(second, code="unused-data")
        start = position_of(FIXED, "q in")
        assert unused.range.start == start
        assert unused.severity == lsp.DiagnosticSeverity.Information

        s.replace(uri, STANDARD_LP, 3)
        await s.diagnostics(uri, version=3)
        hover = await s.client.text_document_hover_async(lsp.HoverParams(
            lsp.TextDocumentIdentifier(uri), position_of(STANDARD_LP, "cap")))
        text = hover.contents.value
        assert "constraint `cap`" in text and "multiplier `cap`" in text
        assert "free" in text  # an equality's multiplier has any sign
        assert "Aᵀ" in text  # the dual constraint A'nu + c >= 0 mentions A transposed

        result = await s.client.workspace_execute_command_async(lsp.ExecuteCommandParams(
            "dualize.deriveDual", [uri]))
        assert result["uri"] == uri
        assert "maximize" in result["markdown"].lower()
        assert await s.stop() == 0

    run(scenario)


def test_rapid_changes_are_debounced_to_the_last_version() -> None:
    """Typing sends a change per keystroke; findings are published for the text the
    user stopped at, not for every keystroke on the way (common practice)."""
    uri = "untitled:typing"
    steps = ["minimize x", "minimize x^", "minimize x^2", "minimize x^2 over",
             "minimize x^2 over x in R\n"]

    async def scenario(s: Session) -> None:
        s.open(uri, "")
        await s.diagnostics(uri, version=1)
        for version, text in enumerate(steps, start=2):
            s.replace(uri, text, version)
        last = await s.diagnostics(uri, version=len(steps) + 1)
        assert not matching(last, severity=lsp.DiagnosticSeverity.Error)
        seen = {p.version for p in s.published[uri]}
        assert seen == {1, len(steps) + 1}
        assert await s.stop() == 0

    run(scenario)

"""Completion, definition, symbols, quick fixes and the LaTeX command, through a client.

The quick fixes apply the rewrites the language's own documentation states
(docs/language.md: `|e|` is the absolute value, `./` divides elementwise).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

from lsprotocol import types as lsp

from tests.lsp.client import ROOT, Session, matching, position_of, run, uri_of

SOFT_MARGIN = ROOT / "examples" / "parts_soft_margin.prob"
TYPOS = """data a in R^n
data d in R^n
minimize sum(abs(x - a))
over x in R^n
subject to
  c: x / d <= 1
"""


def _doc(uri: str) -> lsp.TextDocumentIdentifier:
    return lsp.TextDocumentIdentifier(uri)


def apply(text: str, edit: lsp.TextEdit) -> str:
    """Apply one edit to an ASCII text (its positions are then characters)."""
    lines = text.split("\n")

    def offset(p: lsp.Position) -> int:
        return sum(len(x) + 1 for x in lines[:p.line]) + p.character

    return text[:offset(edit.range.start)] + edit.new_text + text[offset(edit.range.end):]


def test_symbols_definition_completion(tmp_path: Path) -> None:
    text = SOFT_MARGIN.read_text(encoding="utf-8")
    uri = uri_of(tmp_path / "margin.prob")

    async def scenario(s: Session) -> None:
        s.open(uri, text)
        await s.diagnostics(uri, version=1)
        found = await s.client.text_document_document_symbol_async(
            lsp.DocumentSymbolParams(_doc(uri)))
        names = [x.name for x in found]
        assert names == ["X", "y", "C", "minimize", "w", "b", "s", "alpha", "beta"]
        [alpha] = matching(found, name="alpha")
        assert alpha.range.start == position_of(text, "alpha:")

        where = await s.client.text_document_definition_async(lsp.DefinitionParams(
            _doc(uri), position_of(text, "X*w", 3)))
        assert where.range.start == position_of(text, "w in R^n")

        items = await s.client.text_document_completion_async(lsp.CompletionParams(
            _doc(uri), position_of(text, "R^n,", 3)))
        labels = {i.label for i in items.items}
        assert {"R^n_+", "S^n_+", "{0,1}"} <= labels and "alpha" not in labels
        [plus] = [i for i in items.items if i.label == "R^n_+"]  # replaces the typed "R^n"
        assert plus.text_edit.range == lsp.Range(position_of(text, "R^n,"),
                                                 position_of(text, "R^n,", 3))
        items = await s.client.text_document_completion_async(lsp.CompletionParams(
            _doc(uri), position_of(text, "1/2")))
        labels = {i.label for i in items.items}
        assert {"alpha", "w", "C", "log", "sum", "trace"} <= labels
        assert await s.stop() == 0

    run(scenario)


def test_quick_fixes_rewrite_the_hinted_text(tmp_path: Path) -> None:
    uri = uri_of(tmp_path / "typos.prob")

    async def scenario(s: Session) -> None:
        s.open(uri, TYPOS)
        found = await s.diagnostics(uri, version=1)
        assert {d.code for d in found} == {"unknown-function", "shape-mismatch"}
        whole = lsp.Range(lsp.Position(0, 0), lsp.Position(6, 0))
        actions = await s.client.text_document_code_action_async(lsp.CodeActionParams(
            _doc(uri), whole, lsp.CodeActionContext(diagnostics=found)))
        fixes = [a for a in actions if a.kind == lsp.CodeActionKind.QuickFix]
        fixed, changes = TYPOS, []
        for action in sorted(fixes, key=lambda a: a.edit.changes[uri][0].range.start.line,
                             reverse=True):
            [edit] = action.edit.changes[uri]
            fixed = apply(fixed, edit)
            changes.append(lsp.TextDocumentContentChangePartial(edit.range, edit.new_text))
        assert "sum(|x - a|)" in fixed and "c: x ./ d <= 1" in fixed
        # the editor applies the edits and sends them as incremental changes
        s.client.text_document_did_change(lsp.DidChangeTextDocumentParams(
            lsp.VersionedTextDocumentIdentifier(uri=uri, version=2), changes))
        after = await s.diagnostics(uri, version=2)
        assert not [d for d in after if d.severity == lsp.DiagnosticSeverity.Error]
        assert await s.stop() == 0

    run(scenario)


def test_write_latex_beside_the_file(tmp_path: Path) -> None:
    problem = tmp_path / "margin.prob"
    problem.write_text(SOFT_MARGIN.read_text(encoding="utf-8"), encoding="utf-8")
    uri = uri_of(problem)

    async def scenario(s: Session) -> str:
        s.open(uri, problem.read_text(encoding="utf-8"))
        result = await s.client.workspace_execute_command_async(lsp.ExecuteCommandParams(
            "dualize.writeLatex", [uri, {"standalone": True}]))
        assert Path(result["path"]) == tmp_path / "margin.tex"
        derived = await s.client.workspace_execute_command_async(lsp.ExecuteCommandParams(
            "dualize.deriveDual", [uri]))
        assert await s.stop() == 0
        return derived["markdown"]

    markdown = run(scenario)
    written = (tmp_path / "margin.tex").read_text(encoding="utf-8")
    assert "\\begin{document}" in written and "{maximize}" in written
    # the same texts as the command line gives for the file
    assert written == _derive_cli(problem, "latex", "--standalone")
    assert markdown == _derive_cli(problem, "markdown")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["margin.prob", "margin.tex"]


def _derive_cli(problem: Path, fmt: str, *options: str) -> str:
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-m", "dualize", "derive", str(problem), "--format",
                           fmt, *options], capture_output=True, text=True, env=env,
                          timeout=120, check=True)
    return done.stdout


def test_project_settings_choose_the_findings(tmp_path: Path) -> None:
    """[tool.dualize] of the pyproject.toml above the file applies, as for `dualize lint`."""
    (tmp_path / "pyproject.toml").write_text('[tool.dualize]\nignore = ["unused"]\n',
                                             encoding="utf-8")
    folder = tmp_path / "models"
    folder.mkdir()
    text = "data q in R\nminimize x^2 over x in R\n"
    uri = uri_of(folder / "settings.prob")

    async def scenario(s: Session) -> None:
        s.open(uri, text)
        assert await s.diagnostics(uri, version=1) == []
        s.open("untitled:same", text)  # no project: the defaults report the unused data
        found = await s.diagnostics("untitled:same", version=1)
        assert [d.code for d in found] == ["unused-data"]
        assert await s.stop() == 0

    run(scenario)


def test_code_actions_honour_the_requested_kinds(tmp_path: Path) -> None:
    uri = uri_of(tmp_path / "typos.prob")

    async def scenario(s: Session) -> None:
        s.open(uri, TYPOS)
        found = await s.diagnostics(uri, version=1)
        whole = lsp.Range(lsp.Position(0, 0), lsp.Position(6, 0))
        for only, kinds in ((["quickfix"], {"quickfix"}), (["source"], set()), (None,
                                                                               {"quickfix"})):
            actions = await s.client.text_document_code_action_async(lsp.CodeActionParams(
                _doc(uri), whole, lsp.CodeActionContext(diagnostics=found, only=only)))
            assert {str(getattr(a.kind, "value", a.kind)) for a in actions} == kinds
        s.replace(uri, TYPOS.replace("abs(x - a)", "|x - a|").replace("x / d", "x ./ d"), 2)
        await s.diagnostics(uri, version=2)
        actions = await s.client.text_document_code_action_async(lsp.CodeActionParams(
            _doc(uri), whole, lsp.CodeActionContext(diagnostics=[], only=["source"])))
        # (pygls's client reads these answers as bare commands; the titles are what
        # it keeps faithfully)
        assert [a.title for a in actions] == ["Derive the Lagrange dual (Markdown)",
                                              "Write the dual's LaTeX beside the file"]
        assert await s.stop() == 0

    run(scenario)

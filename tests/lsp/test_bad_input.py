"""Hostile and mistaken input: the server answers with a protocol error, an empty
result or a diagnostic, and stays up (common practice for language servers: the
protocol's error codes, JSON-RPC 2.0 section 5.1, and LSP's RequestCancelled)."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest
from lsprotocol import types as lsp
from pygls.exceptions import JsonRpcException

from tests.lsp.client import ROOT, Session, matching, run

INVALID_PARAMS = -32602
REQUEST_FAILED = -32803
REQUEST_CANCELLED = -32800
GOOD = "minimize x^2 over x in R\nsubject to\n  c: x >= 1\n"


async def _still_answers(s: Session, uri: str) -> None:
    found = await s.client.text_document_document_symbol_async(
        lsp.DocumentSymbolParams(lsp.TextDocumentIdentifier(uri)))
    assert found is not None


def test_unknown_document_and_bad_commands_get_protocol_errors() -> None:
    async def scenario(s: Session) -> None:
        unknown = lsp.TextDocumentIdentifier("file:///nowhere/never-opened.prob")
        with pytest.raises(JsonRpcException) as err:
            await s.client.text_document_hover_async(
                lsp.HoverParams(unknown, lsp.Position(0, 0)))
        assert err.value.code == INVALID_PARAMS
        with pytest.raises(JsonRpcException) as err:
            await s.client.workspace_execute_command_async(
                lsp.ExecuteCommandParams("dualize.deriveDual", []))
        assert err.value.code == INVALID_PARAMS
        s.open("untitled:broken", "minimize x over\n")
        await s.diagnostics("untitled:broken")
        with pytest.raises(JsonRpcException) as err:
            await s.client.workspace_execute_command_async(
                lsp.ExecuteCommandParams("dualize.deriveDual", ["untitled:broken"]))
        assert err.value.code == REQUEST_FAILED and "nothing was derived" in err.value.message
        s.open("untitled:good", GOOD)
        with pytest.raises(JsonRpcException) as err:
            await s.client.workspace_execute_command_async(
                lsp.ExecuteCommandParams("dualize.writeLatex", ["untitled:good"]))
        assert err.value.code == REQUEST_FAILED and "not a file on disk" in err.value.message
        assert await s.stop() == 0

    run(scenario)


def test_binary_and_huge_documents_get_diagnostics() -> None:
    binary = bytes(range(256)).decode("latin-1") * 4
    huge = "minimize x over x in R\n" + "# filler line of a huge file\n" * 40_000

    async def scenario(s: Session) -> None:
        s.open("untitled:binary", binary)
        found = await s.diagnostics("untitled:binary")
        assert found and found[0].severity == lsp.DiagnosticSeverity.Error
        hover = await s.client.text_document_hover_async(lsp.HoverParams(
            lsp.TextDocumentIdentifier("untitled:binary"), lsp.Position(0, 3)))
        assert hover is None
        s.open("untitled:huge", huge)
        found = await s.diagnostics("untitled:huge")
        assert [d.code for d in found] == ["file-too-large"]
        await _still_answers(s, "untitled:huge")
        assert await s.stop() == 0

    run(scenario)


def test_cancelled_derivation_answers_request_cancelled() -> None:
    async def scenario(s: Session) -> None:
        s.open("untitled:good", GOOD)
        params = lsp.ExecuteCommandParams("dualize.deriveDual", ["untitled:good"])
        pending = s.client.protocol.send_request_async(lsp.WORKSPACE_EXECUTE_COMMAND, params,
                                                       msg_id="derive-1")
        s.client.protocol.notify(lsp.CANCEL_REQUEST, lsp.CancelParams(id="derive-1"))
        with pytest.raises(JsonRpcException) as err:
            await pending
        assert err.value.code == REQUEST_CANCELLED
        found = await s.diagnostics("untitled:good")
        assert not matching(found, severity=lsp.DiagnosticSeverity.Error)
        result = await s.client.workspace_execute_command_async(params)
        assert "markdown" in result  # the next request for the same text is answered
        assert await s.stop() == 0

    run(scenario)


def _frame(body: bytes) -> bytes:
    return b"Content-Length: %d\r\n\r\n" % len(body) + body


def test_malformed_messages_do_not_end_the_server() -> None:
    """Garbage bodies, unknown methods and a request before anything else are
    answered or ignored; the server still answers the next request and exits 0."""
    messages = [
        _frame(b"{this is not json"),
        _frame(json.dumps({"jsonrpc": "2.0", "id": 1, "method": "initialize",
                           "params": {"capabilities": {}}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "id": 2, "method": "no/suchMethod",
                           "params": {}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "id": 3, "method": "textDocument/hover",
                           "params": {"textDocument": 5}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "method": "textDocument/didChange", "params": {
            "textDocument": {"uri": "file:///never/opened.prob", "version": 2},
            "contentChanges": [{"text": "minimize x over x in R"}]}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "method": "textDocument/didClose", "params": {
            "textDocument": {"uri": "untitled:never-opened"}}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "id": 5, "method": "workspace/executeCommand",
                           "params": {"command": "no.such.command"}}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "id": 4, "method": "shutdown"}).encode()),
        _frame(json.dumps({"jsonrpc": "2.0", "method": "exit"}).encode()),
    ]
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-m", "dualize", "serve"], input=b"".join(messages),
                          capture_output=True, env=env, timeout=60)
    replies = [json.loads(part.split(b"\r\n\r\n", 1)[1]) for part in
               done.stdout.split(b"Content-Length: ")[1:]]
    by_id = {r.get("id"): r for r in replies}
    assert "capabilities" in by_id[1]["result"]
    assert by_id[2]["error"]["code"] == -32601  # method not found
    assert by_id[3]["error"]["code"] == INVALID_PARAMS
    assert by_id[5]["error"]["code"] == INVALID_PARAMS
    assert by_id[4]["result"] is None
    assert done.returncode == 0
    assert b"Traceback" not in done.stdout + done.stderr
    assert b"window/showMessage" not in done.stdout  # a client's slip is logged, not shown


def test_positions_follow_the_encoding_the_client_offers() -> None:
    """A client that counts in UTF-32 gets code-point columns; the default is UTF-16,
    where a character outside the Basic Multilingual Plane counts twice (LSP 3.17,
    position encodings)."""
    text = 'title "\U0001d53c" zz\nminimize x over x in R\n'
    utf32 = lsp.ClientCapabilities(general=lsp.GeneralClientCapabilities(
        position_encodings=[lsp.PositionEncodingKind.Utf32]))
    for capabilities, column in ((utf32, 10), (None, 11)):
        async def scenario(s: Session) -> int:
            s.open("untitled:wide", text)
            [found] = await s.diagnostics("untitled:wide")
            assert await s.stop() == 0
            return found.range.start.character

        assert run(scenario, capabilities=capabilities) == column


def test_a_vanished_client_ends_the_server() -> None:
    """Standard input closing without `exit` (the editor died) ends the server with
    exit code 1, as the protocol's `exit` without `shutdown` does."""
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-m", "dualize", "serve"], input=b"",
                          capture_output=True, env=env, timeout=60)
    assert done.returncode == 1 and done.stdout == b""
    assert b"Traceback" not in done.stderr

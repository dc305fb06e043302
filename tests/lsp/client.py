"""A real LSP client (pygls's) driving ``dualize serve`` as a process over stdio."""

from __future__ import annotations

import asyncio
import os
import sys
from collections import defaultdict
from collections.abc import Awaitable, Callable
from pathlib import Path
from typing import Any, TypeVar

from lsprotocol import types as lsp
from pygls.lsp.client import LanguageClient

ROOT = Path(__file__).resolve().parents[2]
T = TypeVar("T")


class Session:
    """The client, the diagnostics it received (by URI), and helpers to wait for them."""

    def __init__(self, capabilities: lsp.ClientCapabilities | None = None) -> None:
        self.capabilities = capabilities or lsp.ClientCapabilities()
        self.client = LanguageClient("dualize-tests", "1")
        self.published: dict[str, list[lsp.PublishDiagnosticsParams]] = defaultdict(list)
        self.arrived = asyncio.Event()

        def on_diagnostics(params: lsp.PublishDiagnosticsParams) -> None:
            self.published[params.uri].append(params)
            self.arrived.set()

        self.client.feature(lsp.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)(on_diagnostics)

    async def start(self, *options: str) -> None:
        env = {**os.environ, "PYTHONPATH": str(ROOT)}
        await self.client.start_io(sys.executable, "-m", "dualize", "serve", *options,
                                   env=env, cwd=str(ROOT))
        await self.client.initialize_async(lsp.InitializeParams(
            capabilities=self.capabilities, process_id=os.getpid(),
            root_uri=ROOT.as_uri()))
        self.client.initialized(lsp.InitializedParams())

    def open(self, uri: str, text: str, version: int = 1) -> None:
        self.client.text_document_did_open(lsp.DidOpenTextDocumentParams(
            lsp.TextDocumentItem(uri=uri, language_id="dualize", version=version, text=text)))

    def replace(self, uri: str, text: str, version: int) -> None:
        """Replace the whole text (a full-document change event)."""
        self.client.text_document_did_change(lsp.DidChangeTextDocumentParams(
            lsp.VersionedTextDocumentIdentifier(uri=uri, version=version),
            [lsp.TextDocumentContentChangeWholeDocument(text=text)]))

    async def diagnostics(self, uri: str, version: int | None = None,
                          timeout: float = 30) -> list[lsp.Diagnostic]:
        """The first diagnostics published for ``uri`` (at ``version`` when given)."""
        async def wait() -> list[lsp.Diagnostic]:
            while True:
                for p in self.published.get(uri, []):
                    if version is None or p.version == version:
                        return list(p.diagnostics)
                self.arrived.clear()
                await self.arrived.wait()

        return await asyncio.wait_for(wait(), timeout)

    async def stop(self) -> int | None:
        """Shut down and exit as the protocol asks; the server's exit code."""
        await asyncio.wait_for(self.client.shutdown_async(None), 20)
        self.client.exit(None)
        server = self.client._server
        code = await asyncio.wait_for(server.wait(), 20) if server is not None else None
        await asyncio.wait_for(self.client.stop(), 20)
        return code


def run(scenario: Callable[[Session], Awaitable[T]], timeout: float = 120,
        *options: str, capabilities: lsp.ClientCapabilities | None = None) -> T:
    """Run ``scenario`` against a fresh server, bounded in time; the server is ended
    (and its exit code checked by the scenario) before this returns."""
    async def main() -> T:
        session = Session(capabilities)
        await session.start(*options)
        try:
            return await scenario(session)
        finally:
            server = session.client._server
            if server is not None and server.returncode is None:
                server.kill()
                await server.wait()

    return asyncio.run(asyncio.wait_for(main(), timeout))


def uri_of(path: Path) -> str:
    return path.resolve().as_uri()


def position_of(text: str, needle: str, extra: int = 0) -> lsp.Position:
    """The protocol position of the first ``needle`` in ``text`` (ASCII text)."""
    at = text.index(needle) + extra
    line = text.count("\n", 0, at)
    return lsp.Position(line, at - (text.rfind("\n", 0, at) + 1))


def matching(items: list[Any], **fields: Any) -> list[Any]:
    return [i for i in items if all(getattr(i, k) == v for k, v in fields.items())]

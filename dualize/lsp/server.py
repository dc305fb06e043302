"""The language server: protocol requests wired to the functions of this package.

Diagnostics are published on open and, debounced, on change; hovers, symbols,
definitions, completions and code actions answer from the snapshot of the
current version; two commands derive the dual (Markdown back to the editor,
LaTeX written beside the file).  Every piece of work runs in a worker thread
under a time limit (``budget.Limits``); a request for a document that is not
open, or one that runs out of time, gets a protocol error, never a crash.
"""

from __future__ import annotations

import asyncio
import logging
from collections.abc import Callable
from typing import Any, TypeVar
from urllib.parse import unquote

from lsprotocol import types as lsp
from pygls.exceptions import JsonRpcException, JsonRpcInvalidParams
from pygls.lsp.server import LanguageServer

from dualize.errors import DualizeError
from dualize.lsp import actions, convert, fixes, hover, navigate
from dualize.lsp.budget import Limits
from dualize.lsp.positions import TextMap, encoding_name
from dualize.lsp.protocol import ProblemProtocol
from dualize.lsp.state import Snapshot
from dualize.lsp.tasks import Work

T = TypeVar("T")
GRACE = 10.0  # seconds a request waits past the engine's deadline for it to wrap up
DERIVE = "dualize.deriveDual"
WRITE_LATEX = "dualize.writeLatex"


class RequestFailed(JsonRpcException):
    """The protocol's RequestFailed: a valid request whose work could not be done."""

    CODE = -32803


class ProblemServer(LanguageServer):
    """pygls's server with dualize's state: worker pools, snapshots, time limits."""

    def __init__(self, limits: Limits, version: str) -> None:
        super().__init__("dualize", version, protocol_cls=ProblemProtocol,
                         text_document_sync_kind=lsp.TextDocumentSyncKind.Incremental)
        self.limits = limits
        self.work = Work()
        self.pending: dict[str, asyncio.Task[None]] = {}
        self.shown: set[str] = set()

    def report_server_error(self, error: Exception, source: Any) -> None:
        """A notification that could not be handled (a change to a document that was
        never opened, say) is the client's slip: log it, do not alarm the user."""
        logging.getLogger(__name__).warning("ignored a message that could not be handled: "
                                            "%s: %s", type(error).__name__, error)

    def text_map(self, snap: Snapshot) -> TextMap:
        return TextMap(snap.text, encoding_name(self.workspace.position_encoding))

    async def current(self, uri: str) -> Snapshot:
        """The snapshot of the open document's current text (an error if it is not open)."""
        doc = self.workspace.text_documents.get(unquote(uri))
        if doc is None:
            raise JsonRpcInvalidParams(f"{uri} is not open: open it before asking about it")
        try:
            return await self.work.snapshot(uri, doc.version, doc.source, self.limits.lint)
        except TimeoutError as err:
            raise RequestFailed(f"reading {uri} took longer than {self.limits.lint:.0f} s") \
                from err

    def schedule(self, uri: str, delay: float) -> None:
        """Lint the document after ``delay`` seconds, unless it changes again before."""
        old = self.pending.pop(uri, None)
        if old is not None:
            old.cancel()
        self.pending[uri] = asyncio.ensure_future(self._lint_later(uri, delay))

    async def _lint_later(self, uri: str, delay: float) -> None:
        await asyncio.sleep(delay)
        try:
            snap = await self.current(uri)
        except RequestFailed as err:  # reading the text ran out of time: say so
            doc = self.workspace.text_documents.get(unquote(uri))
            self.text_document_publish_diagnostics(lsp.PublishDiagnosticsParams(
                uri, [convert.notice(f"dualize: {err.message}; no findings are shown")],
                doc.version if doc is not None else None))
            return
        except JsonRpcException:
            return  # closed in the meantime
        self._show_config_error(snap)
        try:
            done = await self.work.analysed(snap, self.limits.lint)
        except TimeoutError:
            self.publish(snap, snap.front_end, convert.notice(
                f"The analysis did not finish within {self.limits.lint:.0f} s; only the "
                "syntax and name checks are shown."))
            return
        except Exception as err:  # noqa: BLE001 - an internal error, said in one line
            self.publish(snap, snap.front_end, convert.notice(
                f"internal error in the analysis ({type(err).__name__}: {err}); only the "
                "syntax and name checks are shown."))
            return
        self.publish(done, done.findings or ())

    def publish(self, snap: Snapshot, found: tuple, *extra: lsp.Diagnostic) -> None:
        latest = self.work.snapshots.get(snap.uri)
        if latest is not None and latest.version != snap.version:
            return  # a newer version is on its way
        items = convert.all_to_protocol(found, self.text_map(snap), snap.uri) + list(extra)
        self.text_document_publish_diagnostics(
            lsp.PublishDiagnosticsParams(uri=snap.uri, diagnostics=items, version=snap.version))

    def _show_config_error(self, snap: Snapshot) -> None:
        if snap.config_error and snap.config_error not in self.shown:
            self.shown.add(snap.config_error)
            self.window_show_message(lsp.ShowMessageParams(
                lsp.MessageType.Warning, f"dualize: {snap.config_error}; using the defaults"))

    async def ask(self, job: Callable[..., T], *args: Any) -> T:
        """A question about a document (symbols, definition, completion, a hover's
        text) answered in a worker under the hover's time limit."""
        try:
            return await self.work.run(self.work.lint_pool, self.limits.hover, job, *args)
        except TimeoutError as err:
            raise RequestFailed(f"the answer took longer than {self.limits.hover:.1f} s") \
                from err

    async def derived(self, snap: Snapshot, limit: float) -> actions.Derived:
        """The derivation of the snapshot, as a protocol error when it cannot be had."""
        try:
            return await self.work.derived(snap, limit, self.limits.derive)
        except DualizeError as err:
            raise RequestFailed(err.message) from err
        except TimeoutError as err:
            raise RequestFailed(f"the derivation did not finish within {limit:.0f} s") from err
        except Exception as err:  # noqa: BLE001 - an internal error, said in one line
            raise RequestFailed(f"internal error in the derivation: {type(err).__name__}: "
                                f"{err}") from err


def build(limits: Limits | None = None, version: str = "0") -> ProblemServer:
    """A server with every feature registered."""
    server = ProblemServer(limits or Limits(), version)
    _documents(server)
    _questions(server)
    _commands(server)
    return server


def _documents(server: ProblemServer) -> None:
    @server.feature(lsp.TEXT_DOCUMENT_DID_OPEN)
    def opened(ls: ProblemServer, params: lsp.DidOpenTextDocumentParams) -> None:
        ls.schedule(params.text_document.uri, 0.0)

    @server.feature(lsp.TEXT_DOCUMENT_DID_CHANGE)
    def changed(ls: ProblemServer, params: lsp.DidChangeTextDocumentParams) -> None:
        ls.schedule(params.text_document.uri, ls.limits.debounce)

    @server.feature(lsp.TEXT_DOCUMENT_DID_SAVE)
    def saved(ls: ProblemServer, params: lsp.DidSaveTextDocumentParams) -> None:
        ls.schedule(params.text_document.uri, 0.0)

    @server.feature(lsp.TEXT_DOCUMENT_DID_CLOSE)
    def closed(ls: ProblemServer, params: lsp.DidCloseTextDocumentParams) -> None:
        uri = params.text_document.uri
        task = ls.pending.pop(uri, None)
        if task is not None:
            task.cancel()
        ls.work.forget(uri)
        ls.text_document_publish_diagnostics(lsp.PublishDiagnosticsParams(uri, []))


def _questions(server: ProblemServer) -> None:
    @server.feature(lsp.TEXT_DOCUMENT_HOVER)
    async def hovered(ls: ProblemServer, params: lsp.HoverParams) -> lsp.Hover | None:
        return await _hover(ls, params)

    @server.feature(lsp.TEXT_DOCUMENT_DEFINITION)
    async def defined(ls: ProblemServer, params: lsp.DefinitionParams) -> lsp.Location | None:
        snap = await ls.current(params.text_document.uri)
        text = ls.text_map(snap)
        return await ls.ask(navigate.definition, snap, text.offset(params.position), text)

    @server.feature(lsp.TEXT_DOCUMENT_DOCUMENT_SYMBOL)
    async def outline(ls: ProblemServer, params: lsp.DocumentSymbolParams) -> list[Any]:
        snap = await ls.current(params.text_document.uri)
        return await ls.ask(navigate.symbols, snap, ls.text_map(snap))

    @server.feature(lsp.TEXT_DOCUMENT_COMPLETION,
                    lsp.CompletionOptions(trigger_characters=["^", "("]))
    async def complete(ls: ProblemServer, params: lsp.CompletionParams) -> lsp.CompletionList:
        snap = await ls.current(params.text_document.uri)
        text = ls.text_map(snap)
        items = await ls.ask(navigate.completions, snap, text.offset(params.position),
                             ls.work.last_parsed.get(snap.uri), text)
        return lsp.CompletionList(is_incomplete=False, items=items)

    @server.feature(lsp.TEXT_DOCUMENT_CODE_ACTION, lsp.CodeActionOptions(
        code_action_kinds=[lsp.CodeActionKind.QuickFix, lsp.CodeActionKind.Source]))
    async def act(ls: ProblemServer, params: lsp.CodeActionParams) -> list[lsp.CodeAction]:
        snap = await ls.current(params.text_document.uri)
        found = await ls.ask(_quick_fixes, ls.text_map(snap), snap, params.range)
        found += _source_actions(snap)
        only = params.context.only
        return [a for a in found if not only or any(_kind(a.kind).startswith(_kind(k))
                                                     for k in only)]


async def _hover(ls: ProblemServer, params: lsp.HoverParams) -> lsp.Hover | None:
    snap = await ls.current(params.text_document.uri)
    text = ls.text_map(snap)
    derivation, pending = None, None
    if snap.loaded.problem is not None:
        try:
            derivation = (await ls.derived(snap, ls.limits.hover)).derivation
        except RequestFailed as err:
            pending = "The dual is still being derived; hover again in a moment." if \
                isinstance(err.__cause__, TimeoutError) else f"No dual: {err.message}."
    found = await ls.ask(hover.hover_text, snap, text.offset(params.position), derivation,
                         pending)
    if found is None:
        return None
    content, mention = found
    where = text.span_range(mention.span) if mention is not None else None
    return lsp.Hover(lsp.MarkupContent(lsp.MarkupKind.Markdown, content), where)


def _quick_fixes(text: TextMap, snap: Snapshot, wanted: lsp.Range) -> list[lsp.CodeAction]:
    out = []
    for found in snap.front_end:
        fix = fixes.fix_for(found, snap.text)
        where = text.span_range(found.span)
        if fix is None or not _overlap(where, wanted):
            continue
        edit = lsp.TextEdit(text.offset_range(fix.start, fix.end), fix.new_text)
        out.append(lsp.CodeAction(
            title=fix.title, kind=lsp.CodeActionKind.QuickFix, is_preferred=True,
            diagnostics=[convert.to_protocol(found, text, snap.uri)],
            edit=lsp.WorkspaceEdit(changes={snap.uri: [edit]})))
    return out


def _kind(kind: object) -> str:
    """A code action kind's text (``source``, ``quickfix``), enum or plain string."""
    return str(getattr(kind, "value", kind))


def _overlap(a: lsp.Range, b: lsp.Range) -> bool:
    def key(p: lsp.Position) -> tuple[int, int]:
        return p.line, p.character

    return key(a.start) <= key(b.end) and key(b.start) <= key(a.end)


def _source_actions(snap: Snapshot) -> list[lsp.CodeAction]:
    if snap.loaded.problem is None:
        return []
    derive = lsp.Command(title="Derive the Lagrange dual (Markdown)", command=DERIVE,
                         arguments=[snap.uri])
    out = [lsp.CodeAction(derive.title, kind=lsp.CodeActionKind.Source, command=derive)]
    if snap.file is not None:
        latex = lsp.Command(title="Write the dual's LaTeX beside the file", command=WRITE_LATEX,
                            arguments=[snap.uri])
        out.append(lsp.CodeAction(latex.title, kind=lsp.CodeActionKind.Source, command=latex))
    return out


def _commands(server: ProblemServer) -> None:
    @server.command(DERIVE)
    async def derive_dual(ls: ProblemServer, *args: Any) -> dict[str, str]:
        snap = await ls.current(_uri_argument(args))
        derived = await ls.derived(snap, ls.limits.derive + GRACE)
        try:
            text = await ls.work.run(ls.work.derive_pool, ls.limits.derive, actions.markdown,
                                     derived)
        except TimeoutError as err:
            raise RequestFailed("rendering the derivation took too long") from err
        return {"uri": snap.uri, "markdown": text}

    @server.command(WRITE_LATEX)
    async def write_latex(ls: ProblemServer, *args: Any) -> dict[str, str]:
        snap = await ls.current(_uri_argument(args))
        standalone = bool(len(args) > 1 and isinstance(args[1], dict)
                          and args[1].get("standalone"))
        try:
            actions.latex_target(snap)
            derived = await ls.derived(snap, ls.limits.derive + GRACE)
            path = await ls.work.run(ls.work.derive_pool, ls.limits.derive, actions.write_latex,
                                     snap, derived, standalone)
        except DualizeError as err:
            raise RequestFailed(err.message) from err
        except TimeoutError as err:
            raise RequestFailed("writing the LaTeX took too long") from err
        return {"uri": snap.uri, "path": str(path)}


def _uri_argument(args: tuple[Any, ...]) -> str:
    first = args[0] if args else None
    if isinstance(first, dict):
        first = first.get("uri")
    if not isinstance(first, str):
        raise JsonRpcInvalidParams("the command takes the document's URI as its first argument")
    return first

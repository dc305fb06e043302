"""The server's work in threads: snapshots, lint findings and derivations per version.

The event loop never runs the front end, the analysis or the engine itself:
they go to worker pools (one for lint work, one for derivations, so that a long
derivation cannot starve the diagnostics), and the loop waits on them under the
request's time limit.  Results are kept per document version, so a hover and
the derive command on the same text share one derivation.
"""

from __future__ import annotations

import asyncio
from collections.abc import Callable
from concurrent.futures import Future, ThreadPoolExecutor
from typing import Any, TypeVar

from dualize.lsp.actions import Derived, derive_snapshot
from dualize.lsp.state import Snapshot, analysed, snapshot
from dualize.syntax import ast

T = TypeVar("T")


class Work:
    """Worker pools and the per-version results of the open documents."""

    def __init__(self) -> None:
        self.lint_pool = ThreadPoolExecutor(2, thread_name_prefix="dualize-lint")
        self.derive_pool = ThreadPoolExecutor(1, thread_name_prefix="dualize-derive")
        self.snapshots: dict[str, Snapshot] = {}
        self.jobs: dict[tuple[str, str], tuple[object, Future[Any]]] = {}
        self.last_parsed: dict[str, ast.Document] = {}

    async def run(self, pool: ThreadPoolExecutor, limit: float, job: Callable[..., T],
                  *args: Any) -> T:
        """``job(*args)`` in ``pool``, waited for at most ``limit`` seconds
        (``TimeoutError`` after that; the job's result is then dropped)."""
        loop = asyncio.get_running_loop()
        return await asyncio.wait_for(loop.run_in_executor(pool, job, *args), limit)

    async def shared(self, kind: str, snap_key: tuple[str, object],
                     pool: ThreadPoolExecutor, limit: float, job: Callable[..., T],
                     *args: Any) -> T:
        """One computation of ``kind`` per document version, shared by every request
        that waits for it: a request that gives up (time limit, cancellation) leaves it
        running for the next, and a newer version's job cancels an older one that has
        not started yet."""
        uri, version = snap_key
        kept = self.jobs.get((kind, uri))
        if kept is None or kept[0] != version or kept[1].cancelled():
            if kept is not None:
                kept[1].cancel()
            kept = (version, pool.submit(job, *args))
            self.jobs[(kind, uri)] = kept
        return await asyncio.wait_for(asyncio.shield(asyncio.wrap_future(kept[1])), limit)

    async def snapshot(self, uri: str, version: int | None, text: str,
                       limit: float) -> Snapshot:
        """The front end of this version of the document (computed once per version)."""
        known = self.snapshots.get(uri)
        if known is not None and known.version == version and known.text == text:
            return known
        # the text is part of the key: a document reopened under the same version
        snap = await self.shared("read", (uri, (version, hash(text))), self.lint_pool, limit,
                                 snapshot, uri, version, text)
        self._keep(snap)
        return snap

    async def analysed(self, snap: Snapshot, limit: float) -> Snapshot:
        """The snapshot with its lint findings."""
        if snap.findings is not None:
            return snap
        done = await self.shared("lint", (snap.uri, snap.version), self.lint_pool, limit,
                                 analysed, snap)
        self._keep(done)
        return done

    def _keep(self, snap: Snapshot) -> None:
        """Keep the newest version; for one version, keep the one with findings."""
        if snap.document is not None:
            self.last_parsed[snap.uri] = snap.document
        known = self.snapshots.get(snap.uri)
        if known is not None and known.version == snap.version and known.text == snap.text \
                and known.findings is not None and snap.findings is None:
            return
        if known is not None and (known.version or 0) > (snap.version or 0):
            return
        self.snapshots[snap.uri] = snap

    async def derived(self, snap: Snapshot, limit: float, seconds: float) -> Derived:
        """The derivation of this version, shared by every request that asks for it: the
        engine stops by itself after ``seconds``; a request waits at most ``limit``."""
        return await self.shared("derive", (snap.uri, snap.version), self.derive_pool, limit,
                                 derive_snapshot, snap, seconds)

    def forget(self, uri: str) -> None:
        self.snapshots.pop(uri, None)
        for key in [k for k in self.jobs if k[1] == uri]:
            self.jobs.pop(key)[1].cancel()
        self.last_parsed.pop(uri, None)

    def close(self) -> None:
        for pool in (self.lint_pool, self.derive_pool):
            pool.shutdown(wait=False, cancel_futures=True)

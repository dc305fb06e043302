"""Benchmark: diagnostics from the language server against a `dualize lint` process.

Run from the repository root:

    OPENBLAS_NUM_THREADS=1 OMP_NUM_THREADS=1 python bench/bench_lsp.py [--repeat 5]

One server is started (``dualize serve``) and driven by pygls's client over
stdio, as an editor drives it.  For every bundled example it measures the time
from opening the document to receiving its published diagnostics, and from a
one-character change to the diagnostics of the new version (this includes the
0.15 s pause the server waits for typing to stop); the document is closed
between repetitions, so nothing is cached.  In the same run it times a
``dualize lint FILE`` process on the same file.  Both are medians; the
target is a ratio of at most 0.5.  The server's first answer (it imports the
analysis on first use) is reported apart.  The findings of both are compared:
the same rule ids at the same lines.
"""

from __future__ import annotations

import argparse
import asyncio
import json
import os
import statistics
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path

from lsprotocol import types as lsp
from pygls.lsp.client import LanguageClient

ROOT = Path(__file__).resolve().parents[1]
EXAMPLES = ROOT / "examples"
ENV = dict(os.environ, NO_COLOR="1", PYTHONPATH=str(ROOT))


def lint_process(path: Path, repeat: int) -> tuple[float, list[tuple[str, int]]]:
    """Median seconds of `dualize lint --format json FILE`, and its findings."""
    times, out = [], ""
    for _ in range(repeat):
        start = time.perf_counter()
        done = subprocess.run([sys.executable, "-m", "dualize", "lint", "--format", "json",
                               str(path)], capture_output=True, text=True, env=ENV, cwd=ROOT)
        times.append(time.perf_counter() - start)
        out = done.stdout
    found = sorted((d["rule"], d["line"]) for d in json.loads(out)) if out.strip() else []
    return statistics.median(times), found


class Timer:
    """Opens documents and waits for their diagnostics."""

    def __init__(self, client: LanguageClient) -> None:
        self.client = client
        self.arrived: dict[str, asyncio.Future[list[lsp.Diagnostic]]] = {}

        def on_diagnostics(params: lsp.PublishDiagnosticsParams) -> None:
            waiting = self.arrived.get(params.uri)
            if waiting is not None and not waiting.done() and params.version is not None:
                waiting.set_result(list(params.diagnostics))

        client.feature(lsp.TEXT_DOCUMENT_PUBLISH_DIAGNOSTICS)(on_diagnostics)

    async def once(self, path: Path) -> tuple[float, float, list[lsp.Diagnostic]]:
        """Seconds to the diagnostics after opening, then after a one-character change
        (which waits out the debounce), and the findings on opening."""
        uri, text = path.resolve().as_uri(), path.read_text(encoding="utf-8")
        start = time.perf_counter()
        found = await self._wait(uri, lambda: self.client.text_document_did_open(
            lsp.DidOpenTextDocumentParams(lsp.TextDocumentItem(uri, "dualize", 1, text))))
        opened = time.perf_counter() - start
        start = time.perf_counter()
        version = lsp.VersionedTextDocumentIdentifier(version=2, uri=uri)
        await self._wait(uri, lambda: self.client.text_document_did_change(
            lsp.DidChangeTextDocumentParams(version, [
                lsp.TextDocumentContentChangeWholeDocument(text + " ")])))
        changed = time.perf_counter() - start
        self.client.text_document_did_close(lsp.DidCloseTextDocumentParams(
            lsp.TextDocumentIdentifier(uri)))
        return opened, changed, found

    async def _wait(self, uri: str, send: Callable[[], None]) -> list[lsp.Diagnostic]:
        self.arrived[uri] = asyncio.get_running_loop().create_future()
        send()
        return await asyncio.wait_for(self.arrived[uri], 120)


async def server_times(paths: list[Path], repeat: int) -> dict[str, object]:
    client = LanguageClient("bench", "1")
    timer = Timer(client)
    await client.start_io(sys.executable, "-m", "dualize", "serve", env=ENV, cwd=str(ROOT))
    await client.initialize_async(lsp.InitializeParams(capabilities=lsp.ClientCapabilities()))
    client.initialized(lsp.InitializedParams())
    first, _, _ = await timer.once(paths[0])
    out: dict[str, object] = {"first_answer_s": first}
    for path in paths:
        runs = [await timer.once(path) for _ in range(repeat)]
        out[path.name] = (statistics.median(r[0] for r in runs),
                          statistics.median(r[1] for r in runs),
                          sorted((str(d.code), d.range.start.line + 1) for d in runs[0][2]
                                 if d.code))
    await client.shutdown_async(None)
    client.exit(None)
    await client.stop()
    return out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5)
    parser.add_argument("--out", default=str(ROOT / "bench" / "lsp_results.json"))
    args = parser.parse_args()
    paths = sorted(EXAMPLES.glob("*.prob"))
    served = asyncio.run(server_times(paths, args.repeat))
    rows = []
    for path in paths:
        opened, changed, found = served[path.name]  # type: ignore[misc]
        lint_s, lint_found = lint_process(path, args.repeat)
        rows.append({"example": path.name, "server_open_s": round(opened, 4),
                     "server_change_s": round(changed, 4), "lint_process_s": round(lint_s, 4),
                     "ratio_open": round(opened / lint_s, 4),
                     "ratio_change": round(changed / lint_s, 4),
                     "same_findings": found == lint_found})
        print(f"{path.name:28} open {opened * 1000:7.1f} ms  change {changed * 1000:7.1f} ms"
              f"  lint process {lint_s * 1000:7.1f} ms  ratios {opened / lint_s:5.3f} "
              f"{changed / lint_s:5.3f}  same findings: {found == lint_found}")
    summary = {"examples": rows, "first_answer_s": round(served["first_answer_s"], 4),  # type: ignore[arg-type]
               "target": 0.5, "repeat": args.repeat}
    for key in ("ratio_open", "ratio_change"):
        values = [r[key] for r in rows]
        summary[f"max_{key}"] = max(values)
        summary[f"median_{key}"] = round(statistics.median(values), 4)
    print(f"first answer (cold) {summary['first_answer_s']} s; on opening: ratio median "
          f"{summary['median_ratio_open']}, max {summary['max_ratio_open']}; after a change "
          f"(with the debounce): median {summary['median_ratio_change']}, max "
          f"{summary['max_ratio_change']} (target <= 0.5)")
    Path(args.out).write_text(json.dumps(summary, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()

"""Benchmark: diagnostics from the language server against a `dualize lint` process.

Run from the repository root:

    OPENBLAS_NUM_THREADS=1 OMP_NUM_THREADS=1 python bench/bench_lsp.py [--repeat 5]

One server is started (``dualize serve``) and driven by pygls's client over
stdio, as an editor drives it.  For every bundled example it measures the time
from opening the document to receiving its published diagnostics (the document
is closed between repetitions, so nothing is cached), and in the same run the
time of a ``dualize lint FILE`` process on the same file.  Both are medians; the
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

    async def once(self, path: Path) -> tuple[float, list[lsp.Diagnostic]]:
        uri = path.resolve().as_uri()
        self.arrived[uri] = asyncio.get_running_loop().create_future()
        start = time.perf_counter()
        self.client.text_document_did_open(lsp.DidOpenTextDocumentParams(lsp.TextDocumentItem(
            uri, "dualize", 1, path.read_text(encoding="utf-8"))))
        found = await asyncio.wait_for(self.arrived[uri], 120)
        seconds = time.perf_counter() - start
        self.client.text_document_did_close(lsp.DidCloseTextDocumentParams(
            lsp.TextDocumentIdentifier(uri)))
        return seconds, found


async def server_times(paths: list[Path], repeat: int) -> dict[str, object]:
    client = LanguageClient("bench", "1")
    timer = Timer(client)
    await client.start_io(sys.executable, "-m", "dualize", "serve", env=ENV, cwd=str(ROOT))
    await client.initialize_async(lsp.InitializeParams(capabilities=lsp.ClientCapabilities()))
    client.initialized(lsp.InitializedParams())
    first, _ = await timer.once(paths[0])
    out: dict[str, object] = {"first_answer_s": first}
    for path in paths:
        runs = [await timer.once(path) for _ in range(repeat)]
        out[path.name] = (statistics.median(t for t, _ in runs),
                          sorted((str(d.code), d.range.start.line + 1) for d in runs[0][1]
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
    rows, ratios = [], []
    for path in paths:
        seconds, found = served[path.name]  # type: ignore[misc]
        lint_s, lint_found = lint_process(path, args.repeat)
        ratios.append(seconds / lint_s)
        rows.append({"example": path.name, "server_s": round(seconds, 4),
                     "lint_process_s": round(lint_s, 4), "ratio": round(seconds / lint_s, 4),
                     "same_findings": found == lint_found})
        print(f"{path.name:32} server {seconds * 1000:8.1f} ms   lint process "
              f"{lint_s * 1000:8.1f} ms   ratio {seconds / lint_s:6.3f}   "
              f"same findings: {found == lint_found}")
    summary = {"examples": rows, "first_answer_s": round(served["first_answer_s"], 4),  # type: ignore[arg-type]
               "max_ratio": round(max(ratios), 4),
               "median_ratio": round(statistics.median(ratios), 4), "target": 0.5,
               "repeat": args.repeat}
    print(f"first answer (cold) {summary['first_answer_s']} s; ratio median "
          f"{summary['median_ratio']}, max {summary['max_ratio']} (target <= 0.5)")
    Path(args.out).write_text(json.dumps(summary, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()

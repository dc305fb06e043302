"""The lint runner: files and folders in, every diagnostic of every file out.

Each file is loaded (syntax and resolution); a file that resolves is then handed
to the analysis stage (``dualize.analysis.analyze``), with the numeric evaluator
when an instance is given.  The report is in a stable order: files sorted by
path, diagnostics by position.  ``rule_table`` assembles every stage's kinds of
finding: the runner sits above the stages, so it may import them all.
"""

from __future__ import annotations

import os
from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dualize.diagnostics import SEVERITY_ORDER, Diagnostic, RuleKind, table_of
from dualize.errors import DualizeError

if TYPE_CHECKING:
    from dualize.model.loading import Loaded

PROBLEM_SUFFIX = ".prob"
PARALLEL_FROM = 5  # below this many files, starting worker processes costs more than it saves


@dataclass(frozen=True)
class FileReport:
    path: str
    source: str
    diagnostics: tuple[Diagnostic, ...]


@dataclass(frozen=True)
class LintReport:
    files: tuple[FileReport, ...]

    @property
    def diagnostics(self) -> tuple[Diagnostic, ...]:
        return tuple(d for f in self.files for d in f.diagnostics)

    @property
    def sources(self) -> dict[str, str]:
        return {f.path: f.source for f in self.files}

    def count(self, severity: str) -> int:
        return sum(1 for d in self.diagnostics if d.severity == severity)

    def worst(self) -> str | None:
        """The highest severity found, or None for a clean run."""
        found = [d.severity for d in self.diagnostics]
        return max(found, key=SEVERITY_ORDER.__getitem__) if found else None


def collect_files(paths: Iterable[str | Path]) -> list[Path]:
    """Files as given, folders searched recursively for *.prob, in sorted order."""
    found: list[Path] = []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found.extend(sorted(p for p in path.rglob(f"*{PROBLEM_SUFFIX}") if p.is_file()))
        elif path.is_file():
            found.append(path)
        else:
            raise DualizeError(f"no such file or folder: {raw}", exit_code=2)
    return sorted(dict.fromkeys(found), key=str)


def lint_paths(paths: Sequence[str | Path], jobs: int | None = None,
               data: str | None = None) -> LintReport:
    """Lint every problem file under ``paths``, on ``jobs`` processes (default: every core)
    when there are at least PARALLEL_FROM files; the report keeps the sorted file order.
    ``data`` is an instance file for a single problem (Slater's condition on its values)."""
    files = collect_files(paths)
    if data is not None:
        if len(files) != 1:
            raise DualizeError("--data applies to exactly one problem file", exit_code=2)
        return LintReport((lint_file(files[0], data),))
    workers = min(jobs or os.cpu_count() or 1, len(files))
    if len(files) < PARALLEL_FROM or workers < 2:
        return LintReport(tuple(lint_file(p) for p in files))
    from concurrent.futures import ProcessPoolExecutor

    _warm_up()
    with ProcessPoolExecutor(max_workers=workers) as pool:
        return LintReport(tuple(pool.map(lint_file, files)))


def _warm_up() -> None:
    """Import the front end and the analysis and build the parser before the workers
    start, so that forked workers inherit them instead of each paying for them."""
    from dualize.model.loading import load
    from dualize.syntax.parser import lark_parser

    lark_parser()
    load("minimize x over x in R\n")
    analysis_hook()


def lint_file(path: str | Path, data: str | None = None) -> FileReport:
    from dualize.model import load_file

    return _report(load_file(path), str(path), lambda: _source(path), data)


def lint_text(text: str, path: str = "<string>") -> FileReport:
    """Lint a problem's text as if it were the file ``path``: what an editor holds
    before it is saved gets the same rules as ``dualize lint`` on the saved file."""
    from dualize.model import load

    return lint_loaded(load(text.removeprefix("\ufeff"), path), path, text)


def lint_loaded(loaded: Loaded, path: str, text: str) -> FileReport:
    """The lint report of a problem already loaded from ``text`` (the front end's
    diagnostics and, when it resolved, the analysis's)."""
    return _report(loaded, path, lambda: text, None)


def _report(loaded: Loaded, path: str, source: Callable[[], str],
            data: str | None) -> FileReport:
    found = list(loaded.diagnostics)
    problem = loaded.problem
    analyze = analysis_hook()
    if problem is not None and analyze is not None:
        found.extend(analyze(problem, **_instance(problem, data)).diagnostics)
    text = problem.source if problem is not None else source()
    return FileReport(path, text, tuple(sorted(found, key=_position)))


def _instance(problem: object, data: str | None) -> dict[str, object]:
    """The analysis's keyword arguments for the instance in ``data``, if given: its
    values and the numeric evaluator (passed down, so analysis imports no numeric)."""
    if data is None:
        return {}
    from dualize.numeric.evaluate import evaluate_2d
    from dualize.numeric.instance import read_instance

    return {"instance": read_instance(data, problem),  # type: ignore[arg-type]
            "evaluate": evaluate_2d}


def analysis_hook() -> Callable[..., Any] | None:
    """The analysis stage's entry point (``dualize.analysis.analyze``); one function, so
    that a test of the front end alone can put a stand-in (or None: no analysis) in its
    place."""
    from dualize.analysis import analyze

    return analyze


def rule_table() -> dict[str, RuleKind]:
    """Every kind of finding of every stage, by id (sorted); ids are unique."""
    from dualize.analysis.rules import KINDS as ANALYSIS
    from dualize.model.rules import KINDS as MODEL
    from dualize.paper.rules import KINDS as PAPER
    from dualize.syntax.rules import KINDS as SYNTAX

    return table_of(SYNTAX, MODEL, ANALYSIS, PAPER)


def _source(path: str | Path) -> str:
    try:
        return Path(path).read_text(encoding="utf-8-sig")
    except (OSError, UnicodeDecodeError):
        return ""


def _position(d: Diagnostic) -> tuple[int, int, str, str]:
    line, column = (d.span.line, d.span.column) if d.span else (0, 0)
    return line, column, d.rule, d.message

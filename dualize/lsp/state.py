"""What the server knows about one version of one open document.

A ``Snapshot`` is built in a worker thread from the text alone: the front end's
result (syntax tree, resolved problem, their diagnostics) first, the analysis's
findings after, filtered by the ``[tool.dualize]`` settings of the project that
holds the file, exactly as ``dualize lint`` filters them.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path
from urllib.parse import unquote, urlparse

from dualize.diagnostics import Diagnostic
from dualize.errors import DualizeError
from dualize.lint_config import LintConfig
from dualize.model.loading import Loaded
from dualize.syntax import ast


@dataclass(frozen=True)
class Snapshot:
    """One version of a document: its text, front end and (once run) lint findings."""

    uri: str
    version: int | None
    text: str
    path: str
    file: Path | None
    loaded: Loaded
    document: ast.Document | None
    config: LintConfig
    config_error: str | None = None
    findings: tuple[Diagnostic, ...] | None = None

    @property
    def front_end(self) -> tuple[Diagnostic, ...]:
        """The syntax and resolution diagnostics, filtered by the settings."""
        return self.config.filter(self.loaded.diagnostics)

    def with_findings(self, found: tuple[Diagnostic, ...]) -> Snapshot:
        return replace(self, findings=self.config.filter(found))


def file_of(uri: str) -> Path | None:
    """The file a ``file:`` URI names, or None for other schemes (unsaved buffers)."""
    parsed = urlparse(uri)
    if parsed.scheme != "file":
        return None
    return Path(unquote(parsed.path))


def config_for(file: Path | None) -> tuple[LintConfig, str | None]:
    """The settings of the project that holds ``file`` (searched upwards from its
    folder, as ``dualize lint`` searches from the working folder); a bad
    pyproject.toml gives the defaults and the message that says why."""
    from dualize.lint_config import checked, load_config

    start = file.parent if file is not None else Path.cwd()
    try:
        config = checked(load_config(start))
    except DualizeError as err:
        return LintConfig(), err.message
    return config, None


def snapshot(uri: str, version: int | None, text: str) -> Snapshot:
    """Parse and resolve one version of a document (no analysis yet)."""
    from dualize.model import load
    from dualize.syntax.parser import parse

    file = file_of(uri)
    path = str(file) if file is not None else uri
    if text.startswith("\ufeff"):  # a byte-order mark: blank it, keeping every column
        text = " " + text[1:]
    config, error = config_for(file)
    parsed = parse(text, path)
    return Snapshot(uri, version, text, path, file, load(text, path), parsed.document,
                    config, error)


def analysed(snap: Snapshot) -> Snapshot:
    """The snapshot with the lint findings of ``dualize lint`` (front end and analysis)."""
    from dualize.lint import lint_loaded

    return snap.with_findings(lint_loaded(snap.loaded, snap.path, snap.text).diagnostics)

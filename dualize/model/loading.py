"""Text or file -> typed problem: the front end's one entry point.

``load`` never raises on user text; ``load_file`` raises ``DualizeError`` (exit
code 2) only when the file cannot be read at all.  A file that is not UTF-8 is
reported as a diagnostic, like any other defect of its content.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from dualize.diagnostics import Diagnostic, make
from dualize.errors import DualizeError
from dualize.model.problem import Problem
from dualize.model.resolve import resolve
from dualize.syntax import rules as R
from dualize.syntax.parser import ParseResult, parse
from dualize.syntax.span import Span


@dataclass(frozen=True)
class Loaded:
    """The problem (None when the file has errors) and every diagnostic found."""

    problem: Problem | None
    diagnostics: tuple[Diagnostic, ...]

    @property
    def ok(self) -> bool:
        return self.problem is not None


def load(text: str, path: str = "<string>") -> Loaded:
    """Parse and resolve one problem's text."""
    return load_parsed(parse(text, path), text, path)


def load_parsed(parsed: ParseResult, text: str, path: str = "<string>") -> Loaded:
    """Resolve a problem already parsed from ``text`` (for callers that keep the syntax
    tree too, such as the language server, so the text is parsed once)."""
    if parsed.document is None:
        return Loaded(None, parsed.diagnostics)
    problem, diagnostics = resolve(parsed.document, text, path)
    return Loaded(problem, parsed.diagnostics + diagnostics)


def load_file(path: str | Path) -> Loaded:
    """Read a problem file (UTF-8) and load it."""
    name = str(path)
    try:
        raw = Path(path).read_bytes()
    except OSError as err:
        raise DualizeError(f"cannot read {name}: {err.strerror or err}", exit_code=2) from err
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as err:
        return Loaded(None, (_not_utf8(raw, err, name),))
    return load(text.removeprefix("\ufeff"), name)


def _not_utf8(raw: bytes, err: UnicodeDecodeError, path: str) -> Diagnostic:
    before = raw[:err.start]
    line = before.count(b"\n") + 1
    column = len(before) - (before.rfind(b"\n") + 1) + 1
    span = Span(line, column, line, column + 1, err.start, err.start + 1)
    return make(R.NOT_UTF8, path, span, byte=f"{raw[err.start]:02X}", offset=err.start,
                hint="save the file as UTF-8 text")

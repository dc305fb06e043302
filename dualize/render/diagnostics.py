"""Diagnostics for people (compiler style, with the source line) and for programs (JSON).

Passes return diagnostics as data; this module is the only place that turns them
into text, so every command shows findings the same way.
"""

from __future__ import annotations

from collections.abc import Iterable

from dualize.diagnostics import Diagnostic


def format_diagnostic(d: Diagnostic, source: str | None = None) -> str:
    """``file:line:col: severity[rule]: message``, the source line, an underline, the hint."""
    where = f"{d.path}:{d.span.line}:{d.span.column}" if d.span else d.path
    lines = [f"{where}: {d.severity}[{d.rule}]: {d.message}"]
    excerpt = _excerpt(d, source)
    lines.extend(excerpt)
    if d.hint:
        lines.append(f"  hint: {d.hint}")
    lines.extend(f"  note: {note}" for note in d.notes)
    return "\n".join(lines)


def format_text(diagnostics: Iterable[Diagnostic], sources: dict[str, str] | None = None) -> str:
    """All diagnostics, one block each, separated by blank lines."""
    sources = sources or {}
    blocks = [format_diagnostic(d, sources.get(d.path)) for d in diagnostics]
    return "\n\n".join(blocks)


def _excerpt(d: Diagnostic, source: str | None) -> list[str]:
    if source is None or d.span is None:
        return []
    all_lines = source.splitlines()
    if not 1 <= d.span.line <= len(all_lines):
        return []
    text = all_lines[d.span.line - 1]
    if len(text) > 200:
        return []
    number = str(d.span.line)
    gutter = " " * len(number)
    start = max(d.span.column - 1, 0)
    stop = d.span.end_column - 1 if d.span.end_line == d.span.line else len(text)
    width = max(stop - start, 1)
    pad = "".join(ch if ch == "\t" else " " for ch in text[:start])
    underline = "^" + "~" * (width - 1)
    return [f" {number} | {text}", f" {gutter} | {pad}{underline}"]


def diagnostic_dict(d: Diagnostic) -> dict[str, object]:
    """The JSON form of one diagnostic (1-based lines and columns, end exclusive)."""
    span = d.span
    return {
        "rule": d.rule,
        "severity": d.severity,
        "message": d.message,
        "path": d.path,
        "line": span.line if span else None,
        "column": span.column if span else None,
        "end_line": span.end_line if span else None,
        "end_column": span.end_column if span else None,
        "hint": d.hint,
    }


def diagnostics_json(diagnostics: Iterable[Diagnostic]) -> list[dict[str, object]]:
    return [diagnostic_dict(d) for d in diagnostics]


def diagnostics_markdown(diagnostics: Iterable[Diagnostic], files: int) -> str:
    """A Markdown table of findings (place, severity, rule, message) under a summary."""
    found = list(diagnostics)
    errors = sum(1 for d in found if d.severity == "error")
    warnings = sum(1 for d in found if d.severity == "warning")
    head = f"**{files} file(s) checked: {errors} error(s), {warnings} warning(s)**"
    if not found:
        return head
    rows = [f"| `{_place(d)}` | {d.severity} | `{d.rule}` | {markdown_cell(d.message)} |"
            for d in found]
    return "\n".join([head, "", "| where | severity | rule | message |", "|---|---|---|---|",
                      *rows])


def _place(d: Diagnostic) -> str:
    return f"{d.path}:{d.span.line}:{d.span.column}" if d.span else d.path


def markdown_cell(text: str) -> str:
    """Text safe inside a Markdown table cell: pipes escaped, one line."""
    return text.replace("|", "\\|").replace("\n", " ")

"""The library entry points behind the command line."""

from __future__ import annotations

from pathlib import Path

from dualize.deadline import Deadline
from dualize.diagnostics import Diagnostic
from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from dualize.model.problem import Problem


class ProblemError(DualizeError):
    """A problem file with errors: the diagnostics travel with it (exit code 1)."""

    def __init__(self, diagnostics: tuple[Diagnostic, ...], source: str) -> None:
        from dualize.render.diagnostics import format_text

        path = diagnostics[0].path if diagnostics else "<string>"
        super().__init__(format_text(diagnostics, {path: source}), exit_code=1)
        self.diagnostics = diagnostics


def load_problem(source: str | Path | Problem) -> Problem:
    """A resolved problem from text, a path, or a problem (returned as is)."""
    from dualize.model import load, load_file

    if isinstance(source, Problem):
        return source
    is_path = isinstance(source, Path) or (
        "\n" not in source and source.endswith(".prob") and Path(source).exists())
    loaded = load_file(source) if is_path else load(str(source))
    errors = tuple(d for d in loaded.diagnostics if d.severity == "error")
    if loaded.problem is None or errors:
        text = Path(source).read_text(encoding="utf-8", errors="replace") if is_path else str(
            source)
        raise ProblemError(errors or loaded.diagnostics, text)
    return loaded.problem


def derive(source: str | Path | Problem, deadline: Deadline | None = None) -> Derivation:
    """The derivation of ``source``; past ``deadline`` unfinished steps are kept and noted."""
    from dualize.duality.engine import derive as _derive

    return _derive(load_problem(source), deadline)


def write_atomically(path: str, text: str) -> None:
    """Write ``text`` to ``path`` (``-`` is standard output) so that a failure leaves no
    partial file and an existing file untouched; the rules are in ``dualize.outfile``."""
    from dualize.outfile import write_output

    write_output(path, text)


def render(derivation: Derivation, fmt: str, analysis: object | None,
           standalone: bool = False, color: bool = False) -> str:
    """The derivation in one of the output formats."""
    if fmt == "latex":
        from dualize.render.latex import render_latex

        return render_latex(derivation, analysis, standalone=standalone)  # type: ignore[arg-type]
    if fmt == "markdown":
        from dualize.render.markdown import render_markdown

        return render_markdown(derivation, analysis)  # type: ignore[arg-type]
    if fmt == "json":
        from dualize.render.json_out import render_json

        return render_json(derivation, analysis)  # type: ignore[arg-type]
    from dualize.render.text import render_text

    return render_text(derivation, analysis, color=color)  # type: ignore[arg-type]

"""The library's one way in: each job of the command line as one documented function.

The commands in ``dualize.commands`` parse options, call one function here and
format its result; a notebook or a script calls the same functions.  Results
are data objects that show themselves in a notebook (``_repr_latex_``,
``_repr_markdown_``).  This module sits above every stage, so it is the place
where what a lower stage needs from a higher one is passed in (the numeric
evaluator to the analysis, the printers to the derivation's display).
"""

from __future__ import annotations

import os
import tempfile
from dataclasses import dataclass, fields
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dualize.diagnostics import Diagnostic
from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from dualize.model.problem import Problem

if TYPE_CHECKING:
    from dualize.analysis.report import Analysis


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


def analyze(problem: Problem, instance: Any | None = None) -> Analysis:
    """Convexity, constraint classes, the strong-duality verdict and the lint findings.

    ``instance`` (an ``Instance`` or a mapping name -> value) decides Slater's
    condition on numbers; the numeric evaluator is handed to the analysis here.
    """
    from dualize.analysis import analyze as _analyze

    if instance is None:
        return _analyze(problem)
    from dualize.numeric.evaluate import evaluate_2d

    return _analyze(problem, instance, evaluate_2d)


@dataclass(frozen=True)
class DerivedDual(Derivation):
    """A derivation that shows itself in a notebook: the primal and its dual in display
    math (LaTeX) or as a Markdown document.  ``analysis`` is the strong-duality verdict
    and the lint findings, when they were asked for."""

    analysis: Analysis | None = None

    def _repr_latex_(self) -> str:
        from dualize.render.latex import repr_latex

        return repr_latex(self)

    def _repr_markdown_(self) -> str:
        from dualize.render.markdown import repr_markdown

        return repr_markdown(self)


def shown(derivation: Derivation, analysis: Analysis | None = None) -> DerivedDual:
    """``derivation`` with its notebook display (and ``analysis`` beside it)."""
    return DerivedDual(*(getattr(derivation, f.name) for f in fields(Derivation)),
                       analysis=analysis)


def derive(source: str | Path | Problem) -> DerivedDual:
    """The dual of a problem given as text, a path to a ``.prob`` file, or resolved."""
    from dualize.duality import derive as _derive

    return shown(_derive(load_problem(source)))


def write_atomically(path: str, text: str) -> None:
    """Write ``text`` to ``path`` so that a failure leaves no partial file and an
    existing file untouched: a temporary file in the same folder, then a rename."""
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=".dualize-", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as handle:
            handle.write(text)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


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

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


def write_bytes_atomically(path: str, data: bytes) -> None:
    """``write_atomically`` for any content (a PNG picture), by the same rules."""
    from dualize.outfile import write_output

    write_output(path, data)


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


def _instance_of(problem: Problem, data: object) -> object:
    """An instance from a path (JSON or TOML) or an ``Instance`` as it is."""
    from dualize.numeric.instance import Instance, read_instance

    if isinstance(data, Instance):
        return data
    return read_instance(str(data), problem)


def prices(source: str | Path | Problem, data: object, limit: int = 200,
           deadline: Deadline | None = None,
           tick: object = None):  # type: ignore[no-untyped-def]
    """Every constraint entry priced on an instance, each rate checked by re-solving.

    Returns a ``Sensitivity`` (a table in a notebook); ``data`` is an instance file's
    path or an ``Instance``; past ``deadline`` the entries left are not checked.
    """
    from dualize.multipliers.sensitivity import sensitivity

    problem = load_problem(source)
    return sensitivity(problem, _instance_of(problem, data), limit, deadline,  # type: ignore[arg-type]
                       tick)  # type: ignore[arg-type]


def other_form(source: str | Path | Problem, weight: str | None = None,
               bound: str | None = None, name: str | None = None):  # type: ignore[no-untyped-def]
    """The penalized and constrained forms of a problem (a ``Pair``), the other one
    written as a problem file's text (``pair.other_text``)."""
    from dualize.multipliers.reform import other_form as _other

    return _other(load_problem(source), weight=weight, bound=bound, new_name=name)


def trade_off(source: object, data: object, weights: list[float] | None = None,
              bounds: list[float] | None = None, weight: str | None = None,
              bound: str | None = None, tick: object = None,
              deadline: Deadline | None = None):  # type: ignore[no-untyped-def]
    """The weight and the bound matched at each value given (a ``Curve``: a table and
    the plot in a notebook).  ``source`` is a problem (or path) or a ``Pair``."""
    from dualize.multipliers.forms import Pair
    from dualize.multipliers.path import Forms, sweep

    if (weights is None) == (bounds is None):
        raise DualizeError("give weights or bounds, not both and not neither", exit_code=2)
    if isinstance(source, Pair):
        pair, original = source, (source.penalized if source.given == "penalized"
                                  else source.constrained)
    else:
        original = load_problem(source)  # type: ignore[arg-type]
        pair = other_form(original, weight=weight, bound=bound)
    instance = _instance_of(original, data)
    given = "weight" if weights is not None else "bound"
    return sweep(Forms(pair, instance), given, list(weights or bounds or []),  # type: ignore[arg-type]
                 tick, deadline)  # type: ignore[arg-type]

"""What ``verify`` and ``check`` share: loading, instances, user errors.

Kept free of heavy imports: the command modules import it at start-up.
"""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING, Any

import click

from dualize.errors import DualizeError

if TYPE_CHECKING:
    from dualize.model.problem import Problem

EXIT_BAD_INPUT = 2
DEFAULT_TIME_LIMIT = 60.0


def time_limit_option(command: Callable[..., Any]) -> Callable[..., Any]:
    """``--time-limit SECONDS``: one budget for every step of the run (docs/index.md)."""
    return click.option(
        "--time-limit", "time_limit", type=click.FloatRange(min=0, min_open=True),
        default=DEFAULT_TIME_LIMIT, show_default=True, metavar="SECONDS",
        help="Stop deriving after this many seconds: what is not done by then is kept "
        "unevaluated and the output says which step was cut.")(command)


def deadline_of(seconds: float) -> Any:
    from dualize.deadline import Deadline

    return Deadline(seconds)


@contextmanager
def user_errors() -> Iterator[None]:
    """A ``DualizeError`` becomes one line on stderr and its exit code, group or not."""
    try:
        yield
    except DualizeError as err:
        diagnostics = getattr(err, "diagnostics", ())
        if diagnostics:
            _print_diagnostics(diagnostics, {d.path: getattr(err, "source", "")
                                             for d in diagnostics})
        click.echo(f"dualize: {err.message}", err=True)
        sys.exit(err.exit_code)


def _print_diagnostics(diagnostics: Any, sources: dict[str, str]) -> None:
    from dualize.render.diagnostics import format_text

    click.echo(format_text(diagnostics, sources), err=True)


def load_problem(path: str, outcome: str = "nothing was checked") -> Problem:
    """The problem in ``path``; its errors are printed and end the command (exit 2)."""
    from dualize.model import load_file

    loaded = load_file(path)
    if loaded.problem is None:
        errors = [d for d in loaded.diagnostics if d.severity == "error"]
        _print_diagnostics(errors, {path: _text(path)})
        raise DualizeError(f"{path}: the problem has errors; {outcome}", EXIT_BAD_INPUT)
    return loaded.problem


def _text(path: str) -> str:
    try:
        return Path(path).read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return ""


def sibling_instance(path: str) -> str | None:
    """The instance beside a problem file: same name with .json, else .toml."""
    for suffix in (".json", ".toml"):
        candidate = Path(path).with_suffix(suffix)
        if candidate.is_file():
            return str(candidate)
    return None


def dims_option(text: str) -> dict[str, int] | None:
    from dualize.numeric.instance import parse_dims

    return parse_dims(text) or None


def progress(items: list[Any], label: str) -> Iterator[Any]:
    """``items`` with a progress bar on stderr when it is a terminal and there are several."""
    if len(items) < 2 or not sys.stderr.isatty():
        yield from items
        return
    with click.progressbar(items, label=label, file=sys.stderr) as bar:
        yield from bar


def each(items: list[Any], label: str, work: Callable[[Any], Any]) -> list[Any]:
    return [work(item) for item in progress(items, label)]


def emit(text: str) -> None:
    click.echo(text)

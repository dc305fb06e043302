"""What the commands share: the one place where a user error becomes an exit code,
progress bars, and printing.

Kept free of heavy imports: the command modules import it at start-up.
"""

from __future__ import annotations

import sys
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from functools import wraps
from typing import Any, NoReturn, TypeVar

import click

from dualize.errors import DualizeError

EXIT_BAD_INPUT = 2
DEFAULT_TIME_LIMIT = 60.0
F = TypeVar("F", bound=Callable[..., Any])


def time_limit_option(command: F) -> F:
    """``--time-limit SECONDS``: one budget for every step of the run (docs/index.md)."""
    return click.option(
        "--time-limit", "time_limit", type=click.FloatRange(min=0, min_open=True),
        default=DEFAULT_TIME_LIMIT, show_default=True, metavar="SECONDS",
        help="Stop deriving after this many seconds: what is not done by then is kept "
        "unevaluated and the output says which step was cut.")(command)


def deadline_of(seconds: float) -> Any:
    """The run's time budget, started when the command runs (``--time-limit``)."""
    from dualize.deadline import Deadline

    return Deadline(seconds)


def version() -> str:
    """The installed version of dualize (package metadata, read only when asked)."""
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as installed

    try:
        return installed("dualize")
    except PackageNotFoundError:
        return "0.1.0"


def report_error(err: DualizeError) -> NoReturn:
    """A user error as the program shows it: the located diagnostics it carries (if any),
    then one line ``dualize: message`` on stderr, and its exit code."""
    diagnostics = getattr(err, "diagnostics", ())
    if diagnostics:
        from dualize.render.diagnostics import format_text

        source = getattr(err, "source", "")
        click.echo(format_text(diagnostics, {d.path: source for d in diagnostics}), err=True)
    click.echo(f"dualize: {err.message}", err=True)
    sys.exit(err.exit_code)


@contextmanager
def user_errors() -> Iterator[None]:
    """A ``DualizeError`` inside becomes ``report_error``'s output and exit code."""
    try:
        yield
    except DualizeError as err:
        report_error(err)


def reports_user_errors(command: F) -> F:
    """A command whose user errors end in ``report_error``, inside the program's group
    or run on its own (each command keeps its exit codes either way)."""
    @wraps(command)
    def run(*args: Any, **kwargs: Any) -> Any:
        with user_errors():
            return command(*args, **kwargs)
    return run  # type: ignore[return-value]


def progress(items: list[Any], label: str) -> Iterator[Any]:
    """``items`` with a progress bar on stderr when it is a terminal and there are several."""
    if len(items) < 2 or not sys.stderr.isatty():
        yield from items
        return
    with click.progressbar(items, label=label, file=sys.stderr) as bar:
        yield from bar


def emit(text: str) -> None:
    click.echo(text)


def emit_json(data: object, ascii_only: bool = True) -> None:
    """JSON, indented by two; ``ascii_only`` escapes characters beyond ASCII."""
    import json

    click.echo(json.dumps(data, indent=2, ensure_ascii=ascii_only))

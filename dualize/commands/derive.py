"""``dualize derive``: the dual of a problem file, in one of the output formats."""

from __future__ import annotations

import os
import sys

import click

from dualize.commands.common import time_limit_option
from dualize.errors import DualizeError


@click.command("derive")
@click.argument("file", type=click.Path())
@click.option("--format", "fmt", type=click.Choice(["text", "latex", "markdown", "json"]),
              default="text", show_default=True, help="The output format.")
@click.option("-o", "--output", type=click.Path(), default=None,
              help="Write to this file, atomically (- is standard output).")
@click.option("--standalone", is_flag=True, help="LaTeX: a complete document for pdflatex.")
@click.option("--data", type=click.Path(), default=None,
              help="An instance (JSON or TOML): strong duality is decided on these values.")
@time_limit_option
def derive_command(file: str, fmt: str, output: str | None, standalone: bool,
                   data: str | None, time_limit: float) -> None:
    """Derive the Lagrange dual of a problem file, with its steps, KKT and recovery."""
    from dualize.analysis import analyze
    from dualize.api import render, write_atomically
    from dualize.commands.common import deadline_of, load_problem, user_errors
    from dualize.duality import derive

    with user_errors():
        if not os.path.isfile(file):
            raise DualizeError(f"{file}: no such problem file", exit_code=2)
        problem = load_problem(file, "nothing was derived")
        derivation = derive(problem, deadline_of(time_limit))
        values = _instance_values(data, problem)
        analysis = analyze(problem, values)
        color = output in (None, "-") and sys.stdout.isatty() and "NO_COLOR" not in os.environ
        text = render(derivation, fmt, analysis, standalone=standalone, color=color)
        if output is None:
            click.echo(text, nl=not text.endswith("\n"))
        else:
            write_atomically(output, text)


def _instance_values(data: str | None, problem):  # type: ignore[no-untyped-def]
    if data is None:
        return None
    from dualize.numeric.instance import read_instance

    return read_instance(data, problem).values

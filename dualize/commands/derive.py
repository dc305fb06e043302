"""``dualize derive``: the dual of a problem file, in one of the output formats."""

from __future__ import annotations

import os
import sys

import click

from dualize.commands.common import reports_user_errors, time_limit_option
from dualize.render.formats import FORMATS


@click.command("derive")
@click.argument("file", type=click.Path())
@click.option("--format", "fmt", type=click.Choice(FORMATS), default="text",
              show_default=True, help="The output format.")
@click.option("-o", "--output", type=click.Path(), default=None,
              help="Write to this file, atomically (- is standard output).")
@click.option("--standalone", is_flag=True, help="LaTeX: a complete document for pdflatex.")
@click.option("--data", type=click.Path(), default=None,
              help="An instance (JSON or TOML): strong duality is decided on these values.")
@time_limit_option
@reports_user_errors
def derive_command(file: str, fmt: str, output: str | None, standalone: bool,
                   data: str | None, time_limit: float) -> None:
    """Derive the Lagrange dual of a problem file, with its steps, KKT and recovery."""
    from dualize import replay
    from dualize.commands.common import deadline_of

    color = output in (None, "-") and sys.stdout.isatty() and "NO_COLOR" not in os.environ
    key = replay.key_of("derive", {"format": fmt, "standalone": standalone, "color": color,
                                   "time_limit": time_limit},
                        {"problem": file, "data": data})
    text = replay.replayed(key)
    if text is None:
        from dualize import api

        deadline = deadline_of(time_limit)
        derived = api.derive(file, data=data, with_analysis=True, time_limit=deadline)
        text = derived.render(fmt, standalone=standalone, color=color)
        if replay.finished(deadline.remaining()):
            replay.keep(key, text)
    if output is None:
        click.echo(text, nl=not text.endswith("\n"))
    else:
        from dualize.outfile import write_output

        write_output(output, text)

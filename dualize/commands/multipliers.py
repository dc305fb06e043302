"""``dualize prices``, ``dualize reform`` and ``dualize trade-off``: what multipliers mean.

Exit codes: 0 for a complete report whose checks all agree, 1 when a check
disagrees, a curve is not monotone or nothing could be priced or matched, 2 for
bad input (an unreadable problem, instance or option).
"""

from __future__ import annotations

import sys
from typing import Any

import click

from dualize.errors import DualizeError

FORMATS = click.Choice(["text", "markdown", "latex", "json"])
STANDALONE = click.option("--standalone", is_flag=True,
                          help="LaTeX: a complete document for pdflatex.")


def problem_for(file: str, outcome: str) -> Any:
    from dualize.api import load_problem

    return load_problem(file, outcome)


def instance_for(file: str, data: str | None, problem: Any) -> Any:
    from dualize.api import instance_of, sibling_instance

    path = data if data is not None else sibling_instance(file)
    if path is None:
        raise DualizeError(f"{file}: no instance: give one with --data (JSON or TOML)",
                           exit_code=2)
    return instance_of(problem, path)


def emit_to(text: str, output: str | None) -> None:
    from dualize.api import write_atomically

    if output is None:
        click.echo(text, nl=not text.endswith("\n"))
    else:
        write_atomically(output, text)


class progress_bar:  # noqa: N801 - used as a context manager, read like a function
    """A progress bar on stderr for long runs, only when stderr is a terminal."""

    def __init__(self, count: int, label: str = "re-solving") -> None:
        self.count, self.label, self.bar = count, label, None

    def __enter__(self) -> Any:
        if self.count < 2 or not sys.stderr.isatty():
            return None
        self.bar = click.progressbar(length=self.count, label=self.label,
                                     file=sys.stderr).__enter__()
        return lambda: self.bar.update(1)  # type: ignore[union-attr]

    def __exit__(self, *exc: object) -> None:
        if self.bar is not None:
            self.bar.__exit__(*exc)


@click.command("prices")
@click.argument("file", type=click.Path())
@click.option("--data", type=click.Path(), default=None,
              help="The instance (JSON or TOML) [default: FILE's sibling .json or .toml].")
@click.option("--format", "fmt", type=FORMATS, default="text", show_default=True,
              help="The output format.")
@click.option("-o", "--output", type=click.Path(), default=None,
              help="Write to this file (atomically) instead of standard output.")
@click.option("--limit", type=click.IntRange(min=0), default=200, show_default=True,
              help="Check the rates of at most this many constraint entries.")
@click.option("--time-limit", type=click.FloatRange(min=0, min_open=True), default=300,
              show_default=True, metavar="SECONDS",
              help="Stop re-solving after this many seconds; entries left are reported "
              "unchecked.")
@STANDALONE
@click.option("--svg", "svg_path", type=click.Path(), default=None,
              help="Also draw the rates as bars, SVG (deterministic).")
@click.option("--png", "png_path", type=click.Path(), default=None,
              help="Also draw the rates as bars, PNG.")
def prices_command(file: str, data: str | None, fmt: str, output: str | None, limit: int,
                   time_limit: float, standalone: bool, svg_path: str | None,
                   png_path: str | None) -> None:
    """Price every constraint of FILE on an instance.

    For each constraint entry: the optimal multiplier, whether it binds, the local
    rate dp*/du = -multiplier (a minimization; + for a maximization) checked by
    re-solving the problem with the entry shifted both ways, and a kink of p* said
    as such.  The global bound p*(u) >= p*(0) - multiplier'u is stated when strong
    duality is established, else refused with the reason.  Exit status: 0 when
    every checked rate agrees, 1 when one disagrees or nothing could be priced,
    2 for bad input.
    """
    from dualize.api import prices
    from dualize.commands.common import deadline_of, user_errors
    from dualize.multipliers.printing import render_sensitivity

    with user_errors():
        problem = problem_for(file, "nothing was priced")
        instance = instance_for(file, data, problem)
        with progress_bar(_entry_count(problem, instance)) as tick:
            report = prices(problem, instance, limit=limit, deadline=deadline_of(time_limit),
                            tick=tick)
        emit_to(render_sensitivity(report, fmt, standalone), output)
        if report.rows:
            _bars(report, svg_path, png_path)
    sys.exit(1 if report.failed_checks() or not report.rows else 0)


def _entry_count(problem: Any, instance: Any) -> int:
    from dualize.api import price_count

    return price_count(problem, instance)


def _bars(report: Any, svg_path: str | None, png_path: str | None) -> None:
    from dualize.api import write_atomically, write_bytes_atomically
    from dualize.multipliers.plot import prices_png, prices_svg

    if svg_path is not None:
        write_atomically(svg_path, prices_svg(report))
    if png_path is not None:
        write_bytes_atomically(png_path, prices_png(report))


@click.command("reform")
@click.argument("file", type=click.Path())
@click.option("--weight", default=None, metavar="NAME",
              help="The data weight of the penalized term to turn into a bound.")
@click.option("--bound", default=None, metavar="LABEL",
              help="The label of the bound r(x) <= t to turn into a penalized term.")
@click.option("--name", default=None,
              help="The name of the new bound t or weight w [default: t or w, made unique].")
@click.option("--format", "fmt", type=FORMATS, default="text", show_default=True,
              help="The output format of the statement.")
@STANDALONE
@click.option("-o", "--output", type=click.Path(), default=None,
              help="Write the other form as a problem file (.prob, atomically).")
def reform_command(file: str, weight: str | None, bound: str | None, name: str | None,
                   fmt: str, standalone: bool, output: str | None) -> None:
    """Write the other form of FILE: penalized <-> constrained.

    From minimize f + w r (w a scalar data weight in R_+ or R_++) the constrained form
    minimize f subject to r <= t, and back from a labelled bound.  States when the two
    have the same solutions and how w and t correspond.  With -o the other form is
    written as a problem file that dualize reads; the statement goes to standard output.
    """
    from dualize.api import other_form, write_atomically
    from dualize.commands.common import user_errors
    from dualize.multipliers.path_print import render_pair

    with user_errors():
        if weight is not None and bound is not None:
            raise DualizeError("give --weight or --bound, not both", exit_code=2)
        pair = other_form(problem_for(file, "nothing was written"), weight=weight, bound=bound,
                          name=name)
        if output is not None:
            write_atomically(output, pair.other_text)
        emit_to(render_pair(pair, fmt, standalone), None)

"""``dualize trade-off``: the weight w and the bound t matched on an instance.

Exit codes: 0 when every point's check agrees and the curve is monotone, 1 when
a check disagrees, a solve fails or the curve is not monotone, 2 for bad input.
"""

from __future__ import annotations

import math
import sys
from typing import Any

import click

from dualize.commands.multipliers import (
    FORMATS,
    STANDALONE,
    emit_to,
    instance_for,
    problem_for,
    progress_bar,
)
from dualize.errors import DualizeError


@click.command("trade-off")
@click.argument("file", type=click.Path())
@click.option("--data", type=click.Path(), default=None,
              help="The instance (JSON or TOML) [default: FILE's sibling .json or .toml].")
@click.option("--weight", default=None, metavar="NAME",
              help="The data weight of the penalized term (when FILE is penalized).")
@click.option("--bound", default=None, metavar="LABEL",
              help="The label of the bound r(x) <= t (when FILE is constrained).")
@click.option("--at-weight", type=float, default=None, metavar="W",
              help="Match this weight: t = r(x*(W)).")
@click.option("--at-bound", type=float, default=None, metavar="T",
              help="Match this bound: w = the bound's optimal multiplier at T.")
@click.option("--sweep-weights", default=None, metavar="LO:HI:N",
              help="The curve over N weights from LO to HI (geometric when LO > 0).")
@click.option("--sweep-bounds", default=None, metavar="LO:HI:N",
              help="The curve over N evenly spaced bounds from LO to HI.")
@click.option("--format", "fmt", type=FORMATS, default="text", show_default=True,
              help="The output format of the table.")
@STANDALONE
@click.option("--time-limit", type=click.FloatRange(min=0, min_open=True), default=600,
              show_default=True, metavar="SECONDS",
              help="Stop matching after this many seconds; values left are listed as not "
              "computed.")
@click.option("-o", "--output", type=click.Path(), default=None,
              help="Write the table to this file (atomically) instead of standard output.")
@click.option("--csv", "csv_path", type=click.Path(), default=None,
              help="Also write the points as CSV.")
@click.option("--svg", "svg_path", type=click.Path(), default=None,
              help="Also draw the curves as SVG (deterministic).")
@click.option("--png", "png_path", type=click.Path(), default=None,
              help="Also draw the curves as PNG.")
def trade_off_command(file: str, data: str | None, weight: str | None, bound: str | None,
                      at_weight: float | None, at_bound: float | None,
                      sweep_weights: str | None, sweep_bounds: str | None, fmt: str,
                      standalone: bool, time_limit: float, output: str | None,
                      csv_path: str | None,
                      svg_path: str | None, png_path: str | None) -> None:
    """Match the weight w of FILE's penalized form with the bound t of its constrained form.

    Give one of --at-weight, --at-bound, --sweep-weights, --sweep-bounds; without one,
    the instance's value of the weight (or bound) is matched.  Every point is checked by
    solving the other form at the matched value, and a swept curve is checked to be
    monotone.  A progress bar shows on standard error when it is a terminal.
    """
    from dualize.api import other_form, trade_off
    from dualize.commands.common import deadline_of, user_errors
    from dualize.multipliers.path_print import render_curve

    with user_errors():
        problem = problem_for(file, "nothing was matched")
        instance = instance_for(file, data, problem)
        pair = other_form(problem, weight=weight, bound=bound)
        given, values = _values(pair, instance, at_weight, at_bound, sweep_weights,
                                sweep_bounds)
        with progress_bar(len(values), "matching") as tick:
            curve = trade_off(pair, instance, **{given: values}, tick=tick,
                              deadline=deadline_of(time_limit))
        emit_to(render_curve(curve, fmt, standalone), output)
        _pictures(curve, csv_path, svg_path, png_path)
    sys.exit(1 if curve.failed() or curve.problems else 0)


def _values(pair: Any, instance: Any, at_weight: float | None, at_bound: float | None,
            sweep_weights: str | None, sweep_bounds: str | None) -> tuple[str, list[float]]:
    from dualize.multipliers.path import grid

    given = [k for k, v in (("w", at_weight), ("t", at_bound), ("ws", sweep_weights),
                            ("ts", sweep_bounds)) if v is not None]
    if len(given) > 1:
        raise DualizeError("give one of --at-weight, --at-bound, --sweep-weights, "
                           "--sweep-bounds", exit_code=2)
    if at_weight is not None or at_bound is not None:
        value = float(at_weight if at_weight is not None else at_bound)  # type: ignore[arg-type]
        if not math.isfinite(value) or (at_weight is not None and value < 0):
            raise DualizeError("the weight must be a finite number >= 0 and the bound a "
                               "finite number", exit_code=2)
        return ("weights" if at_weight is not None else "bounds"), [value]
    if sweep_weights is not None:
        return "weights", grid(sweep_weights, "weight")
    if sweep_bounds is not None:
        return "bounds", grid(sweep_bounds, "bound")
    return _from_instance(pair, instance)


def _from_instance(pair: Any, instance: Any) -> tuple[str, list[float]]:
    """The instance's weight or bound, else a bound written as a number in the file."""
    for key, name in (("weights", pair.weight), ("bounds", pair.bound)):
        value = instance.values.get(name)
        if value is not None:
            return key, [float(value)]
    try:
        return "bounds", [float(pair.bound)]
    except ValueError:
        pass
    raise DualizeError("the instance has no value for the weight or the bound: give "
                       "--at-weight, --at-bound or a sweep", exit_code=2)


def _pictures(curve: Any, csv_path: str | None, svg_path: str | None,
              png_path: str | None) -> None:
    from dualize.api import write_atomically, write_bytes_atomically

    if csv_path is not None:
        from dualize.multipliers.path_print import curve_csv

        write_atomically(csv_path, curve_csv(curve))
    if svg_path is not None:
        from dualize.multipliers.plot import curve_svg

        write_atomically(svg_path, curve_svg(curve))
    if png_path is not None:
        from dualize.multipliers.plot import curve_png

        write_bytes_atomically(png_path, curve_png(curve))

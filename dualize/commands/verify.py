"""``dualize verify``: the derived dual against the primal, numerically.

Exit codes: 0 when every instance shows a zero gap (or every instance is a pair of
infinite optima that weak duality predicts: ``infinite-agree``), 1 for a gap or a failed
check (a weak-duality violation, or no instance with two comparable values),
2 for bad input (an unreadable problem, instance or option).
"""

from __future__ import annotations

import sys

import click

from dualize.commands.common import (
    emit,
    emit_json,
    progress,
    reports_user_errors,
    time_limit_option,
)

DEFAULT_RANDOM = 3


@click.command("verify")
@click.argument("file", type=click.Path())
@click.option("--data", type=click.Path(), default=None,
              help="An instance file (JSON or TOML) to check on.")
@click.option("--random", "count", type=click.IntRange(min=1), default=None,
              help="Check on N random instances instead (seeds S, S+1, ...).")
@click.option("--seed", type=int, default=0, show_default=True,
              help="The first random seed.")
@click.option("--dims", default="", metavar="m=50,n=10",
              help="Sizes for random instances (others are drawn).")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True, help="How to print the report.")
@time_limit_option
@reports_user_errors
def verify_command(file: str, data: str | None, count: int | None, seed: int, dims: str,
                   fmt: str, time_limit: float) -> None:
    """Derive the dual of FILE and compare both optima on instances.

    Without --data or --random, the instance beside FILE (same name, .json or
    .toml) is used if there is one, else 3 random instances.  Exit status: 0 for
    a zero gap everywhere or for infinite optima that agree (primal infeasible and
    dual unbounded, or the reverse), 1 for a gap or a failed check, 2 for bad input.
    """
    from dualize import api

    result = api.verify(file, data=data, random=count, seed=seed, dims=dims,
                        progress=progress, time_limit=time_limit)
    emit_json(result.json()) if fmt == "json" else emit(result.text())
    sys.exit(0 if result.ok else 1)

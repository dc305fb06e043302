"""``dualize check``: a dual written by hand against the derived one.

Exit codes: 0 for the verdicts "equivalent" and "tight, not attained"; 1 for every
other verdict (not tight, invalid, infeasible or unbounded, undecided); 2 for bad
input (an unreadable problem, claim, instance or option).
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


@click.command("check")
@click.argument("file", type=click.Path())
@click.option("--claim", "claim_path", type=click.Path(), required=True,
              help="The claimed dual, a problem file whose variables are the multipliers, "
              "or a LaTeX draft: draft.tex or draft.tex#LABEL (docs/paper-claims.md).")
@click.option("--map", "name_map", default="", metavar="alpha=a,w=w",
              help="For a LaTeX claim: the paper's names = the problem file's names.")
@click.option("--data", type=click.Path(), default=None,
              help="An instance file (JSON or TOML) to check on, besides the random ones.")
@click.option("--random", "count", type=click.IntRange(min=0), default=DEFAULT_RANDOM,
              show_default=True, help="How many random instances (seeds S, S+1, ...).")
@click.option("--seed", type=int, default=0, show_default=True, help="The first random seed.")
@click.option("--dims", default="", metavar="m=50,n=10",
              help="Sizes for random instances (others are drawn).")
@click.option("--save-counterexample", "save_path", type=click.Path(), default=None,
              help="Where to write an instance that refutes the claim "
              "[default: <claim>.counterexample.json].")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text",
              show_default=True, help="How to print the report.")
@time_limit_option
@reports_user_errors
def check_command(file: str, claim_path: str, name_map: str, data: str | None, count: int,
                  seed: int, dims: str, save_path: str | None, fmt: str,
                  time_limit: float) -> None:
    """Check the dual claimed in CLAIM against the dual of FILE.

    The claim may omit the data declarations of FILE.  It is compared
    symbolically and by solving it on instances.  Exit status: 0 for
    "equivalent" and "tight, not attained", 1 for any other verdict, 2 for bad input.
    """
    from dualize import api

    result = api.check(file, claim_path, name_map=name_map, data=data, random=count,
                       seed=seed, dims=dims, save_counterexample=save_path, progress=progress,
                       time_limit=time_limit)
    if result.note:
        click.echo(result.note, err=True)
    emit_json(result.json()) if fmt == "json" else emit(result.text())
    sys.exit(0 if result.ok else 1)

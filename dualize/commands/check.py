"""``dualize check``: a dual written by hand against the derived one.

Exit codes: 0 for the verdicts "equivalent" and "tight, not attained"; 1 for every
other verdict (not tight, invalid, infeasible or unbounded, undecided); 2 for bad
input (an unreadable problem, claim, instance or option).
"""

from __future__ import annotations

import sys
from typing import Any

import click

from dualize.commands.common import (
    dims_option,
    emit,
    load_problem,
    progress,
    time_limit_option,
    user_errors,
)
from dualize.errors import DualizeError

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
def check_command(file: str, claim_path: str, name_map: str, data: str | None, count: int,
                  seed: int, dims: str, save_path: str | None, fmt: str,
                  time_limit: float) -> None:
    """Check the dual claimed in CLAIM against the dual of FILE.

    The claim may omit the data declarations of FILE.  It is compared
    symbolically and by solving it on instances.  Exit status: 0 for
    "equivalent" and "tight, not attained", 1 for any other verdict, 2 for bad input.
    """
    with user_errors():
        report = _run(file, claim_path, data, count, seed, dims, save_path, name_map,
                      time_limit)
        emit(_render(report, fmt))
    sys.exit(0 if report.ok else 1)


def _run(file: str, claim_path: str, data: str | None, count: int, seed: int, dims: str,
         save_path: str | None, name_map: str = "", time_limit: float | None = None) -> Any:
    from dualize.checking import check_claim
    from dualize.checking.counterexample import default_path
    from dualize.deadline import Deadline
    from dualize.duality.engine import derive
    from dualize.numeric.instance import read_instance

    problem = load_problem(file)
    sizes = dims_option(dims)
    text = _claim_text(claim_path, problem, file, name_map)
    instances = [read_instance(data, problem)] if data is not None else []
    if not instances and count == 0:
        raise DualizeError("nothing to check on: give --data or --random N with N >= 1", 2)
    derivation = derive(problem, Deadline(time_limit))
    return check_claim(derivation, text, instances, [seed + k for k in range(count)], sizes,
                       claim_path, save_path or default_path(claim_path.partition("#")[0]),
                       progress=lambda items: progress(items, "checking"))


def _claim_text(claim_path: str, problem: Any, file: str, name_map: str) -> str:
    """A claim file's text, or the claim of a LaTeX draft translated into the language."""
    from dualize.paper.draft import describe, is_paper_path, translation_for
    from dualize.paper.locate import parse_map

    if not is_paper_path(claim_path):
        return _read_claim(claim_path)
    translation = translation_for(claim_path, problem, parse_map(name_map), file)
    click.echo(describe(translation), err=True)
    return translation.text or ""


def _read_claim(path: str) -> str:
    from pathlib import Path

    try:
        return Path(path).read_bytes().decode("utf-8").removeprefix("\ufeff")
    except OSError as err:
        raise DualizeError(f"cannot read {path}: {err.strerror or err}", 2) from None
    except UnicodeDecodeError:
        raise DualizeError(f"{path}: the claim is not UTF-8 text", 2) from None


def _render(report: Any, fmt: str) -> str:
    import json

    from dualize.checking.check_report import check_dict, check_text

    if fmt == "json":
        return json.dumps(check_dict(report), indent=2)
    return check_text(report)

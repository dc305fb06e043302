"""``dualize verify``: the derived dual against the primal, numerically.

Exit codes: 0 when every instance shows a zero gap (or every instance is a pair of
infinite optima that weak duality predicts: ``infinite-agree``), 1 for a gap or a failed
check (a weak-duality violation, or no instance with two comparable values),
2 for bad input (an unreadable problem, instance or option).
"""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING, Any

import click

from dualize.commands.common import (
    deadline_of,
    dims_option,
    each,
    emit,
    load_problem,
    sibling_instance,
    time_limit_option,
    user_errors,
)
from dualize.errors import DualizeError
from dualize.numeric.verify_words import CONSISTENT

if TYPE_CHECKING:
    from dualize.duality.result import Derivation
    from dualize.numeric.instance import Instance

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
def verify_command(file: str, data: str | None, count: int | None, seed: int, dims: str,
                   fmt: str, time_limit: float) -> None:
    """Derive the dual of FILE and compare both optima on instances.

    Without --data or --random, the instance beside FILE (same name, .json or
    .toml) is used if there is one, else 3 random instances.  Exit status: 0 for
    a zero gap everywhere or for infinite optima that agree (primal infeasible and
    dual unbounded, or the reverse), 1 for a gap or a failed check, 2 for bad input.
    """
    with user_errors():
        if data is not None and count is not None:
            raise DualizeError("give --data or --random, not both", exit_code=2)
        problem = load_problem(file)
        sizes = dims_option(dims)
        from dualize.duality.engine import derive

        derivation = derive(problem, deadline_of(time_limit))
        report = run_verify(derivation, _jobs(derivation, file, data, count, seed), sizes)
        emit(_render(report, derivation, fmt))
    sys.exit(0 if report.verdict in ("zero-gap", CONSISTENT) else 1)


def _jobs(derivation: Derivation, file: str, data: str | None, count: int | None,
          seed: int) -> list[tuple[str, Any]]:
    """("data", path) and ("seed", n) items in the order they are checked."""
    path = data if data is not None else (sibling_instance(file) if count is None else None)
    if path is not None:
        return [("data", path)]
    return [("seed", seed + k) for k in range(count or DEFAULT_RANDOM)]


def run_verify(derivation: Derivation, jobs: list[tuple[str, Any]],
               dims: dict[str, int] | None) -> Any:
    """One check per job, with a progress bar when it helps; the library's summary."""
    from dualize.numeric.instance import read_instance
    from dualize.numeric.verify import check_instance, summarize

    instances = [(read_instance(v, derivation.problem), None) if k == "data"
                 else (_random(derivation, dims, v), v) for k, v in jobs]
    checks = each(instances, "verifying", lambda item: check_instance(derivation, *item))
    return summarize(tuple(checks))


def _random(derivation: Derivation, dims: dict[str, int] | None, seed: int) -> Instance:
    from dualize.numeric.dual_data import make_dual_feasible
    from dualize.numeric.instance import random_instance

    return make_dual_feasible(derivation, random_instance(derivation.problem, dims, seed), seed)


def _render(report: Any, derivation: Derivation, fmt: str) -> str:
    import json

    from dualize.analysis.convexity import analyse_convexity
    from dualize.checking.check_report import verify_dict, verify_text

    convex = analyse_convexity(derivation.problem).convex
    if fmt == "json":
        return json.dumps(verify_dict(report, convex), indent=2)
    return verify_text(report, convex, derivation.problem.sense)

"""``dualize solver``: a standalone Python module that solves the dual."""

from __future__ import annotations

import os

import click

from dualize.commands.common import time_limit_option
from dualize.errors import DualizeError


@click.command("solver")
@click.argument("file", type=click.Path())
@click.option("-o", "--output", type=click.Path(), required=True,
              help="The Python module to write (atomically; - is standard output).")
@time_limit_option
def solver_command(file: str, output: str, time_limit: float) -> None:
    """Write a Python module (numpy and scipy only) that solves the dual of FILE on an
    instance, recovers the primal solution and reports the duality gap."""
    from dualize.api import write_atomically
    from dualize.commands.common import deadline_of, load_problem, user_errors
    from dualize.duality import derive
    from dualize.solvergen.solver import render_solver

    with user_errors():
        if not os.path.isfile(file):
            raise DualizeError(f"{file}: no such problem file", exit_code=2)
        problem = load_problem(file, "no solver was written")
        write_atomically(output, render_solver(derive(problem, deadline_of(time_limit))))

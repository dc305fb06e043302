"""``dualize solver``: a standalone Python module that solves the dual."""

from __future__ import annotations

import click

from dualize.commands.common import reports_user_errors, time_limit_option


@click.command("solver")
@click.argument("file", type=click.Path())
@click.option("-o", "--output", type=click.Path(), required=True,
              help="The Python module to write (atomically; - is standard output).")
@time_limit_option
@reports_user_errors
def solver_command(file: str, output: str, time_limit: float) -> None:
    """Write a Python module (numpy and scipy; clarabel for a semidefinite dual) that
    solves the dual of FILE on an instance, recovers the primal solution and reports
    the duality gap with a status word (certified, infeasible, ...)."""
    from dualize import api

    api.write_atomically(output, api.generate_solver(file, time_limit=time_limit).code)

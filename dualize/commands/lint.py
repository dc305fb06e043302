"""``dualize lint``: problem files (and folders of them) checked for mistakes.

Exit codes: 0 when no finding reaches the ``--fail-on`` severity (default:
error), 1 when one does, 2 for bad input (a missing path, an unknown rule id).
"""

from __future__ import annotations

import sys

import click

from dualize.commands.common import emit, emit_json, reports_user_errors, version


@click.command("lint")
@click.argument("paths", nargs=-1, required=True, type=click.Path())
@click.option("--format", "fmt", type=click.Choice(["text", "json", "sarif"]), default="text",
              show_default=True, help="How to print the findings (sarif: SARIF 2.1.0).")
@click.option("--select", multiple=True, metavar="RULES",
              help="Report only these rule ids or id prefixes (comma-separated, repeatable).")
@click.option("--ignore", multiple=True, metavar="RULES",
              help="Do not report these rule ids or id prefixes (comma-separated, repeatable).")
@click.option("--fail-on", type=click.Choice(["error", "warning", "info"]), default=None,
              help="Exit with 1 when a finding is at least this severe [default: error].")
@click.option("--data", type=click.Path(), default=None,
              help="An instance (JSON or TOML data values) for one problem file: decides "
              "Slater's condition and dependent equalities on those values.")
@reports_user_errors
def lint_command(paths: tuple[str, ...], fmt: str, select: tuple[str, ...],
                 ignore: tuple[str, ...], fail_on: str | None, data: str | None) -> None:
    """Check problem files (and folders of *.prob files) for mistakes.

    Settings may also come from [tool.dualize] in pyproject.toml (keys select, ignore,
    fail-on); options given here replace them.
    """
    from dualize import api

    result = api.lint(paths, select=select, ignore=ignore, fail_on=fail_on, data=data)
    if fmt == "sarif":
        emit_json(result.sarif(version()), ascii_only=False)
    elif fmt == "json":
        emit_json(result.json(), ascii_only=False)
    else:
        emit(result.text())
    sys.exit(0 if result.ok else 1)

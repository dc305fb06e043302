"""The command line: thin commands over the library.

Each command reads its options, calls one library function, picks a formatter
and returns an exit code.  User-facing errors (``DualizeError``) are caught in
one place (``DualizeGroup.invoke``); anything else is an internal error, reported
in one line with exit code 3, never as a traceback.  Heavy libraries are
imported inside the commands, so ``dualize --help`` loads click alone.
"""

from __future__ import annotations

import json
import sys
from typing import TYPE_CHECKING

import click

from dualize.errors import DualizeError

if TYPE_CHECKING:
    from dualize.lint import LintReport

EXIT_INTERNAL = 3


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("dualize")
    except PackageNotFoundError:
        return "0.1.0"


class DualizeGroup(click.Group):
    """A click group that turns every failure into one line and an exit code."""

    def invoke(self, ctx: click.Context) -> object:
        _exit_on_terminate()
        _allow_long_numbers()
        try:
            return super().invoke(ctx)
        except DualizeError as err:
            click.echo(f"dualize: {err.message}", err=True)
            ctx.exit(err.exit_code)
        except (click.exceptions.Exit, click.exceptions.Abort, click.ClickException):
            raise
        except Exception as err:  # noqa: BLE001 - the one catch-all of the program
            click.echo(f"internal error: {type(err).__name__}: {err}", err=True)
            ctx.exit(EXIT_INTERNAL)
        return None


PRINTED_DIGITS = 100_000


def _allow_long_numbers() -> None:
    """Python refuses to print integers of more than 4,300 digits (a guard against slow
    conversions).  Numbers a problem may hold are limited when it is read (1,000 digits,
    rule number-too-large); results built from them (a product of a few, a square) stay
    far below this larger bound, so printing never stops on it."""
    if hasattr(sys, "set_int_max_str_digits") and 0 < sys.get_int_max_str_digits() < (
            PRINTED_DIGITS):
        sys.set_int_max_str_digits(PRINTED_DIGITS)


def _exit_on_terminate() -> None:
    """SIGTERM (and SIGHUP) end the run through ``SystemExit``, as Ctrl-C does through
    ``KeyboardInterrupt``, so that ``finally`` blocks run: a temporary output file is
    removed, never left beside its target.  Only here, at the command line."""
    import signal
    import threading

    if threading.current_thread() is not threading.main_thread():
        return

    def terminate(signum: int, frame: object) -> None:
        raise SystemExit(128 + signum)

    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), terminate)


def _print_version(ctx: click.Context, param: click.Parameter, value: bool) -> None:
    """--version, resolved only when asked (package metadata costs start-up time)."""
    if value and not ctx.resilient_parsing:
        click.echo(f"dualize, version {_version()}")
        ctx.exit()


@click.group(cls=DualizeGroup)
@click.option("--version", is_flag=True, expose_value=False, is_eager=True,
              callback=_print_version, help="Show the version and exit.")
def main() -> None:
    """Derive, check and explain Lagrange duals of optimization problems."""


@main.command()
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
def lint(paths: tuple[str, ...], fmt: str, select: tuple[str, ...], ignore: tuple[str, ...],
         fail_on: str | None, data: str | None) -> None:
    """Check problem files (and folders of *.prob files) for mistakes.

    Settings may also come from [tool.dualize] in pyproject.toml (keys select, ignore,
    fail-on); options given here replace them.
    """
    from dualize.lint import lint_paths
    from dualize.lint_config import configured, filtered

    config = configured(select, ignore, fail_on)
    report = filtered(lint_paths(paths, data=data), config)
    _print_lint(report, fmt)
    sys.exit(1 if config.fails(report.diagnostics) else 0)


def _print_lint(report: LintReport, fmt: str) -> None:
    from dualize.render.diagnostics import diagnostics_json, format_text

    diagnostics = report.diagnostics
    if fmt == "sarif":
        from dualize.diagnostics import rule_table
        from dualize.render.sarif import sarif_log

        log = sarif_log(diagnostics, rule_table(), _version())
        click.echo(json.dumps(log, indent=2, ensure_ascii=False))
        return
    if fmt == "json":
        click.echo(json.dumps(diagnostics_json(diagnostics), indent=2, ensure_ascii=False))
        return
    if diagnostics:
        click.echo(format_text(diagnostics, report.sources))
    errors, warnings = report.count("error"), report.count("warning")
    click.echo(f"{len(report.files)} file(s) checked: {errors} error(s), {warnings} warning(s)")



def _register() -> None:
    """The commands that live in their own modules (each imports nothing heavy)."""
    from dualize.commands.check import check_command
    from dualize.commands.check_draft import check_draft_command
    from dualize.commands.derive import derive_command
    from dualize.commands.multipliers import prices_command, reform_command
    from dualize.commands.serve import serve_command
    from dualize.commands.solver import solver_command
    from dualize.commands.trade_off import trade_off_command
    from dualize.commands.verify import verify_command

    for command in (derive_command, verify_command, check_command, check_draft_command,
                    solver_command, prices_command, reform_command, trade_off_command,
                    serve_command):
        main.add_command(command)


_register()

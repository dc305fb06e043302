"""The command line: the program's group and its commands.

Each command (``dualize.commands``) reads its options, calls one function of
``dualize.api`` and formats the result.  A user error (``DualizeError``) becomes
its exit code in one place (``dualize.commands.common.report_error``); anything
else is an internal error, reported in one line with exit code 3, never as a
traceback.  Heavy libraries are imported inside the commands, so ``dualize
--help`` loads click alone.
"""

from __future__ import annotations

import importlib
import sys

import click

from dualize.commands.common import report_error, version
from dualize.errors import DualizeError

EXIT_INTERNAL = 3


class DualizeGroup(click.Group):
    """A click group that turns every failure into one line and an exit code."""

    def invoke(self, ctx: click.Context) -> object:
        _exit_on_terminate()
        _allow_long_numbers()
        try:
            return super().invoke(ctx)
        except DualizeError as err:
            report_error(err)
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
        click.echo(f"dualize, version {version()}")
        ctx.exit()


COMMANDS: dict[str, tuple[str, str]] = {
    "lint": ("lint", "lint_command"),
    "derive": ("derive", "derive_command"),
    "verify": ("verify", "verify_command"),
    "check": ("check", "check_command"),
    "check-draft": ("check_draft", "check_draft_command"),
    "solver": ("solver", "solver_command"),
    "prices": ("multipliers", "prices_command"),
    "reform": ("multipliers", "reform_command"),
    "trade-off": ("trade_off", "trade_off_command"),
    "serve": ("serve", "serve_command"),
}
"""Each command by name: its module in ``dualize.commands`` and the click command there.
A run imports only the module of the command it runs (the others cost a hundredth of a
second at every start); ``--help`` imports them all to list them."""


class LazyCommands(DualizeGroup):
    """The program's group, whose commands are imported when they are asked for."""

    def list_commands(self, ctx: click.Context) -> list[str]:
        return sorted(COMMANDS)

    def get_command(self, ctx: click.Context, cmd_name: str) -> click.Command | None:
        return _register(cmd_name)


@click.group(cls=LazyCommands)
@click.option("--version", is_flag=True, expose_value=False, is_eager=True,
              callback=_print_version, help="Show the version and exit.")
def main() -> None:
    """Derive, check and explain Lagrange duals of optimization problems."""


def _register(name: str) -> click.Command | None:
    """The command ``name`` (each module imports nothing heavy), added to the group once."""
    if name not in main.commands and name in COMMANDS:
        module, attribute = COMMANDS[name]
        main.add_command(getattr(importlib.import_module(f"dualize.commands.{module}"),
                                 attribute), name)
    return main.commands.get(name)


def run() -> None:
    """The process's entry point (the ``dualize`` script, ``python -m dualize``): the
    program, then the end of the process without the interpreter's teardown.

    Tearing down sympy's modules and objects at exit takes a tenth of a second or more,
    a fifth of a short run, and serves nothing in a process that is about to end.  So,
    as is common practice for short-lived processes whose state dies with them
    (Instagram Engineering, "Dismissing Python Garbage Collection at Instagram", 2017,
    from memory), the exit handlers run, the standard streams are flushed and the
    process ends with its exit code.  Every file the program writes is closed before
    (``dualize.outfile``, ``dualize.disk_cache``).  When another thread still runs, the
    exit code is not a number, or a stream cannot be flushed (a closed pipe), the
    interpreter ends the process as usual.  ``main`` itself, as tests and embedding
    programs call it, never ends the process this way.
    """
    try:
        main()
    except SystemExit as stop:
        if stop.code is None or isinstance(stop.code, int):
            _end_process(stop.code or 0)
        raise


def _end_process(code: int) -> None:
    import atexit
    import os
    import threading

    if threading.active_count() > 1:
        return
    atexit._run_exitfuncs()  # the handlers run once, as at a normal exit, then are cleared
    try:
        sys.stdout.flush()
        sys.stderr.flush()
    except (OSError, ValueError):
        return
    os._exit(code)

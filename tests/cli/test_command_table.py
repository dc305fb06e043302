"""The program's commands are found by name and imported only when they run.

``dualize --help`` must list every command (click's own contract for a group, from
click's documentation on lazily loaded subcommands) and a run must load only the module
of its command, so that one command's imports never slow another's start.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

from click.testing import CliRunner

from dualize.cli import COMMANDS, main

ROOT = Path(__file__).resolve().parents[2]


def test_every_named_command_resolves_to_a_command_of_that_name() -> None:
    for name in COMMANDS:
        command = main.get_command(None, name)  # type: ignore[arg-type]
        assert command is not None and command.name == name
        assert command.callback is not None and command.help


def test_help_lists_every_command_in_alphabetical_order() -> None:
    result = CliRunner().invoke(main, ["--help"])
    assert result.exit_code == 0
    listed = [line.split()[0] for line in result.output.split("Commands:")[1].splitlines()
              if line.strip()]
    assert listed == sorted(COMMANDS)


def test_an_unknown_command_is_a_usage_error() -> None:
    result = CliRunner().invoke(main, ["derivee", "x.prob"])
    assert result.exit_code == 2
    assert "No such command 'derivee'" in result.output


def test_a_run_imports_only_its_own_command_module() -> None:
    probe = ("import sys\nfrom dualize.cli import main\n"
             "try:\n    main(['derive', '--help'])\nexcept SystemExit:\n    pass\n"
             "print(sorted(m for m in sys.modules if m.startswith('dualize.commands.')))")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    out = subprocess.run([sys.executable, "-c", probe], env=env, capture_output=True,
                         text=True, timeout=120, check=True).stdout.splitlines()[-1]
    assert out == str(["dualize.commands.common", "dualize.commands.derive"])

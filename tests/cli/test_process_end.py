"""The ``dualize`` process ends without the interpreter's teardown, and nothing is lost.

What must survive an early end is what a normal exit gives (Python documentation,
``os._exit`` and ``atexit``, from memory): the exit code, every byte written to the
standard streams, and the exit handlers.  The interpreter's own ending is kept when
another thread still runs.
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

from click.testing import CliRunner

from dualize.cli import main

ROOT = Path(__file__).resolve().parents[2]
EXAMPLE = ROOT / "examples" / "route_entropy.prob"
PROBE = """
import atexit, sys, threading, time

class Teardown:
    def __del__(self):
        sys.__stderr__.write("TEARDOWN\\n")

kept = Teardown()  # a module global: released only by the interpreter's teardown
atexit.register(lambda: sys.stderr.write("HANDLER\\n"))
if sys.argv[1] == "thread":
    threading.Thread(target=time.sleep, args=(30,), daemon=True).start()
from dualize.cli import run
sys.argv = ["dualize", *sys.argv[2:]]
run()
"""


def _probe(*args: str, cache: Path) -> subprocess.CompletedProcess[str]:
    env = dict(os.environ, PYTHONPATH=str(ROOT), NO_COLOR="1", DUALIZE_CACHE_DIR=str(cache))
    return subprocess.run([sys.executable, "-c", PROBE, *args], env=env, capture_output=True,
                          text=True, timeout=300, cwd=ROOT)


def test_output_and_exit_code_equal_the_in_process_run(tmp_path: Path) -> None:
    args = ["derive", "--format", "latex", str(EXAMPLE)]
    ended = _probe("alone", *args, cache=tmp_path)
    in_process = CliRunner().invoke(main, args, env={"DUALIZE_CACHE": "off"})
    assert ended.returncode == in_process.exit_code == 0
    assert ended.stdout == in_process.output and len(ended.stdout) > 2000
    assert ended.stderr.splitlines() == ["HANDLER"]  # handlers ran; no teardown


def test_an_error_keeps_its_exit_code_and_message(tmp_path: Path) -> None:
    ended = _probe("alone", "derive", str(tmp_path / "absent.prob"), cache=tmp_path)
    assert ended.returncode == 2
    assert ended.stderr.splitlines() == [
        f"dualize: {tmp_path / 'absent.prob'}: no such problem file", "HANDLER"]


def test_with_another_thread_running_the_interpreter_ends_as_usual(tmp_path: Path) -> None:
    ended = _probe("thread", "derive", str(EXAMPLE), cache=tmp_path)
    assert ended.returncode == 0
    assert "HANDLER" in ended.stderr and "TEARDOWN" in ended.stderr

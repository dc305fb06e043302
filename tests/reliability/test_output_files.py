"""Finding 2, ``-o`` damages what it writes to: special files, symlinks, modes, user
errors and the temporary file of an interrupted run."""

from __future__ import annotations

import errno
import os
import signal
import stat
import subprocess
import sys
import tempfile
import textwrap
import time

import pytest

from dualize.errors import DualizeError
from dualize.outfile import write_output
from tests.reliability.helpers import ROOT, dualize, env

EXAMPLE = str(ROOT / "examples" / "joinery_lp.prob")


def _leftovers(folder) -> list[str]:
    return sorted(p for p in os.listdir(folder) if p.startswith(".dualize-"))


def test_finding2_folder_missing_folder_are_user_errors(tmp_path):
    # A user error gets one line and exit 2, not an internal error (exit 3).
    for target in (tmp_path, tmp_path / "missing" / "out.txt"):
        run = dualize("derive", EXAMPLE, "-o", str(target))
        assert run.returncode == 2, run.stderr
        assert run.stderr.count("\n") == 1 and "cannot write" in run.stderr


def test_finding2_read_only_folder_is_a_user_error(tmp_path, monkeypatch):
    # Root may write into a 0555 folder, so the refusal of the file system is simulated
    # where the process is root; elsewhere the real folder is used.
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o555)
    if os.geteuid() == 0:
        def refuse(*args, **kwargs):
            raise PermissionError(errno.EACCES, "Permission denied")
        monkeypatch.setattr(tempfile, "mkstemp", refuse)
    with pytest.raises(DualizeError) as caught:
        write_output(str(folder / "out.txt"), "text\n")
    assert caught.value.exit_code == 2 and "Permission denied" in caught.value.message
    assert not (folder / "out.txt").exists()


def test_finding2_modes_follow_the_umask_and_the_existing_file(tmp_path):
    old = os.umask(0o027)
    try:
        write_output(str(tmp_path / "new.txt"), "a\n")
        existing = tmp_path / "old.txt"
        existing.write_text("before\n")
        existing.chmod(0o644)
        write_output(str(existing), "after\n")
    finally:
        os.umask(old)
    # open(2) gives 0666 minus the umask to a new file (POSIX, common practice).
    assert stat.S_IMODE(os.stat(tmp_path / "new.txt").st_mode) == 0o640
    assert stat.S_IMODE(os.stat(existing).st_mode) == 0o644
    assert existing.read_text() == "after\n"


def test_finding2_symlink_is_written_through(tmp_path):
    target = tmp_path / "real.txt"
    target.write_text("old\n")
    link = tmp_path / "link.txt"
    link.symlink_to(target)
    run = dualize("derive", EXAMPLE, "-o", str(link))
    assert run.returncode == 0, run.stderr
    assert link.is_symlink() and "Lagrangian" in target.read_text()


def test_finding2_fifo_is_written_into_not_replaced(tmp_path):
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    lonely = dualize("derive", EXAMPLE, "-o", str(fifo))
    assert lonely.returncode == 2 and "no process reads" in lonely.stderr
    reader = subprocess.Popen(["cat", str(fifo)], stdout=subprocess.PIPE, text=True)
    time.sleep(0.3)
    run = dualize("derive", EXAMPLE, "-o", str(fifo))
    out, _ = reader.communicate(timeout=60)
    assert run.returncode == 0, run.stderr
    assert "Lagrangian" in out and stat.S_ISFIFO(os.stat(fifo).st_mode)
    assert _leftovers(tmp_path) == []


def test_finding2_character_device_is_not_replaced():
    # /dev/null stays a device: writing to it must not rename a file over it.
    before = os.stat("/dev/null")
    run = dualize("derive", EXAMPLE, "-o", "/dev/null")
    assert run.returncode == 0, run.stderr
    after = os.stat("/dev/null")
    assert stat.S_ISCHR(after.st_mode) and after.st_ino == before.st_ino


def test_finding2_dash_is_standard_output():
    run = dualize("derive", EXAMPLE, "-o", "-")
    assert run.returncode == 0 and "Lagrangian" in run.stdout


_SLOW_RENAME = textwrap.dedent("""
    import os, sys, time
    real = os.replace
    def slow(a, b):
        open(sys.argv[1] + ".ready", "w").close()
        time.sleep(60)
        real(a, b)
    os.replace = slow
    from dualize.cli import main
    main(["derive", sys.argv[2], "-o", sys.argv[1]])
""")


@pytest.mark.parametrize("signum", [signal.SIGTERM, signal.SIGINT])
def test_finding2_killed_run_leaves_no_temporary_file(tmp_path, signum):
    # The run is stopped while its temporary file exists (the rename is held back).
    target = tmp_path / "out.txt"
    child = subprocess.Popen([sys.executable, "-c", _SLOW_RENAME, str(target), EXAMPLE],
                             env=env(), stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.monotonic() + 120
    while not (tmp_path / "out.txt.ready").exists() and time.monotonic() < deadline:
        time.sleep(0.05)
    assert _leftovers(tmp_path), "the temporary file should exist before the signal"
    child.send_signal(signum)
    child.communicate(timeout=60)
    assert child.returncode != 0
    assert _leftovers(tmp_path) == [] and not target.exists()

"""Writing an output file (``-o``) without damaging what is there.

The rules (docs/output-formats.md, "Output files"):

- ``-`` is standard output.
- A regular file (new or existing) is written to a temporary file in the same
  folder and renamed over the target, so a reader never sees half a file and a
  failed run leaves the old file as it was.  An existing file keeps its mode
  (and, when run as root, its owner); a new file gets ``0666`` minus the umask,
  as ``open()`` would give it.
- A symbolic link is followed: its target is written, the link stays a link.
- A FIFO or a character device (``/dev/null``, a pipe of the shell's ``>(...)``)
  is written to directly, since replacing it would destroy it; a FIFO nobody
  reads from is refused rather than waited on.
- A folder, a block device or a socket is refused, as are a missing folder and
  one that cannot be written to: one line, exit code 2.

The temporary file is removed on every exit the process sees: an exception, a
``KeyboardInterrupt`` or the ``SystemExit`` that the command line raises for
SIGTERM all pass through the ``except BaseException`` below.
"""

from __future__ import annotations

import errno
import os
import stat
import sys
import tempfile

from dualize.errors import DualizeError

EXIT_BAD_OUTPUT = 2


def write_output(path: str, text: str | bytes) -> None:
    """Write ``text`` (a string as UTF-8, or bytes as they are) to ``path`` by the rules
    above."""
    data = text.encode("utf-8") if isinstance(text, str) else text
    if path == "-":
        sys.stdout.flush()
        sys.stdout.buffer.write(data)
        sys.stdout.buffer.flush()
        return
    target = os.path.realpath(path) if os.path.islink(path) else path
    try:
        info = os.stat(target)
    except FileNotFoundError:
        info = None
    except OSError as err:
        raise _error(path, err) from None
    if info is not None and not stat.S_ISREG(info.st_mode):
        _write_special(path, target, info.st_mode, data)
        return
    _replace(path, target, data, info)


def _write_special(path: str, target: str, mode: int, data: bytes) -> None:
    """A FIFO or character device is written in place; anything else is refused."""
    if stat.S_ISDIR(mode):
        raise DualizeError(f"cannot write {path}: it is a folder; give a file name", 2)
    if not (stat.S_ISFIFO(mode) or stat.S_ISCHR(mode)):
        kind = "a block device" if stat.S_ISBLK(mode) else "not a regular file"
        raise DualizeError(f"cannot write {path}: {kind}; give a regular file or - for "
                           "standard output", EXIT_BAD_OUTPUT)
    flags = os.O_WRONLY | (os.O_NONBLOCK if stat.S_ISFIFO(mode) else 0)
    try:
        fd = os.open(target, flags)
    except OSError as err:
        if err.errno == errno.ENXIO:
            raise DualizeError(f"cannot write {path}: no process reads from this FIFO",
                               EXIT_BAD_OUTPUT) from None
        raise _error(path, err) from None
    os.set_blocking(fd, True)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
    except OSError as err:
        raise _error(path, err) from None


def _replace(path: str, target: str, data: bytes, info: os.stat_result | None) -> None:
    """Temporary file in the target's folder, its mode set, then an atomic rename."""
    folder = os.path.dirname(os.path.abspath(target))
    if not os.path.isdir(folder):
        raise DualizeError(f"cannot write {path}: the folder {folder} does not exist",
                           EXIT_BAD_OUTPUT)
    try:
        fd, tmp = tempfile.mkstemp(prefix=".dualize-", suffix=".tmp", dir=folder)
    except OSError as err:
        raise _error(path, err) from None
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            _set_mode(handle.fileno(), info)
        os.replace(tmp, target)
    except BaseException as err:
        _remove(tmp)
        if isinstance(err, OSError):
            raise _error(path, err) from None
        raise


def _set_mode(fd: int, info: os.stat_result | None) -> None:
    """An existing file's mode (and owner, for root); else 0666 minus the umask."""
    if info is None:
        os.fchmod(fd, 0o666 & ~_umask())
        return
    os.fchmod(fd, stat.S_IMODE(info.st_mode))
    if hasattr(os, "geteuid") and os.geteuid() == 0:
        try:
            os.fchown(fd, info.st_uid, info.st_gid)
        except OSError:  # pragma: no cover - a file system without owners
            pass


def _umask() -> int:
    """The process's umask (read by setting and restoring it; there is no getter)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def _remove(tmp: str) -> None:
    try:
        os.unlink(tmp)
    except FileNotFoundError:
        pass


def _error(path: str, err: OSError) -> DualizeError:
    """One line that names the file and the system's reason."""
    reason = err.strerror or str(err)
    if err.errno == errno.EISDIR:
        reason = "it is a folder; give a file name"
    return DualizeError(f"cannot write {path}: {reason}", EXIT_BAD_OUTPUT)

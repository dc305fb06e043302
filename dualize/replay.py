"""Finished outputs kept in the user cache, so that running a command again on the
same input prints what it printed before without deriving it again.

``dualize derive`` on an unchanged file (an editor's save hook, a Makefile, a
paper's build) would otherwise import sympy and derive the same dual every
time.  Here an output is stored under a key made of everything it depends on:

- the command and its options (format, standalone, colour),
- the bytes of the problem file and of the instance file (``--data``) and the
  path as written (the output names it),
- the program itself: a hash of every file of the installed ``dualize``
  package and of the grammar, and the versions of the libraries that shape
  the output (sympy, lark, jinja2, numpy, scipy).

Only a run that finished with time to spare is stored (see ``finished``): a
derivation cut by ``--time-limit`` depends on the machine's speed, not on the
input alone.  Storage is ``dualize.disk_cache`` (atomic writes, a digest per
entry, ``DUALIZE_CACHE=off`` turns it off); an entry that does not match is a
miss.  This module imports nothing heavy: a hit costs reading two files and
hashing the package, a few milliseconds.
"""

from __future__ import annotations

import functools
import hashlib
import json
from collections.abc import Mapping
from pathlib import Path

from dualize import disk_cache

SECTION = "output"
FORMAT = 1
LIBRARIES = ("sympy", "lark", "jinja2", "numpy", "scipy")
SPARE_SECONDS = 0.5
"""A run is stored only when at least this much of its time limit was left at the end;
no step of the engine skips work while more than this remains (``duality.separable``)."""


@functools.lru_cache(maxsize=1)
def program_stamp() -> str:
    """A hash of the package's own files and the versions of the libraries it uses."""
    digest = hashlib.sha256(f"format {FORMAT}\n".encode())
    package = Path(__file__).resolve().parent
    for path in sorted(package.rglob("*")):
        if path.is_file() and path.suffix in (".py", ".lark", ".j2"):
            digest.update(str(path.relative_to(package)).encode() + b"\0" + path.read_bytes())
    from dualize.syntax.grammar_file import grammar_path

    digest.update(grammar_path().read_bytes())
    for name in LIBRARIES:
        digest.update(f"{name} {_library_version(name)}\n".encode())
    return digest.hexdigest()


def _library_version(name: str) -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version(name)
    except PackageNotFoundError:
        return "absent"


def key_of(command: str, options: Mapping[str, object], files: Mapping[str, str | None]) -> \
        str | None:
    """The key of one run, or None when an input cannot be read (the run then reports it)."""
    parts: dict[str, object] = {"command": command, "options": dict(options)}
    for role, path in files.items():
        if path is None:
            parts[role] = None
            continue
        try:
            content = Path(path).read_bytes()
        except OSError:
            return None
        parts[role] = {"path": path, "sha256": hashlib.sha256(content).hexdigest()}
    return json.dumps(parts, sort_keys=True)


def replayed(key: str | None) -> str | None:
    """The stored output for ``key``, or None."""
    if key is None:
        return None
    try:
        stamp = program_stamp()
    except OSError:
        return None
    payload = disk_cache.lookup(SECTION, key, stamp)
    if isinstance(payload, dict) and isinstance(payload.get("text"), str):
        return payload["text"]
    return None


def finished(seconds_left: float) -> bool:
    """Whether a run that ended with ``seconds_left`` of its limit was never cut short."""
    return seconds_left >= SPARE_SECONDS


def keep(key: str | None, text: str) -> None:
    """Store the output of a finished run (a failure to write costs only the speed-up)."""
    if key is None:
        return
    try:
        disk_cache.store(SECTION, key, program_stamp(), {"text": text})
    except OSError:
        return

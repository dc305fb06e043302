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
import os
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
    package = os.path.dirname(os.path.abspath(__file__))
    for relative in _package_files(package):
        with open(os.path.join(package, relative), "rb") as source:
            digest.update(relative.encode() + b"\0" + source.read())
    from dualize.syntax.grammar_file import grammar_path

    digest.update(grammar_path().read_bytes())
    for name in LIBRARIES:
        digest.update(f"{name} {_library_version(name)}\n".encode())
    return digest.hexdigest()


SOURCE_SUFFIXES = (".py", ".lark", ".j2")


def _package_files(root: str, prefix: str = "") -> list[str]:
    """The package's source files, as sorted paths relative to ``root`` (``os.scandir``:
    a tenth of the time of ``Path.rglob`` on a cold start)."""
    found: list[str] = []
    with os.scandir(os.path.join(root, prefix)) as entries:
        for entry in entries:
            relative = prefix + entry.name
            if entry.is_dir(follow_symlinks=False):
                found.extend(_package_files(root, relative + "/"))
            elif entry.is_file() and entry.name.endswith(SOURCE_SUFFIXES):
                found.append(relative)
    return sorted(found)


def _library_version(name: str) -> str:
    """The installed version of ``name``: read from the name of its ``.dist-info`` folder
    beside the package (one directory listing, where ``importlib.metadata`` scans every
    entry of ``sys.path`` and costs a twentieth of a second), else from the metadata."""
    from importlib.util import find_spec

    try:
        spec = find_spec(name)
    except (ImportError, ValueError):
        spec = None
    if spec is None:
        return "absent"
    for location in spec.submodule_search_locations or ():
        version = _dist_info_version(os.path.dirname(location), name)
        if version is not None:
            return version
    return _metadata_version(name)


def _dist_info_version(folder: str, name: str) -> str | None:
    """The version in ``folder``'s ``<name>-<version>.dist-info`` (names compared as pip
    normalizes them: case, ``-``, ``_`` and ``.`` alike), or None when there is none."""
    wanted = _normalized(name)
    try:
        entries = sorted(os.listdir(folder))
    except OSError:
        return None
    for entry in entries:
        stem, dot, kind = entry.rpartition(".")
        project, dash, version = stem.partition("-")
        if dot and kind == "dist-info" and dash and _normalized(project) == wanted:
            return version
    return None


def _normalized(project: str) -> str:
    return "".join("-" if c in "-_." else c for c in project.lower())


def _metadata_version(name: str) -> str:
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

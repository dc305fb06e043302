"""A user cache folder of JSON entries, safe under concurrent processes.

Costly results that depend only on the program's own inputs (derived
conjugates, the parser's tables) are kept here between runs.  The folder is
``$DUALIZE_CACHE_DIR`` if set, else ``$XDG_CACHE_HOME/dualize``, else
``~/.cache/dualize``; ``DUALIZE_CACHE=off`` turns caching off.

Every entry records its exact key, a stamp (the version of what produced it)
and a digest of its payload; an entry with another key or stamp, a payload that
does not match its digest, or one that does not parse, reads as a miss.
Entries are written to a temporary file in the same folder and moved
into place with ``os.replace``, so a reader never sees half an entry.  Entries
are plain JSON: nothing read back is ever executed.  A folder that cannot be
written costs only the speed-up.

The package ships a seed (``cache_seed.json``): entries of the same form that
the release's own code made for the steps every user meets first (the
parser's tables, the conjugates of the function table's functions), so that a
first run with an empty folder need not derive them.  A seed entry obeys the
same rules (key, stamp, digest): one made by other code or another library
version is a miss, and the step is done afresh.  ``DUALIZE_CACHE=off`` (or
``DUALIZE_CACHE_SEED=off`` alone) turns the seed off.
"""

from __future__ import annotations

import functools
import hashlib
import json
import os
import tempfile
from pathlib import Path
from typing import Any

MAX_BYTES = 4_000_000


def cache_root() -> Path | None:
    """The cache folder, or None when caching is turned off."""
    if os.environ.get("DUALIZE_CACHE", "").lower() in ("off", "0", "no", "false"):
        return None
    explicit = os.environ.get("DUALIZE_CACHE_DIR")
    if explicit:
        return Path(explicit)
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "dualize"


def entry_path(section: str, key: str) -> Path | None:
    """Where the entry for ``key`` lives in ``section`` (a sub-folder), or None."""
    root = cache_root()
    if root is None:
        return None
    return root / section / (hashlib.sha256(key.encode()).hexdigest() + ".json")


def lookup(section: str, key: str, stamp: str) -> Any | None:
    """The stored payload, or None on a miss, a foreign stamp or a damaged entry; the
    user folder first, then the package's seed."""
    path = entry_path(section, key)
    if path is None:
        return None
    found = _valid(_read(path), key, stamp)
    if found is None:
        found = _valid(seed().get(section, {}).get(key), key, stamp)
    return found


def _read(path: Path) -> Any:
    try:
        if path.stat().st_size > MAX_BYTES:
            return None
        return json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError, RecursionError):
        return None


SEED = Path(__file__).resolve().parent / "cache_seed.json"
SEED_BYTES = 8_000_000


@functools.lru_cache(maxsize=1)
def seed() -> dict[str, dict[str, Any]]:
    """The shipped entries by section and key; empty when the file is absent or damaged."""
    if os.environ.get("DUALIZE_CACHE_SEED", "").lower() in ("off", "0", "no", "false"):
        return {}
    try:
        if SEED.stat().st_size > SEED_BYTES:
            return {}
        data = json.loads(SEED.read_text(encoding="utf-8"))
    except (OSError, ValueError, RecursionError):
        return {}
    if not isinstance(data, dict):
        return {}
    return {k: v for k, v in data.items() if isinstance(k, str) and isinstance(v, dict)}


def _valid(entry: Any, key: str, stamp: str) -> Any | None:
    """The payload of ``entry`` if it is the entry of ``key`` with ``stamp``, else None."""
    if not isinstance(entry, dict) or entry.get("stamp") != stamp or entry.get("key") != key:
        return None
    payload = entry.get("payload")
    if entry.get("digest") != _digest(payload):
        return None  # damaged in place (a flipped digit still parses)
    return payload


def _digest(payload: Any) -> str:
    return hashlib.sha256(json.dumps(payload, sort_keys=True).encode()).hexdigest()


def store(section: str, key: str, stamp: str, payload: Any) -> None:
    """Write the entry atomically; any failure to write is ignored."""
    path = entry_path(section, key)
    if path is None:
        return
    text = json.dumps({"stamp": stamp, "key": key, "payload": payload,
                       "digest": _digest(payload)}, sort_keys=True)
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=".tmp-", suffix=".json")
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as handle:
                handle.write(text)
            os.replace(tmp, path)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
    except OSError:
        return

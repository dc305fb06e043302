"""The typed problem (IR) and the front end that builds it from text.

``load`` and ``load_file`` are imported lazily, so that importing the IR
(``dualize.model.expr``) does not pull in the parser.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from pathlib import Path

    from dualize.model.loading import Loaded


def load(text: str, path: str = "<string>") -> Loaded:
    """Parse and resolve a problem's text: see ``dualize.model.loading.load``."""
    from dualize.model.loading import load as _load

    return _load(text, path)


def load_file(path: str | Path) -> Loaded:
    """Read and load a problem file: see ``dualize.model.loading.load_file``."""
    from dualize.model.loading import load_file as _load_file

    return _load_file(path)


def __getattr__(name: str) -> object:
    if name == "Loaded":
        from dualize.model.loading import Loaded

        return Loaded
    raise AttributeError(name)


__all__ = ["Loaded", "load", "load_file"]

"""Where the grammar file lives, installed or in a checkout.

The grammar is a file of its own (grammar/problem.lark at the repository top);
the wheel carries it as dualize/grammar/problem.lark.  Reading it from either
place keeps one source of truth for the language.
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path

GRAMMAR_NAME = "problem.lark"


def grammar_path() -> Path:
    """The installed grammar if present, else the checkout's grammar/ folder."""
    installed = resources.files("dualize") / "grammar" / GRAMMAR_NAME
    if installed.is_file():
        return Path(str(installed))
    return Path(__file__).resolve().parents[2] / "grammar" / GRAMMAR_NAME


def grammar_text() -> str:
    return grammar_path().read_text(encoding="utf-8")

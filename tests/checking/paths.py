"""Where the bundled examples and the claim files live, and loaders for both."""

from __future__ import annotations

from pathlib import Path

from dualize.model import load_file
from dualize.model.problem import Problem

ROOT = Path(__file__).resolve().parents[2]
EXAMPLES = ROOT / "examples"
CLAIMS = ROOT / "tests" / "claims"


def example(name: str) -> Problem:
    loaded = load_file(EXAMPLES / f"{name}.prob")
    assert loaded.problem is not None, [d.message for d in loaded.diagnostics]
    return loaded.problem


def claim_text(name: str) -> str:
    return (CLAIMS / f"{name}.prob").read_text(encoding="utf-8")


def claim_path(name: str) -> str:
    return str(CLAIMS / f"{name}.prob")

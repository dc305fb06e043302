"""Fixtures: derive an example, render its solver into tmp_path and import it."""

from __future__ import annotations

import importlib.util
import json
from pathlib import Path

import pytest

from dualize.duality import derive
from dualize.model import load
from dualize.solvergen.solver import render_solver

EXAMPLES = Path(__file__).resolve().parents[2] / "examples"


def derivation_of(name: str):
    text = (EXAMPLES / f"{name}.prob").read_text(encoding="utf-8")
    return derive(load(text, f"{name}.prob").problem)


def instance_of(name: str) -> dict:
    return json.loads((EXAMPLES / f"{name}.json").read_text(encoding="utf-8"))


def _imported(path: Path, source: str):
    path.write_text(source, encoding="utf-8")
    spec = importlib.util.spec_from_file_location(path.stem, path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.fixture
def solver_module(tmp_path):
    """A function: example name -> (path, imported generated module)."""

    def build(name: str):
        path = tmp_path / f"{name}_solver.py"
        return path, _imported(path, render_solver(derivation_of(name)))

    return build


@pytest.fixture
def text_solver(tmp_path):
    """A function: problem text -> the imported generated module of its dual."""

    def build(text: str, name: str = "inline"):
        derivation = derive(load(text, f"{name}.prob").problem)
        return _imported(tmp_path / f"{name}_solver.py", render_solver(derivation))

    return build

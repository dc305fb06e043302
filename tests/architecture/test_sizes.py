"""Size rules of the house (DEVELOPERS.md): no module over 500 lines, no function over 40.

Small modules hold one concern and small functions say what they do in their
name; a function that outgrows 40 lines is split rather than allowed.  Measured
with ``ast`` (a function spans its ``def`` line to its last line, decorators not
counted): common practice.
"""

from __future__ import annotations

import ast
from pathlib import Path

from tests.architecture.import_graph import ROOT, modules

MAX_MODULE_LINES = 500
MAX_FUNCTION_LINES = 40


def long_functions(path: Path, limit: int = MAX_FUNCTION_LINES) -> list[tuple[str, int]]:
    """(name, length) of each function or method in ``path`` longer than ``limit`` lines."""
    tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
    return [(node.name, node.end_lineno - node.lineno + 1) for node in ast.walk(tree)
            if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef)
            and node.end_lineno is not None and node.end_lineno - node.lineno + 1 > limit]


def _long_modules() -> dict[str, int]:
    return {name: n for name, path in modules().items()
            if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_MODULE_LINES}


def test_no_module_is_over_500_lines() -> None:
    assert _long_modules() == {}


def _long() -> dict[str, int]:
    return {f"{name}.{fn}": n for name, path in modules().items()
            for fn, n in long_functions(path)}


def test_no_function_is_over_40_lines() -> None:
    assert _long() == {}


def test_the_measure_sees_a_long_function(tmp_path: Path) -> None:
    path = tmp_path / "long.py"
    body = "".join(f"    x{k} = {k}\n" for k in range(40))
    path.write_text(f"def short():\n    return 1\n\n\ndef long():\n{body}", encoding="utf-8")
    assert long_functions(path) == [("long", 41)]


def test_the_package_is_found() -> None:
    assert (ROOT / "__init__.py").is_file() and len(modules()) > 100

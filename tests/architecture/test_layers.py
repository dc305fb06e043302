"""The layering contract: imports only go down the stage order, and no circles.

The order (DEVELOPERS.md) runs from the base modules through syntax, model,
analysis and duality, numeric, the printers and the solver generator, checking,
the paper reader, the lint runner and the public API up to the commands and the
command line.  Whatever a lower stage needs from a higher one is passed in as an
argument.  The graph is read with ``ast`` from the source (``import_graph``), so
a deferred import inside a function counts as much as one at the top.  Layered
architecture as a rule of the trade: common practice.
"""

from __future__ import annotations

from pathlib import Path

from tests.architecture.import_graph import (
    LAYERS,
    ROOT,
    arrows,
    circles,
    modules,
    private_imports,
    unplaced,
    upward,
)


def _shown(found: list) -> str:
    return "\n".join(f"{a.source}:{a.line} imports {a.target}" for a in found)


def test_no_import_runs_up_the_stage_order() -> None:
    found = upward(arrows())
    assert not found, "imports against the stage order:\n" + _shown(found)


def test_no_circle_of_imports() -> None:
    """Not across folders, and not inside one either (a printer and the record it
    prints do not import each other; the display sits above both)."""
    assert circles(arrows()) == []


def test_no_module_takes_another_modules_private_names() -> None:
    """Private state (a flag stack, a registry) is changed only by its own module."""
    assert private_imports() == []


def test_every_module_has_a_place_in_the_order() -> None:
    assert unplaced(modules()) == [], "add the new stage to LAYERS and to DEVELOPERS.md"


def test_the_order_names_each_stage_once() -> None:
    names = [name for row in LAYERS for name in row]
    assert len(names) == len(set(names))


def test_the_order_is_the_one_developers_md_states() -> None:
    """The guide draws the same order: each stage appears there, in this order."""
    guide = (ROOT.parent / "DEVELOPERS.md").read_text(encoding="utf-8")
    chart = guide[guide.index("```", guide.index("## Stages")):]
    places = [chart.index(f"dualize/{row[0]}") for row in LAYERS[1:] if row[0] != "__main__"]
    assert places == sorted(places)


# --- the contract's own test: a planted upward import and a planted circle are found ----

def _package(tmp_path: Path, files: dict[str, str]) -> Path:
    root = tmp_path / "dualize"
    for name, text in {"__init__.py": "", **files}.items():
        path = root / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    return root


def test_a_planted_upward_import_is_found(tmp_path: Path) -> None:
    root = _package(tmp_path, {
        "model/__init__.py": "",
        "model/expr.py": "def f():\n    from dualize.render.latex import show\n",
        "render/__init__.py": "",
        "render/latex.py": "from dualize.model.expr import f\n",
    })
    found = upward(arrows(root))
    assert [(a.source, a.target, a.line) for a in found] == [
        ("dualize.model.expr", "dualize.render.latex", 2)]


def test_a_planted_peer_import_and_relative_import_are_found(tmp_path: Path) -> None:
    root = _package(tmp_path, {
        "analysis/__init__.py": "",
        "analysis/curv.py": "from ..duality import engine\n",
        "duality/__init__.py": "",
        "duality/engine.py": "X = 1\n",
    })
    found = upward(arrows(root))
    assert [(a.source, a.target) for a in found] == [
        ("dualize.analysis.curv", "dualize.duality.engine")]


def test_a_planted_circle_is_found(tmp_path: Path) -> None:
    root = _package(tmp_path, {
        "numeric/__init__.py": "",
        "numeric/a.py": "from dualize.numeric import b\n",
        "numeric/b.py": "import dualize.numeric.c\n",
        "numeric/c.py": "from dualize.numeric.a import x\n",
    })
    assert circles(arrows(root)) == [
        ("dualize.numeric.a", "dualize.numeric.b", "dualize.numeric.c")]


def test_a_planted_private_import_is_found(tmp_path: Path) -> None:
    root = _package(tmp_path, {
        "duality/__init__.py": "",
        "duality/normal.py": "_FLAGS = [True]\n",
        "duality/compare.py": "def f():\n    from dualize.duality.normal import _FLAGS\n",
    })
    assert private_imports(root) == [
        ("dualize.duality.compare", "dualize.duality.normal._FLAGS", 2)]


def test_a_downward_import_passes(tmp_path: Path) -> None:
    root = _package(tmp_path, {
        "errors.py": "",
        "model/__init__.py": "",
        "model/expr.py": "from dualize.errors import X\n",
        "commands/__init__.py": "",
        "commands/derive.py": "from dualize.model.expr import f\n",
    })
    assert upward(arrows(root)) == [] and circles(arrows(root)) == []


def test_an_unknown_stage_is_reported(tmp_path: Path) -> None:
    root = _package(tmp_path, {"gadgets/__init__.py": "", "gadgets/tool.py": ""})
    assert unplaced(modules(root)) == ["dualize.gadgets", "dualize.gadgets.tool"]

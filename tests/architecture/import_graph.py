"""The import graph of the ``dualize`` package, read with ``ast`` (nothing is imported).

The layering contract (``test_layers.py``) and the size rules are checked over
this graph.  Every ``import`` statement counts, at module level or inside a
function, under ``TYPE_CHECKING`` or not: an import inside a function is still
a dependency, only a deferred one.
"""

from __future__ import annotations

import ast
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path

PACKAGE = "dualize"
ROOT = Path(__file__).resolve().parents[2] / PACKAGE

# The stages from the bottom up (DEVELOPERS.md); a module may import from its own
# stage and from the stages below it.  Stages on one line are peers: neither may
# import the other.
LAYERS: tuple[tuple[str, ...], ...] = (
    ("errors", "span"),
    ("diagnostics", "deadline", "disk_cache", "outfile"),
    ("syntax",),
    ("model",),
    ("analysis", "duality"),
    ("numeric",),
    ("render",),
    ("solvergen",),
    ("checking", "multipliers"),
    ("paper",),
    ("lint",),
    ("lint_config",),
    ("results",),
    ("api",),
    ("lsp", "replay"),
    ("commands",),
    ("cli",),
    ("__main__",),
)
# ``dualize/__init__.py`` (a lazy ``derive`` for ``import dualize``) sits outside the order.
OUTSIDE = frozenset({PACKAGE})
# Files that are pieces of one module: the generated solver's runtime is written as
# several linted files that the generator pastes into one emitted module, so they
# share private names as one module does.
ONE_MODULE = ("dualize.solvergen.runtime",)
# Files written by a library, not by us: jinja2's compilation of the templates
# (``dualize.render.templating``), loaded as templates and regenerated, never edited.
GENERATED = ("templates/compiled",)


@dataclass(frozen=True)
class Arrow:
    """One import: ``source`` imports ``target`` at ``line``."""

    source: str
    target: str
    line: int


def module_name(path: Path, root: Path) -> str:
    """``dualize.duality.engine`` for ``<root>/duality/engine.py``."""
    parts = list(path.relative_to(root).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join([root.name, *parts])


def modules(root: Path = ROOT) -> dict[str, Path]:
    """Every module of the package by dotted name, in sorted order."""
    return {module_name(p, root): p for p in sorted(root.rglob("*.py"))
            if not any(p.relative_to(root).as_posix().startswith(g) for g in GENERATED)}


def _absolute(node: ast.ImportFrom, importer: str, is_package: bool) -> str:
    """The dotted module an ``ImportFrom`` names, relative imports made absolute."""
    if not node.level:
        return node.module or ""
    base = importer.split(".")
    base = base if is_package else base[:-1]
    base = base[: len(base) - node.level + 1]
    return ".".join(base + ([node.module] if node.module else []))


def _resolve(name: str, known: Mapping[str, Path]) -> str | None:
    """The longest known module that ``name`` is or lies inside."""
    while name:
        if name in known:
            return name
        name = name.rpartition(".")[0]
    return None


def arrows_of(source: str, path: Path, known: Mapping[str, Path]) -> list[Arrow]:
    """The imports of one module that land inside the package."""
    tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
    found: list[Arrow] = []
    for node in ast.walk(tree):
        names: list[str] = []
        if isinstance(node, ast.Import):
            names = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom):
            base = _absolute(node, source, path.name == "__init__.py")
            names = [f"{base}.{alias.name}" for alias in node.names] or [base]
        for name in names:
            target = _resolve(name, known)
            if target is not None and target != source:
                found.append(Arrow(source, target, node.lineno))
    return found


def arrows(root: Path = ROOT) -> list[Arrow]:
    """Every import inside the package, sorted."""
    known = modules(root)
    found = [a for name, path in known.items() for a in arrows_of(name, path, known)]
    return sorted(set(found), key=lambda a: (a.source, a.target, a.line))


def stage(module: str) -> str | None:
    """The stage a module belongs to: the first name under the package."""
    parts = module.split(".")
    return parts[1] if len(parts) > 1 else None


def rank(module: str, layers: tuple[tuple[str, ...], ...] = LAYERS) -> int | None:
    """The height of a module's stage in ``layers`` (None: not in the order)."""
    name = stage(module)
    for height, row in enumerate(layers):
        if name in row:
            return height
    return None


def upward(found: Iterable[Arrow], layers: tuple[tuple[str, ...], ...] = LAYERS) -> list[Arrow]:
    """Imports that go up the order, or sideways into a peer stage."""
    bad = []
    for arrow in found:
        low, high = rank(arrow.source, layers), rank(arrow.target, layers)
        if low is None or high is None or stage(arrow.source) == stage(arrow.target):
            continue
        if high >= low:
            bad.append(arrow)
    return bad


def unplaced(names: Iterable[str], layers: tuple[tuple[str, ...], ...] = LAYERS) -> list[str]:
    """Modules whose stage the order does not name (a new stage must be placed)."""
    return sorted(n for n in names if n not in OUTSIDE and rank(n, layers) is None)


def circles(found: Iterable[Arrow]) -> list[tuple[str, ...]]:
    """The strongly connected groups of two or more modules (Tarjan), each sorted."""
    graph: dict[str, set[str]] = {}
    for arrow in found:
        graph.setdefault(arrow.source, set()).add(arrow.target)
        graph.setdefault(arrow.target, set())
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    groups: list[tuple[str, ...]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for nxt in sorted(graph[node]):
            if nxt not in index:
                visit(nxt)
                low[node] = min(low[node], low[nxt])
            elif nxt in on_stack:
                low[node] = min(low[node], index[nxt])
        if low[node] == index[node]:
            group = []
            while True:
                top = stack.pop()
                on_stack.discard(top)
                group.append(top)
                if top == node:
                    break
            if len(group) > 1:
                groups.append(tuple(sorted(group)))

    for node in sorted(graph):
        if node not in index:
            visit(node)
    return sorted(groups)


def private_imports(root: Path = ROOT) -> list[tuple[str, str, int]]:
    """(importer, name, line) for each private name (``_x``) taken from another module:
    a module's private state stays its own, read or changed only through its functions."""
    found = []
    for name, path in modules(root).items():
        tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
        for node in ast.walk(tree):
            if not isinstance(node, ast.ImportFrom):
                continue
            base = _absolute(node, name, path.name == "__init__.py")
            if base.split(".")[0] != root.name:
                continue
            if name.startswith(ONE_MODULE) and base.startswith(ONE_MODULE):
                continue
            found += [(name, f"{base}.{a.name}", node.lineno) for a in node.names
                      if a.name.startswith("_") and not a.name.startswith("__")]
    return sorted(found)

"""The printing context shared by the generated solver's functions.

A ``Scope`` says where each identifier comes from (data, multipliers and epigraph
variables in ``z``, primal variables in ``x``); an ``Emitter`` prints IR
expressions under it, collects the data-only constants for ``_prepare`` and the
binding lines a function body needs.
"""

from __future__ import annotations

from dataclasses import dataclass

from dualize.model import expr as ir
from dualize.solvergen.ir_rewrite import normalize
from dualize.solvergen.pynames import literal
from dualize.solvergen.python_code import Constants, NumpyPrinter, bare


@dataclass(frozen=True)
class Scope:
    """Where each identifier of a generated function comes from."""

    names: dict[str, str]
    data: frozenset[str]
    dual: tuple[str, ...]
    primal: tuple[str, ...]


class Emitter:
    """Prints function bodies and the lines that bind the identifiers they read."""

    def __init__(self, scope: Scope) -> None:
        self.scope = scope
        self.constants = Constants()

    def code(self, expr: ir.Expr, hoist: bool = True, sparse: bool = False
             ) -> tuple[str, set[str]]:
        """Numpy code for ``expr``; data-only parts go to ``_prepare`` when ``hoist``; an
        identity matrix becomes a sparse one when ``sparse``."""
        printer = NumpyPrinter({"names": self.scope.names, "constants": self.constants,
                                "hoist": hoist, "sparse": sparse})
        return bare(printer.code(normalize(expr))), printer.used

    def size(self, value: object) -> tuple[str, set[str]]:
        printer = NumpyPrinter({"names": self.scope.names, "constants": self.constants})
        return printer.size(value), printer.used  # type: ignore[arg-type]

    def bindings(self, used: set[str]) -> list[str]:
        """``X = d["X"]`` lines for data, dimensions and constants; dual and primal parts."""
        lines = []
        by_ident = {ident: name for name, ident in self.scope.names.items()}
        for ident in sorted(used):
            name = by_ident.get(ident, ident)
            if ident.startswith("_k") or name in self.scope.data:
                lines.append(f"{ident} = d[{literal(name)}]")
            elif name in self.scope.dual:
                lines.append(f"{ident} = _parts[{self.scope.dual.index(name)}]")
            elif name in self.scope.primal:
                lines.append(f"{ident} = x[{literal(name)}]")
        if any(by_ident.get(i) in self.scope.dual for i in used):
            lines.insert(0, "_parts = _split(z, _dual_sizes(d), SCALARS)")
        return lines


def function(emitter: Emitter, head: str, body: list[str], used: set[str]) -> str:
    lines = [head, *(f"    {line}" for line in emitter.bindings(used) + body)]
    return "\n".join(lines)

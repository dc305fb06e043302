"""What the names of one file mean while it is being resolved.

A ``Scope`` is built per file and thrown away after; it maps declared names to
IR symbols and size names to dimension symbols.  ``ResolveError`` carries the
one diagnostic that stops the resolution of a statement.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass, field

import sympy

from dualize.diagnostics import Diagnostic, RuleKind, make
from dualize.model.expr import Symbol
from dualize.model.functions import BY_SPELLING
from dualize.syntax.span import Span

FUNCTIONS = tuple(sorted(("diag", "identity", "inv", "max", "min", "ones", "relent", "sum",
                          "trace")
                         + tuple(BY_SPELLING)))
"""Every function name a file may call: the structural ones and the function table's."""
KEYWORDS = ("data", "in", "maximise", "maximize", "minimise", "minimize", "over", "preceq",
            "subject", "succeq", "title", "to")
RESERVED = frozenset(FUNCTIONS + KEYWORDS)


class ResolveError(Exception):
    """Stops resolving one statement; the resolver records the diagnostic and goes on.

    A ``diagnostic`` of None stops the statement silently: it refers to a name whose
    declaration already failed, and one report per defect is enough.
    """

    def __init__(self, diagnostic: Diagnostic | None) -> None:
        super().__init__(diagnostic.message if diagnostic else "already reported")
        self.diagnostic = diagnostic


@dataclass
class Scope:
    path: str
    names: dict[str, Symbol] = field(default_factory=dict)
    dims: dict[str, sympy.Symbol] = field(default_factory=dict)
    failed: set[str] = field(default_factory=set)

    def fail(self, kind: RuleKind, span: Span | None, hint: str | None = None,
             **values: object) -> ResolveError:
        return ResolveError(make(kind, self.path, span, hint=hint, **values))

    def dimension(self, name: str) -> sympy.Symbol:
        """The dimension symbol for a size name, made on first use."""
        if name not in self.dims:
            self.dims[name] = sympy.Symbol(name, integer=True, positive=True)
        return self.dims[name]

    def suggest(self, name: str) -> str | None:
        """A did-you-mean hint among the declared names."""
        close = difflib.get_close_matches(name, sorted(self.names), n=1, cutoff=0.6)
        return f"did you mean `{close[0]}`?" if close else None

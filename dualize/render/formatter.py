"""What a document asks of a target, answered once for every target.

A document shows expressions, relations, names, sets and sentences.  The
sentences of the engine mark their mathematics: ``$x$`` is the name x, and
``$key$`` is a formula the step carries under that key (an IR expression, an
equation, or an exact scalar function such as a conjugate).  Every target prints
those pieces with its own expression printer, so no formula reaches a page as
ASCII text.  A target subclasses ``TargetFormatter`` and names its printer, its
relation signs, its sets and how it sets words and inline mathematics.
"""

from __future__ import annotations

import re
from collections.abc import Mapping
from typing import Any, ClassVar

import sympy

from dualize.duality.result import DualVariable, Equation, Head
from dualize.model import expr as ir
from dualize.model.problem import Variable
from dualize.render.document import head_text
from dualize.render.ir_layout import IRLayout, printed_terms
from dualize.render.names import PROSE_RELATIONS, prose_pieces

Formulas = tuple[tuple[str, object], ...]
_SIGN_ENDINGS = ("=", r"\leq", r"\geq", r"\neq", "<", ">", "≤", "≥", "≠", r"\succeq", r"\preceq",
                 "⪰", "⪯")


class TargetFormatter:
    """The shared half of every target's formatter; the hooks at the end differ."""

    printer: ClassVar[type[IRLayout]]
    relations: ClassVar[Mapping[str, str]]

    def __init__(self, **settings: Any) -> None:
        self.settings = settings

    def _printer(self) -> IRLayout:
        return self.printer(self.settings)  # type: ignore[call-arg]

    def expr(self, node: ir.Expr) -> str:
        return self._printer().doprint(node)  # type: ignore[attr-defined]

    def terms(self, node: ir.Expr) -> tuple[str, ...]:
        return printed_terms(self._printer(), node)

    def relation(self, relation: str) -> str:
        return self.relations[relation]

    def name(self, name: str) -> str:
        return self._printer().name(name)

    def domain(self, variable: Variable) -> str:
        d = variable.domain
        return self.set_of(d.kind, variable.symbol.shape, d.lo, d.hi)

    def dual_set(self, variable: DualVariable) -> str:
        kind = "symmetric" if variable.set == "symmetric" else "free"
        return self.set_of(kind, variable.symbol.shape)

    def prose(self, text: str, formulas: Formulas = ()) -> str:
        """A sentence: words set as words, names, signs and formulas as mathematics."""
        table = dict(formulas)
        runs: list[tuple[bool, str]] = []  # (is mathematics, piece)
        for kind, piece in prose_pieces(text):
            if kind == "text":
                runs.append((False, piece))
            elif kind == "relation":
                runs.append((True, self.relation(PROSE_RELATIONS[piece])))
            elif kind == "name":
                runs.append((True, self.name(piece)))
            else:
                runs.append((True, self.formula(table.get(piece, piece))))
        joined = _joined(runs)
        out = []
        for index, (math, piece) in enumerate(joined):
            if not math:
                out.append(self.words(piece))
                continue
            after = joined[index + 1][1] if index + 1 < len(joined) else ""
            if self.displays(piece) and after[:1] in (".", ",", ";", ":"):
                piece += after[0]  # a displayed formula carries the sentence's punctuation
                joined[index + 1] = (False, after[1:])
            out.append(self.inline(piece))
        return "".join(out)

    def displays(self, math: str) -> bool:
        """Whether this target sets the formula as a display of its own (too wide inline)."""
        return False

    def formula(self, item: object) -> str:
        """One marked formula of a sentence, in this target's mathematics."""
        if isinstance(item, str):
            return self.name(item)
        if isinstance(item, ir.Expr):
            return self.expr(item)
        if isinstance(item, Equation):
            lhs = item.lhs
            left = head_text(lhs, self) if isinstance(lhs, Head) else self.expr(lhs)
            return f"{left} {self.relation(item.relation)} {self.expr(item.rhs)}"
        if isinstance(item, sympy.Basic):
            return self.scalar(item)
        raise TypeError(f"no rule to show {type(item).__name__} in a sentence")

    def scalar(self, value: sympy.Basic) -> str:
        """An exact scalar function (a conjugate, a generic convex function) via sympy."""
        return self._printer().doprint(value)  # type: ignore[attr-defined]

    # -- hooks a target fills in -------------------------------------------------
    def set_of(self, kind: str, shape: ir.Shape, lo: ir.Expr | None = None,
               hi: ir.Expr | None = None) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def words(self, text: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def inline(self, math: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError

    def gradient(self, variable: str, of: str) -> str:  # pragma: no cover - overridden
        raise NotImplementedError


_BRIDGE = re.compile(r"^(\s*)([-+]?\d+(?:\.\d+)?)(?=[\s.,;:)]|$)")


def _joined(runs: list[tuple[bool, str]]) -> list[tuple[bool, str]]:
    """One formula where a sentence says "beta >= 0": mathematics separated only by
    spaces is joined, and a number right after a relation sign joins it."""
    out: list[tuple[bool, str]] = []
    for math, piece in runs:
        if not math and out and out[-1][0]:
            number = _BRIDGE.match(piece)
            if number and out[-1][1].endswith(_SIGN_ENDINGS):
                out[-1] = (True, out[-1][1] + " " + number.group(2))
                piece = piece[number.end():]
                if not piece:
                    continue
        if math and len(out) >= 2 and out[-2][0] and not out[-1][0] and not out[-1][1].strip():
            out.pop()
            out[-1] = (True, out[-1][1] + " " + piece)
            continue
        if math and out and out[-1][0]:
            out[-1] = (True, out[-1][1] + " " + piece)
            continue
        out.append((math, piece))
    return out

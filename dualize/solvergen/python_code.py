"""A numpy code printer over the IR, for generated solver modules.

Conventions of the printed code: a vector (column or row) is a 1-D array, a
matrix a 2-D array, a scalar a float, so ``@`` between 1-D arrays is the inner
product.  Product chains are evaluated from the vector they are applied to
(``X' (X w)``, never ``(X' X) w``), a diagonal factor becomes an elementwise
scale, and the inverse of data applied to something becomes a solve with a
factorization computed once (Cholesky for positive definite data, LU
otherwise).  Every subexpression that depends on data only is hoisted into a
constant computed once per instance.  An IR node without a rule raises
:class:`UnknownNode`: nothing is skipped silently.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import sympy
from sympy.printing.printer import Printer

from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.model.functions import LOG, lookup
from dualize.solvergen.ir_rewrite import (
    Kron,
    LogSumExp,
    Picks,
    Softmax,
    Vec,
    is_scalar,
    is_vector_like,
)
from dualize.solvergen.pynames import python_names  # noqa: F401 - re-exported


class UnknownNode(DualizeError):
    """An IR node the code printer has no rule for."""


@dataclass
class Constants:
    """Data-only subexpressions, each computed once: (identifier, code) in order."""

    entries: list[tuple[str, str, frozenset[str]]] = field(default_factory=list)
    index: dict[Any, str] = field(default_factory=dict)

    def add(self, key: Any, code: str, reads: set[str]) -> str:
        """Register a constant (once per key); ``reads`` are the identifiers its code uses."""
        if key not in self.index:
            name = f"_k{len(self.entries)}"
            self.entries.append((name, code, frozenset(reads)))
            self.index[key] = name
        return self.index[key]


def bare(code: str) -> str:
    """``code`` without one pair of enclosing parentheses (for call arguments)."""
    if not (code.startswith("(") and code.endswith(")")):
        return code
    depth = 0
    for i, char in enumerate(code):
        depth += {"(": 1, ")": -1}.get(char, 0)
        if depth == 0 and i < len(code) - 1:
            return code
    return code[1:-1]


def _data_only(expr: ir.Expr) -> bool:
    return all(
        not isinstance(n, ir.Symbol) or n.role == "data" for n in ir.walk(expr)
    )


_LEAVES = (ir.Symbol, ir.Number, ir.Ones, ir.Identity, ir.Zero)


class NumpyPrinter(Printer):
    """Prints IR expressions as numpy code under the conventions above."""

    printmethod = "_dualize_numpy"
    _default_settings: dict[str, Any] = {"names": {}, "constants": None, "hoist": True,
                                         "sparse": False}

    def __init__(self, settings: dict[str, Any] | None = None) -> None:
        super().__init__(settings)
        self.used: set[str] = set()
        self.constants: Constants = self._settings["constants"] or Constants()

    # --- entry and dispatch -------------------------------------------------
    def code(self, expr: ir.Expr) -> str:
        return self._print(expr)

    def _print(self, expr: Any, **kwargs: Any) -> str:
        if isinstance(expr, ir.Expr):
            if self._settings["hoist"] and self._worth_hoisting(expr):
                return self._hoisted(expr)
            method = getattr(self, f"_print_ir_{type(expr).__name__}", None)
            if method is None:
                kind = type(expr).__name__
                raise UnknownNode(f"the solver generator has no code rule for {kind}")
            return method(expr)
        return super()._print(expr, **kwargs)

    def emptyPrinter(self, expr: Any) -> str:  # noqa: N802 - sympy's hook name
        raise UnknownNode(f"the solver generator cannot print {type(expr).__name__}")

    def _worth_hoisting(self, expr: ir.Expr) -> bool:
        if isinstance(expr, _LEAVES) or not _data_only(expr):
            return False
        if isinstance(expr, ir.Transpose) and isinstance(expr.arg, ir.Symbol):
            return False
        return not isinstance(expr, ir.Inverse)

    def _hoisted(self, expr: ir.Expr) -> str:
        code, reads = self._inline(expr)
        key = ("sparse", expr) if self._settings["sparse"] else expr
        name = self.constants.add(key, code, reads)
        self.used.add(name)
        return name

    def _inline(self, expr: ir.Expr) -> tuple[str, set[str]]:
        """Code of a data-only expression for the constants table, and what it reads."""
        inline = NumpyPrinter({**self._settings, "hoist": False, "constants": self.constants})
        return bare(inline._print(expr)), inline.used

    # --- sympy scalars (numbers and dimension polynomials) --------------------
    def _print_Integer(self, expr: sympy.Integer) -> str:  # noqa: N802
        return f"{int(expr)}.0" if expr >= 0 else f"({int(expr)}.0)"

    def _print_Rational(self, expr: sympy.Rational) -> str:  # noqa: N802
        return f"({expr.p} / {expr.q})"

    def _print_Symbol(self, expr: sympy.Symbol) -> str:  # noqa: N802
        return self._name(expr.name)

    def _print_Add(self, expr: sympy.Add) -> str:  # noqa: N802
        return "(" + " + ".join(self._print(a) for a in expr.as_ordered_terms()) + ")"

    def _print_Mul(self, expr: sympy.Mul) -> str:  # noqa: N802
        return "(" + " * ".join(self._print(a) for a in expr.args) + ")"

    def _print_Pow(self, expr: sympy.Pow) -> str:  # noqa: N802
        return f"({self._print(expr.base)} ** {self._print(expr.exp)})"

    def size(self, value: sympy.Expr) -> str:
        """A size as an integer expression (dimension names are ints at run time)."""
        value = sympy.Integer(value) if isinstance(value, int) else value
        if value.is_Integer:
            return str(int(value))
        return f"int({self._arg(value)})"

    def _arg(self, expr: Any) -> str:
        return bare(self._print(expr))

    def _name(self, name: str) -> str:
        ident = self._settings["names"].get(name)
        if ident is None:
            raise UnknownNode(f"the name {name!r} has no Python identifier")
        self.used.add(ident)
        return ident

    # --- leaves ---------------------------------------------------------------
    def _print_ir_Symbol(self, expr: ir.Symbol) -> str:  # noqa: N802
        return self._name(expr.name)

    def _print_ir_Number(self, expr: ir.Number) -> str:  # noqa: N802
        value = expr.value
        return self._print(sympy.Integer(value) if isinstance(value, int) else value)

    def _print_ir_Ones(self, expr: ir.Ones) -> str:  # noqa: N802
        return f"np.ones({self.size(expr.n)})"

    def _print_ir_Identity(self, expr: ir.Identity) -> str:  # noqa: N802
        """Dense, except where the caller asked for sparse (a Jacobian for HiGHS): an
        m x m identity must never cost m^2 memory there."""
        if self._settings["sparse"]:
            return f"scipy.sparse.eye_array({self.size(expr.n)}, format=\"csr\")"
        return f"np.eye({self.size(expr.n)})"

    def _print_ir_Zero(self, expr: ir.Zero) -> str:  # noqa: N802
        return f"np.zeros({self.array_shape(expr.shape)})"

    def array_shape(self, shape: ir.Shape) -> str:
        """The numpy shape tuple of an IR shape under our conventions."""
        if shape.is_scalar:
            return "()"
        if shape.cols == 1:
            return f"({self.size(shape.rows)},)"
        if shape.rows == 1:
            return f"({self.size(shape.cols)},)"
        return f"({self.size(shape.rows)}, {self.size(shape.cols)})"

    # --- arithmetic -------------------------------------------------------------
    def _print_ir_Add(self, expr: ir.Add) -> str:  # noqa: N802
        wide = any(not is_scalar(t) and not isinstance(t, ir.Broadcast) for t in expr.terms)
        pieces = [self._term(t, wide) for t in expr.terms]
        text = pieces[0]
        for piece in pieces[1:]:
            text += f" - {piece[1:]}" if piece.startswith("-") else f" + {piece}"
        return f"({text})"

    def _term(self, term: ir.Expr, wide: bool) -> str:
        if wide and isinstance(term, ir.Broadcast):
            return self._print(term.arg)
        if isinstance(term, ir.Scale) and term.factor == ir.Number(sympy.Integer(-1)):
            return f"-{self._print(term.arg)}"
        return self._print(term)

    def _print_ir_Broadcast(self, expr: ir.Broadcast) -> str:  # noqa: N802
        return f"np.full({self.array_shape(expr.target)}, {self._print(expr.arg)})"

    def _print_ir_Scale(self, expr: ir.Scale) -> str:  # noqa: N802
        if expr.factor == ir.Number(sympy.Integer(-1)):
            return f"(-{self._print(expr.arg)})"
        return f"({self._print(expr.factor)} * {self._print(expr.arg)})"

    def _print_ir_Transpose(self, expr: ir.Transpose) -> str:  # noqa: N802
        inner = self._print(expr.arg)
        if is_scalar(expr.arg) or is_vector_like(expr.arg):
            return inner
        return f"{inner}.T"

    def _print_ir_Hadamard(self, expr: ir.Hadamard) -> str:  # noqa: N802
        left, right = expr.left, expr.right
        if isinstance(right, ir.Apply) and right.func == LOG.name and right.arg == left:
            return f"scipy.special.xlogy({self._print(left)}, {self._print(left)})"
        return f"({self._print(left)} * {self._print(right)})"

    def _print_ir_Divide(self, expr: ir.Divide) -> str:  # noqa: N802
        return f"({self._print(expr.left)} / {self._print(expr.right)})"

    def _print_ir_Power(self, expr: ir.Power) -> str:  # noqa: N802
        exponent = sympy.Rational(expr.exponent)
        base = self._print(expr.base)
        if exponent == sympy.Rational(1, 2):
            return f"np.sqrt({bare(base)})"
        if exponent.q == 1:
            return f"({base} ** {int(exponent)})"
        return f"({base} ** ({exponent.p} / {exponent.q}))"

    def _print_ir_Apply(self, expr: ir.Apply) -> str:  # noqa: N802
        return lookup(expr.func).numpy.code(self._arg(expr.arg))

    def _print_ir_Extremum(self, expr: ir.Extremum) -> str:  # noqa: N802
        func = "np.maximum" if expr.kind == "max" else "np.minimum"
        return f"{func}({self._print(expr.left)}, {self._print(expr.right)})"

    def _print_ir_Norm(self, expr: ir.Norm) -> str:  # noqa: N802
        arg = self._arg(expr.arg)
        if expr.p == "2":
            return f"np.linalg.norm({arg})"
        if expr.p == "1":
            return f"np.sum(np.abs({arg}))"
        return f"np.max(np.abs({arg}))"

    def _print_ir_SumAll(self, expr: ir.SumAll) -> str:  # noqa: N802
        return f"np.sum({self._arg(expr.arg)})"

    def _print_ir_Diag(self, expr: ir.Diag) -> str:  # noqa: N802
        return f"np.diag({self._arg(expr.arg)})"

    def _print_ir_Trace(self, expr: ir.Trace) -> str:  # noqa: N802
        return f"np.trace({self._arg(expr.arg)})"

    def _print_ir_Inverse(self, expr: ir.Inverse) -> str:  # noqa: N802
        if is_scalar(expr.arg):
            return f"(1.0 / {self._print(expr.arg)})"
        return f"np.linalg.inv({self._arg(expr.arg)})"

    def _print_ir_PseudoInverse(self, expr: ir.PseudoInverse) -> str:  # noqa: N802
        return f"np.linalg.pinv({self._arg(expr.arg)})"

    def _print_ir_Block(self, expr: ir.Block) -> str:  # noqa: N802
        rows = [
            "[" + ", ".join(
                f"np.reshape({self._print(b)}, ({self.size(b.shape.rows)}, "
                f"{self.size(b.shape.cols)}))" for b in row
            ) + "]"
            for row in expr.rows
        ]
        return "np.block([" + ", ".join(rows) + "])"

    def _print_ir_LogSumExp(self, expr: LogSumExp) -> str:  # noqa: N802
        return f"scipy.special.logsumexp({self._arg(expr.arg)})"

    def _print_ir_Softmax(self, expr: Softmax) -> str:  # noqa: N802
        return f"scipy.special.softmax({self._arg(expr.arg)})"

    def _print_ir_Vec(self, expr: Vec) -> str:  # noqa: N802
        return f"np.reshape({self._arg(expr.arg)}, -1)"

    def _print_ir_Kron(self, expr: Kron) -> str:  # noqa: N802
        """Sparse where the caller asked for it (a Jacobian for HiGHS: kron(I_m, 1_n) has
        m n nonzeros, not m^2 n), dense otherwise; vectors as the matrices they are."""
        left, right = self._two_d(expr.left), self._two_d(expr.right)
        if self._settings["sparse"]:
            return f"scipy.sparse.kron({left}, {right}, format=\"csr\")"
        return f"np.kron({left}, {right})"

    def _two_d(self, expr: ir.Expr) -> str:
        code = self._print(expr)
        if is_scalar(expr) or is_vector_like(expr):
            rows, cols = self.size(expr.shape.rows), self.size(expr.shape.cols)
            return f"np.reshape({bare(code)}, ({rows}, {cols}))"
        return code

    def _print_ir_Picks(self, expr: Picks) -> str:  # noqa: N802
        relation = ">=" if expr.kind == "max" else "<="
        left, right = self._print(expr.left), self._print(expr.right)
        return f"np.asarray(({left}) {relation} ({right}), dtype=float)"

    # --- product chains ---------------------------------------------------------
    def _print_ir_MatMul(self, expr: ir.MatMul) -> str:  # noqa: N802
        factors = expr.factors
        first, last = factors[0].shape, factors[-1].shape
        if last.cols != 1 and first.rows == 1:
            return self._left_to_right(factors)
        return self._right_to_left(factors)

    def _right_to_left(self, factors: tuple[ir.Expr, ...]) -> str:
        if len(factors) > 1 and isinstance(factors[-1], ir.Diag):
            # a trailing diagonal scales columns: never an m x m np.diag
            rest = factors[:-1]
            acc = self._print(rest[0]) if len(rest) == 1 else self._right_to_left(rest)
            shape = ir.Shape(rest[0].shape.rows, rest[-1].shape.cols)
            return self._apply_right(acc, shape, factors[-1])
        acc, shape = self._print(factors[-1]), factors[-1].shape
        for factor in reversed(factors[:-1]):
            acc = self._apply_left(factor, acc, shape)
            shape = ir.Shape(factor.shape.rows, shape.cols)
        return acc

    def _left_to_right(self, factors: tuple[ir.Expr, ...]) -> str:
        acc, shape = self._print(factors[0]), factors[0].shape
        for factor in factors[1:]:
            acc = self._apply_right(acc, shape, factor)
            shape = ir.Shape(shape.rows, factor.shape.cols)
        return acc

    def _apply_left(self, factor: ir.Expr, acc: str, shape: ir.Shape) -> str:
        """factor @ acc, where acc has ``shape``."""
        if isinstance(factor, ir.Diag):
            weights = self._print(factor.arg)
            return f"({weights} * {acc})" if shape.cols == 1 else f"({weights}[:, None] * {acc})"
        if isinstance(factor, ir.Inverse):
            return self._solve(factor.arg, acc, transpose=False)
        if isinstance(factor, ir.PseudoInverse):
            return f"np.linalg.lstsq({self._print(factor.arg)}, {acc}, rcond=None)[0]"
        if factor.shape.cols == 1 and shape.rows == 1 and shape.cols != 1:
            return f"np.outer({self._print(factor)}, {acc})"
        return f"({self._print(factor)} @ {acc})"

    def _apply_right(self, acc: str, shape: ir.Shape, factor: ir.Expr) -> str:
        """acc @ factor, where acc has ``shape``."""
        if isinstance(factor, ir.Diag):
            return f"({acc} * {self._print(factor.arg)})"
        if isinstance(factor, ir.Inverse):
            return self._solve(factor.arg, acc, transpose=True, row=shape.rows == 1)
        if shape.cols == 1 and factor.shape.rows == 1 and shape.rows != 1:
            return f"np.outer({acc}, {self._print(factor)})"
        return f"({acc} @ {self._print(factor)})"

    def _solve(self, matrix: ir.Expr, rhs: str, transpose: bool, row: bool = False) -> str:
        """inv(matrix) @ rhs (or rhs @ inv(matrix)) by a factorization, never an inverse."""
        if not _data_only(matrix):
            if transpose:
                return f"np.linalg.solve({self._print(matrix)}.T, {rhs}.T).T"
            return f"np.linalg.solve({self._print(matrix)}, {rhs})"
        code, reads = self._inline(matrix)
        definite = isinstance(matrix, ir.Symbol) and "pd" in matrix.facts
        kind = "cho" if definite else "lu"
        factor = self.constants.add(
            ("factor", matrix), f"scipy.linalg.{kind}_factor({code})", reads
        )
        self.used.add(factor)
        if kind == "cho":
            target = rhs if (row or not transpose) else f"{rhs}.T"
            solved = f"scipy.linalg.cho_solve({factor}, {target})"
            return solved if (row or not transpose) else f"{solved}.T"
        if not transpose:
            return f"scipy.linalg.lu_solve({factor}, {rhs})"
        target = rhs if row else f"{rhs}.T"
        solved = f"scipy.linalg.lu_solve({factor}, {target}, trans=1)"
        return solved if row else f"{solved}.T"


def numpy_code(expr: ir.Expr, names: dict[str, str], constants: Constants) -> tuple[str, set[str]]:
    """The numpy code of ``expr`` and the identifiers it reads."""
    printer = NumpyPrinter({"names": names, "constants": constants})
    return bare(printer.code(expr)), printer.used

"""The entries of a problem's constraints on an instance: names, scales, slacks.

A vector (or elementwise matrix) constraint is perturbed entry by entry: entry
``i`` of ``g(x) <= u`` gets its own shift and its own rate, so a vector
constraint reports the vector of its rates, one row an entry (named
``label[i]``, 1-based, ``label[i,j]`` for a matrix, in column order).  A matrix
inequality ``G(x) preceq 0`` is shifted along the identity, ``G(x) preceq u I``:
its rate is ``-trace(Lambda)``, one number for the whole constraint.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from dualize.model import expr as ir
from dualize.model.problem import Constraint, Problem
from dualize.numeric.evaluate import evaluate_2d, shape_of
from dualize.numeric.instance import Instance

BIND_TOL = 1e-6


@dataclass(frozen=True)
class Entry:
    """One perturbable entry: its name, constraint, position and right-hand-side scale."""

    name: str
    constraint: Constraint
    index: tuple[int, int] | None  # 0-based (row, column); None for a matrix inequality
    scale: float


def entries(problem: Problem, instance: Instance) -> list[Entry]:
    """Every entry of every constraint, in the order of the file."""
    out: list[Entry] = []
    for c in problem.constraints:
        constant = _constant_part(c, problem, instance)
        if c.kind == "psd":
            out.append(Entry(c.label, c, None, _scale(constant, None)))
            continue
        rows, cols = shape_of(c.function.shape, instance.dims)
        for j in range(cols):
            for i in range(rows):
                out.append(Entry(_name(c.label, i, j, rows, cols), c, (i, j),
                                 _scale(constant, (i, j))))
    return out


def _name(label: str, i: int, j: int, rows: int, cols: int) -> str:
    if rows == 1 and cols == 1:
        return label
    return f"{label}[{i + 1}]" if cols == 1 else f"{label}[{i + 1},{j + 1}]"


def _constant_part(c: Constraint, problem: Problem, instance: Instance) -> np.ndarray | None:
    """``g(0)``: the normalized function at zero variables, the moved right-hand side.

    None where it is undefined there (a logarithm of zero) or not finite.
    """
    zeros = {v.name: np.zeros(shape_of(v.symbol.sym_shape, instance.dims))
             for v in problem.variables}
    try:
        with np.errstate(all="ignore"):
            value = evaluate_2d(c.function, {**instance.values, **zeros}, instance.dims)
    except (ValueError, TypeError, ArithmeticError, np.linalg.LinAlgError):
        return None
    return value if np.all(np.isfinite(value)) else None


def _scale(constant: np.ndarray | None, index: tuple[int, int] | None) -> float:
    """The entry's own size, else the constraint's largest entry, else 1."""
    if constant is None:
        return 1.0
    if index is not None and abs(constant[index]) > 1e-12:
        return float(abs(constant[index]))
    biggest = float(np.max(np.abs(constant))) if constant.size else 0.0
    return biggest if biggest > 1e-12 else 1.0


def slack(entry: Entry, problem: Problem, instance: Instance,
          x: dict[str, np.ndarray]) -> float:
    """``-g_i(x*)`` (>= 0 when feasible); for a matrix inequality, ``-lambda_max(G(x*))``."""
    point = {**instance.values, **{k: np.asarray(v, dtype=float) for k, v in x.items()}}
    try:
        with np.errstate(all="ignore"):
            value = evaluate_2d(entry.constraint.function, point, instance.dims)
    except (ValueError, TypeError, ArithmeticError, np.linalg.LinAlgError):
        return float("nan")
    if entry.index is None:
        return float(-np.max(np.linalg.eigvalsh((value + value.T) / 2)))
    return float(-value[entry.index])


def binds(entry: Entry, gap: float) -> bool:
    """An equality always binds; an inequality binds when its slack is below tolerance."""
    if entry.constraint.kind == "eq":
        return True
    return gap <= BIND_TOL * max(1.0, entry.scale)


def multiplier_entry(entry: Entry, multipliers: dict[str, np.ndarray]) -> float:
    """The entry's multiplier; the trace of a matrix inequality's multiplier."""
    value = np.asarray(multipliers.get(entry.constraint.label, np.nan), dtype=float)
    if value.size == 1 and not np.isfinite(value).all():
        return float("nan")
    if entry.index is None:
        return float(np.trace(np.atleast_2d(value)))
    return float(np.reshape(value, _shape2(value, entry))[entry.index])


def _shape2(value: np.ndarray, entry: Entry) -> tuple[int, int]:
    if value.ndim == 2:
        return value.shape  # type: ignore[return-value]
    return (value.size, 1) if entry.index is None or entry.index[1] == 0 else (1, value.size)


def shift_for(entry: Entry, posed_shape: tuple[int, ...], amount: float) -> np.ndarray:
    """The shift array that moves only ``entry`` by ``amount``."""
    shift = np.zeros(posed_shape)
    if entry.index is None:
        shift[...] = amount
    else:
        shift.reshape(shift.shape[0], -1)[entry.index] = amount
    return shift


def has_variables(expr: ir.Expr) -> bool:
    return bool(ir.symbols_of(expr, "variable"))

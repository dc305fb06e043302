"""An exact point of affine constraints, from a floating-point one (see ``exact``).

Rows are functions of the flat vector of variable entries (an object array of
Fractions) returning a flat array of Fractions: ``row(z) <= 0`` for an
inequality, ``row(z) == 0`` for an equality.  Affine rows are read off exactly
(value at 0 and at the unit vectors), the rows active at the float point are
solved for a correction over the rationals, and the corrected point is kept only
when every row holds exactly.
"""

from __future__ import annotations

from collections.abc import Callable
from fractions import Fraction

import numpy as np

from dualize.analysis.exact import ACTIVE, MAX_ENTRIES, NotExact, fractions_of

ExactRow = Callable[[np.ndarray], np.ndarray]


def holds(ineq: list[ExactRow], eq: list[ExactRow], z: np.ndarray) -> bool:
    """Every inequality row <= 0 and every equality row == 0, exactly."""
    return all(v <= 0 for row in ineq for v in row(z)) and all(
        v == 0 for row in eq for v in row(z))


def exact_affine_point(ineq: list[ExactRow], eq: list[ExactRow],
                       z: np.ndarray) -> np.ndarray | None:
    """An exact point meeting every row near the float point ``z``, or None."""
    point = fractions_of(np.asarray(z, dtype=float).reshape(-1))
    try:
        if holds(ineq, eq, point):
            return point
        if point.size > MAX_ENTRIES:
            return None
        jac, r0, is_eq = _linear(ineq, eq, point.size)
        residual = [sum((a * b for a, b in zip(r, point, strict=True)), c)
                    for r, c in zip(jac, r0, strict=True)]
        active = [i for i, value in enumerate(residual)
                  if is_eq[i] or value >= -ACTIVE * _scale(jac[i], r0[i], point)]
        step = _solve([jac[i] for i in active], [-residual[i] for i in active], point.size)
    except (NotExact, ZeroDivisionError, OverflowError, ValueError):
        return None
    if step is None:
        return None
    moved = point + fractions_of(step)
    return moved if holds(ineq, eq, moved) else None


def _scale(row: list[Fraction], constant: Fraction, point: np.ndarray) -> Fraction:
    return 1 + abs(constant) + sum((abs(a * b) for a, b in zip(row, point, strict=True)),
                                   Fraction(0))


def _linear(ineq: list[ExactRow], eq: list[ExactRow],
            size: int) -> tuple[list[list[Fraction]], list[Fraction], list[bool]]:
    """(J, r0, is_equality) with rows(z) = r0 + J z, read off exactly."""
    def stacked(z: np.ndarray) -> list[Fraction]:
        return [v for row in (*ineq, *eq) for v in row(z)]

    zero = fractions_of(np.zeros(size))
    r0 = stacked(zero)
    columns = []
    for k in range(size):
        unit = zero.copy()
        unit[k] = Fraction(1)
        columns.append([a - b for a, b in zip(stacked(unit), r0, strict=True)])
    jac = [[columns[k][i] for k in range(size)] for i in range(len(r0))]
    count_ineq = sum(len(row(zero)) for row in ineq)
    return jac, r0, [i >= count_ineq for i in range(len(r0))]


def _solve(rows: list[list[Fraction]], rhs: list[Fraction],
           size: int) -> list[Fraction] | None:
    """A solution of rows @ d = rhs with zeros off the pivot columns (exact Gauss-Jordan);
    None when the system is inconsistent."""
    matrix = [list(r) + [b] for r, b in zip(rows, rhs, strict=True)]
    pivots: list[int] = []
    top = 0
    for col in range(size):
        pick = next((i for i in range(top, len(matrix)) if matrix[i][col] != 0), None)
        if pick is None:
            continue
        matrix[top], matrix[pick] = matrix[pick], matrix[top]
        lead = matrix[top][col]
        matrix[top] = [v / lead for v in matrix[top]]
        for i, other in enumerate(matrix):
            if i != top and other[col] != 0:
                factor = other[col]
                matrix[i] = [a - factor * b for a, b in zip(other, matrix[top], strict=True)]
        pivots.append(col)
        top += 1
    if any(all(v == 0 for v in r[:-1]) and r[-1] != 0 for r in matrix):
        return None
    step = [Fraction(0)] * size
    for i, col in enumerate(pivots):
        step[col] = matrix[i][-1]
    return step

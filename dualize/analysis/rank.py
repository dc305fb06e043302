"""Dependent rows of an affine equality on an instance, by a numerical rank test.

h(x) = J x + h(0) for affine h; its rows are dependent when rank J is below
the number of rows (the multiplier is then not unique).  The rank uses
numpy's SVD tolerance (common practice).
"""

from __future__ import annotations

from typing import Any

import numpy as np

from dualize.analysis import rules as R
from dualize.analysis.layout import SizeUnknown, layout_for
from dualize.analysis.measured import Measured
from dualize.diagnostics import Diagnostic, make
from dualize.model.problem import Constraint, Problem


def dependent_rows(problem: Problem, instance: Measured) -> list[Diagnostic]:
    from dualize.analysis.convexity import constraint_class, variable_signs

    try:
        lay = layout_for(problem, instance)
    except SizeUnknown:
        return []
    signs = variable_signs(problem)
    out = []
    for con in problem.constraints:
        if con.kind != "eq" or constraint_class(con, problem, signs).kind != "affine-equality":
            continue
        rows, rank = _rank(con, lay)
        if rows > 1 and rank < rows:
            detail = f"are linearly dependent on this instance (rank {rank} of {rows} rows)"
            out.append(make(R.DEPENDENT_EQUALITIES, problem.path, con.span, label=con.label,
                            detail=detail))
    return out


def _rank(con: Constraint, lay: Any) -> tuple[int, int]:
    def h(z: np.ndarray) -> np.ndarray:
        return lay.value(con.function, lay.unpack(z)).reshape(-1)

    h0 = h(np.zeros(lay.size))
    jac = np.column_stack([h(np.eye(lay.size)[i]) - h0 for i in range(lay.size)])
    return h0.size, int(np.linalg.matrix_rank(jac))

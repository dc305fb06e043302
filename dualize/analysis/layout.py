"""Primal variables of a problem on an instance, packed into one flat vector.

The phase-one search and the rank test work on a flat numpy vector; this
module fixes the sizes from the instance and maps the vector back to named
values the evaluator reads (the numeric stage's, handed in with the instance:
``dualize.analysis.measured``).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
import sympy

from dualize.analysis.measured import Evaluate, Measured
from dualize.model.problem import Problem


class SizeUnknown(Exception):
    """The instance does not fix a size the problem's variables need."""


@dataclass(frozen=True)
class Layout:
    names: tuple[str, ...]
    shapes: tuple[tuple[int, int], ...]
    values: Mapping[str, Any]
    dims: Mapping[str, int]
    evaluate: Evaluate

    def value(self, expr: Any, point: Mapping[str, Any]) -> np.ndarray:
        """``expr`` at ``point`` (names -> values), as a 2-D array."""
        return self.evaluate(expr, point, self.dims)

    @property
    def size(self) -> int:
        return sum(r * c for r, c in self.shapes)

    def unpack(self, z: np.ndarray) -> dict[str, Any]:
        """The instance's data and the variables' values at ``z``."""
        out = dict(self.values)
        at = 0
        for name, (r, c) in zip(self.names, self.shapes, strict=True):
            out[name] = z[at:at + r * c].reshape(r, c)
            at += r * c
        return out

    def witness(self, z: np.ndarray) -> dict[str, list | float]:
        point = self.unpack(z)
        return {n: _plain(point[n]) for n in self.names}


def _plain(arr: np.ndarray) -> list | float:
    if arr.size == 1:
        return float(arr.reshape(-1)[0])
    return arr.reshape(-1).tolist() if arr.shape[1] == 1 else arr.tolist()


def split_instance(problem: Problem, instance: Any) -> tuple[dict[str, Any], dict[str, int]]:
    """(values, dims) from an ``Instance`` or a plain mapping name -> array."""
    if not isinstance(instance, Mapping):
        return dict(instance.values), dict(instance.dims)
    values = dict(instance)
    dims = {k: int(v) for k, v in values.items() if str(k) in {str(d) for d in problem.dims}
            and np.ndim(v) == 0}
    for decl in problem.data:
        if decl.name in values:
            _bind(decl.symbol.shape, np.asarray(values[decl.name]), dims)
    return values, dims


def _bind(shape: Any, arr: np.ndarray, dims: dict[str, int]) -> None:
    got = arr.shape + (1,) * (2 - arr.ndim) if arr.ndim < 2 else arr.shape
    for size, value in zip((shape.rows, shape.cols), got, strict=False):
        if isinstance(size, sympy.Symbol):
            dims.setdefault(size.name, int(value))


def layout_for(problem: Problem, instance: Measured) -> Layout:
    values, dims = split_instance(problem, instance.data)
    shapes = []
    for v in problem.variables:
        shapes.append(tuple(_size(s, dims) for s in (v.symbol.shape.rows, v.symbol.shape.cols)))
    return Layout(tuple(v.name for v in problem.variables), tuple(shapes), values, dims,
                  instance.evaluate)


def _size(size: sympy.Expr, dims: Mapping[str, int]) -> int:
    free = sorted(size.free_symbols, key=str)
    missing = [str(s) for s in free if str(s) not in dims]
    if missing:
        raise SizeUnknown(", ".join(missing))
    return int(size.subs({s: dims[str(s)] for s in free}))

"""A supremum approached but not attained: the claim climbs to the optimum along a ray.

Some duals are tight without an optimal multiplier: for ``minimize x subject to
x^2 <= 0`` the dual function ``-1/(4 lambda)`` rises to the optimum 0 only as
lambda grows without bound.  A solver stops somewhere on the way, and its value
falls short of the primal optimum by more than the tolerance, which alone would
read as a loose bound.  Here the claim's solution point y is pushed along rays
y + t d (d: the direction of y itself, then each coordinate direction) for t up
to 1e9 times the size of y; when every point stays feasible, the claim's value
never decreases and ends within the tolerance of the optimum, the claim is tight
on that instance and its supremum is not attained.  The ray is kept as evidence.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

from dualize.duality.result import DualProblem
from dualize.numeric.instance import Instance

STEPS = tuple(10.0 ** k for k in range(0, 10))
MAX_COORDINATES = 24


@dataclass(frozen=True)
class Ray:
    """Points start + t direction (by variable name) and the claim's value at each t."""

    start: Mapping[str, object]
    direction: Mapping[str, object]
    values: tuple[tuple[float, float], ...]

    def describe(self) -> str:
        """The ray in words: ``pin = 0.39 + t 1`` and where the values end."""
        parts = [f"{name} = {_short(self.start[name])} + t·{_short(self.direction[name])}"
                 for name in sorted(self.start)]
        t, value = self.values[-1]
        return f"{', '.join(parts)}: at t = {t:.0e} the claim's value is {value:.10g}"


def approach(claim: DualProblem, point: Mapping[str, object], instance: Instance,
             target: float) -> Ray | None:
    """A ray from ``point`` along which the claim rises to ``target``, or None."""
    import numpy as np

    if not point or any(v.set in ("psd", "symmetric") for v in claim.variables):
        return None
    start = {name: np.atleast_1d(np.asarray(value, dtype=float)) for name, value in point.items()}
    for direction in _directions(start):
        ray = _along(claim, start, direction, instance, target)
        if ray is not None:
            return ray
    return None


def _directions(start: dict[str, object]) -> list[dict[str, object]]:
    """The direction of the point itself, then each coordinate direction (both signs)."""
    import numpy as np

    out = []
    size = math.sqrt(sum(float(np.sum(np.square(v))) for v in start.values()))
    if size > 0:
        out.append({k: np.asarray(v) / size for k, v in start.items()})
    coordinates = [(k, i) for k, v in sorted(start.items()) for i in range(np.size(v))]
    if len(coordinates) <= MAX_COORDINATES:
        for name, index in coordinates:
            for sign in (1.0, -1.0):
                d = {k: np.zeros_like(v) for k, v in start.items()}
                d[name].flat[index] = sign
                out.append(d)
    return out


def _along(claim: DualProblem, start: dict[str, object], direction: dict[str, object],
           instance: Instance, target: float) -> Ray | None:
    import numpy as np

    from dualize.numeric.verify import tolerance

    scale = max(1.0, max(float(np.max(np.abs(v))) for v in start.values()))
    sign = 1.0 if claim.sense == "maximize" else -1.0
    seen: list[tuple[float, float]] = []
    for step in STEPS:
        t = step * scale
        point = {k: start[k] + t * direction[k] for k in start}
        value = _value_if_feasible(claim, point, instance)
        if value is None or sign * (value - target) > tolerance(target, value):
            return None
        if seen and sign * (value - seen[-1][1]) < -tolerance(value, seen[-1][1]):
            return None
        seen.append((t, value))
    last = seen[-1][1]
    if abs(last - target) > tolerance(target, last):
        return None
    return Ray(start, direction, tuple(seen))


def _value_if_feasible(claim: DualProblem, point: dict[str, object],
                       instance: Instance) -> float | None:
    """The claim's objective at ``point`` when every constraint and set holds there."""
    import numpy as np

    from dualize.numeric.evaluate import evaluate, shape_of
    from dualize.numeric.verify import tolerance

    values = dict(instance.values)
    for v in claim.variables:
        values[v.name] = np.asarray(point[v.name]).reshape(shape_of(v.symbol.shape,
                                                                    instance.dims))
        if v.set == "nonneg" and np.min(values[v.name]) < -1e-9:
            return None
    try:
        with np.errstate(all="ignore"):
            for c in claim.constraints:
                lhs = np.asarray(evaluate(c.lhs, values, instance.dims), dtype=float)
                rhs = np.asarray(evaluate(c.rhs, values, instance.dims), dtype=float)
                tol = tolerance(float(np.max(np.abs(lhs))), float(np.max(np.abs(rhs))))
                if not _holds(str(c.relation), lhs - rhs, tol):
                    return None
            value = float(evaluate(claim.objective, values, instance.dims))
    except (ValueError, TypeError, ArithmeticError, np.linalg.LinAlgError):
        return None
    return value if math.isfinite(value) else None


def _holds(relation: str, gap: object, tol: float) -> bool:
    import numpy as np

    gap = np.asarray(gap, dtype=float)
    if not np.all(np.isfinite(gap)):
        return False
    if relation == "<=":
        return bool(np.max(gap) <= tol)
    if relation == ">=":
        return bool(np.min(gap) >= -tol)
    if relation in ("=", "=="):
        return bool(np.max(np.abs(gap)) <= tol)
    return False


def _short(value: object) -> str:
    import numpy as np

    flat = np.atleast_1d(np.asarray(value, dtype=float)).ravel()
    shown = ", ".join(f"{x:.4g}" for x in flat[:4]) + (", ..." if flat.size > 4 else "")
    return shown if flat.size == 1 else f"({shown})"

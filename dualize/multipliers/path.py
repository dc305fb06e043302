"""The correspondence between the weight ``w`` and the bound ``t`` on an instance.

Given ``w``: solve the penalized form, ``t = r(x*(w))``; the check solves the
constrained form at that ``t`` and expects the bound's multiplier to equal
``w`` and the same value of ``f``.  Given ``t``: solve the constrained form,
``w`` is the bound's multiplier; the check solves the penalized form at that
``w`` and expects ``r(x*(w)) = t`` (or below ``t`` when the bound is slack and
``w = 0``) and the same ``f``.  Over a range the points make the trade-off
curve: ``t`` falls as ``w`` grows and the optimal ``f`` falls as ``t`` grows
(rises, for a maximization); a violation is reported as a numerical problem,
since the theory rules it out.

At ``t`` equal to the smallest value of ``r`` (a lasso's ``t = 0``) Slater's
condition fails for the bound: the multiplier set is unbounded or empty, so
such points are marked and not counted as failed checks.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, field, replace

import numpy as np

from dualize.deadline import Deadline
from dualize.multipliers.forms import Pair
from dualize.multipliers.solve import Point, Posed
from dualize.numeric.evaluate import evaluate
from dualize.numeric.instance import Instance

MATCH_REL = 1e-5
# A bound's multiplier comes from a conic solve: measured accurate to a few 1e-5 relative
# for squared-norm bounds at small t (1e-7 for the lasso's 1-norm), so weights are
# compared at 1e-4 relative; bounds and objective values at 1e-5.
WEIGHT_REL = 1e-4
MAX_POINTS = 400


@dataclass(frozen=True)
class Match:
    """One point of the correspondence and its check by the other form."""

    weight: float
    bound: float
    objective: float  # f at the solution
    check_weight: float = float("nan")
    check_bound: float = float("nan")
    check_objective: float = float("nan")
    status: str = "agrees"  # agrees, disagrees, edge, failed
    note: str = ""


@dataclass(frozen=True)
class Curve:
    """Matched points in the order of the sweep, and what the curve check found."""

    pair: Pair
    instance: str
    given: str  # "weight" or "bound": which one was swept (or given)
    points: tuple[Match, ...]
    smallest_r: float
    problems: tuple[str, ...] = field(default=())

    def failed(self) -> tuple[Match, ...]:
        return tuple(p for p in self.points if p.status in ("disagrees", "failed"))


class Forms:
    """Both forms posed once on one instance; each solve only changes ``w`` or ``t``."""

    def __init__(self, pair: Pair, instance: Instance) -> None:
        pair = _with_data_bound(pair)
        self.pair, self.instance = pair, instance
        base = {k: v for k, v in instance.values.items() if k not in (pair.weight, pair.bound)}
        self._pen = _Scalar(pair.penalized, instance, base, pair.weight)
        self._con = _Scalar(pair.constrained, instance, base, pair.bound)
        self.bound_fn = next(c for c in pair.constrained.constraints
                             if c.label == pair.label).function

    def penalized(self, w: float) -> Point:
        return self._pen.solve(w)

    def constrained(self, t: float) -> Point:
        return self._con.solve(t)

    def r_and_f(self, point: Point) -> tuple[float, float]:
        """``r(x)`` and ``f(x)`` at a solution (the bound's function is ``r - t``)."""
        values = {**self._con.values(0.0), **point.x}
        r = float(evaluate(self.bound_fn, values, self.instance.dims))
        f = float(evaluate(self.pair.constrained.objective, values, self.instance.dims))
        return r, f


def _with_data_bound(pair: Pair) -> Pair:
    """A pair whose bound ``t`` is data, so that it can vary: a bound written as a number
    or an expression (``r(x) <= 2``) is rewritten from the penalized form."""
    if pair.bound in {d.name for d in pair.constrained.data}:
        return pair
    from dualize.multipliers.reform import other_form

    return other_form(pair.penalized, weight=pair.weight)


class _Scalar:
    """One form whose scalar data ``name`` changes between solves (re-posed each time:
    the value enters the problem's data, not only a right-hand side)."""

    def __init__(self, problem: object, instance: Instance, base: dict, name: str) -> None:
        self.problem, self.instance, self.base, self.name = problem, instance, base, name

    def values(self, value: float) -> dict:
        return {**self.base, self.name: float(value)}

    def solve(self, value: float) -> Point:
        inst = Instance(self.values(value), self.instance.dims, self.instance.source)
        try:
            posed = Posed(self.problem, inst)  # type: ignore[arg-type]
        except (ValueError, TypeError, ArithmeticError):
            return Point("unsupported", float("nan"), {}, {})
        if not posed.convex():
            return Point("not certifiably convex", float("nan"), {}, {})
        return posed.solve()


def smallest_r(forms: Forms) -> float:
    """The smallest value of ``r`` over the other constraints (minus infinity when
    unbounded below; nan when that solve fails): where Slater's condition for the bound
    starts to hold."""
    from dataclasses import replace as swap

    others = tuple(c for c in forms.pair.constrained.constraints if c.label != forms.pair.label)
    lowest = swap(forms.pair.constrained, objective=forms.bound_fn, sense="minimize",
                  constraints=others)
    point = _Scalar(lowest, forms.instance, forms._con.base, forms.pair.bound).solve(0.0)
    if point.status == "unbounded":
        return float("-inf")
    return point.value if point.solved else float("nan")


def from_weight(forms: Forms, w: float, floor: float) -> Match:
    """``t = r(x*(w))``, checked by the constrained form at that ``t``."""
    pen = forms.penalized(w)
    if not pen.solved:
        return Match(w, float("nan"), float("nan"), status="failed",
                     note=f"the penalized form is {pen.status} at this weight")
    t, f = forms.r_and_f(pen)
    con = forms.constrained(t)
    if not con.solved:
        return Match(w, t, f, status="failed",
                     note=f"the constrained form is {con.status} at the matched bound")
    y = float(np.sum(con.multipliers.get(forms.pair.label, np.nan)))
    _, f_c = forms.r_and_f(con)
    match = _judge(Match(w, t, f, check_weight=y, check_bound=t, check_objective=f_c), floor)
    if match.status == "disagrees" and _close(f, f_c) and np.isfinite(y):
        return _reproduced(forms, match)
    return match


def _reproduced(forms: Forms, m: Match) -> Match:
    """A multiplier off ``w`` beyond 1e-4 still matches when the penalized form at the
    multiplier gives back the same bound and value: both weights then give this ``t``
    (the solver's accuracy on the bound, or an interval of weights with one ``t``)."""
    again = forms.penalized(max(m.check_weight, 0.0))
    if not again.solved:
        return m
    r, f = forms.r_and_f(again)
    if not (_close(r, m.bound) and _close(f, m.objective)):
        return m
    off = abs(m.check_weight - m.weight) / max(abs(m.weight), 1.0)
    return replace(m, status="agrees", note=(
        f"the bound's multiplier differs from the weight by {off:.1e} relative, yet the "
        "penalized form at the multiplier gives back the same bound and value: both "
        "weights match this bound (the solver's accuracy on the bound, or several weights "
        "giving the same t, where the multiplier is not unique)"))


def from_bound(forms: Forms, t: float, floor: float) -> Match:
    """``w`` = the bound's multiplier at ``t``, checked by the penalized form at that ``w``."""
    con = forms.constrained(t)
    if not con.solved:
        return Match(float("nan"), t, float("nan"), status="failed",
                     note=f"the constrained form is {con.status} at this bound")
    w = max(float(np.sum(con.multipliers.get(forms.pair.label, np.nan))), 0.0)
    _, f = forms.r_and_f(con)
    pen = forms.penalized(w)
    if not pen.solved:
        return Match(w, t, f, status="failed",
                     note=f"the penalized form is {pen.status} at the matched weight")
    r_w, f_w = forms.r_and_f(pen)
    return _judge(Match(w, t, f, check_weight=w, check_bound=r_w, check_objective=f_w), floor)


def _close(a: float, b: float, rel: float = MATCH_REL) -> bool:
    return bool(abs(a - b) <= rel * max(abs(a), abs(b), 1.0))


def _judge(m: Match, floor: float) -> Match:
    if np.isfinite(floor) and m.bound <= floor + MATCH_REL * max(1.0, abs(floor)):
        return replace(m, status="edge", note=(
            "t is at the smallest value of r: Slater's condition fails for the bound, so "
            "the multiplier is not unique (every large enough w gives this t)"))
    slack_ok = m.weight <= MATCH_REL and m.check_bound <= m.bound + MATCH_REL * max(
        1.0, abs(m.bound))
    same_bound = _close(m.bound, m.check_bound) or slack_ok
    ok = (_close(m.weight, m.check_weight, WEIGHT_REL) and same_bound
          and _close(m.objective, m.check_objective))
    return replace(m, status="agrees" if ok else "disagrees")


def sweep(forms: Forms, given: str, values: Iterable[float],
          tick: Callable[[], None] | None = None, deadline: Deadline | None = None) -> Curve:
    """Match every value (weights or bounds) and check the curve's monotonicity; past
    ``deadline`` the values left are listed as not computed."""
    floor = smallest_r(forms)
    points = []
    for value in values:
        step = from_weight if given == "weight" else from_bound
        if deadline is not None and deadline.expired():
            points.append(_late(given, float(value)))
        else:
            points.append(step(forms, float(value), floor))
        if tick is not None:
            tick()
    curve = Curve(forms.pair, forms.instance.source, given, tuple(points), floor)
    return replace(curve, problems=monotonicity(curve))


def _late(given: str, value: float) -> Match:
    nan = float("nan")
    weight, bound = (value, nan) if given == "weight" else (nan, value)
    return Match(weight, bound, nan, status="failed",
                 note="not computed: the time limit was reached")


def monotonicity(curve: Curve) -> tuple[str, ...]:
    """t non-increasing in w; optimal f non-increasing in t (non-decreasing to maximize)."""
    good = [p for p in curve.points if p.status in ("agrees", "edge")]
    out = []
    by_w = sorted(good, key=lambda p: p.weight)
    out += _rises([p.bound for p in by_w], "t = r(x*(w))", "w", [p.weight for p in by_w], 1)
    by_t = sorted(good, key=lambda p: p.bound)
    sign = 1 if curve.pair.sense == "minimize" else -1
    out += _rises([p.objective for p in by_t], "the optimal f", "t",
                  [p.bound for p in by_t], sign)
    return tuple(out)


def _rises(ys: list[float], what: str, over: str, xs: list[float], sign: int) -> list[str]:
    """Where ``sign * y`` goes up as ``x`` grows, beyond the matching tolerance."""
    scale = max((abs(y) for y in ys), default=1.0)
    out = []
    for k in range(1, len(ys)):
        if sign * (ys[k] - ys[k - 1]) > MATCH_REL * max(scale, 1.0):
            direction = "rises" if sign > 0 else "falls"
            out.append(f"numerical problem: {what} {direction} from {ys[k - 1]:.6g} to "
                       f"{ys[k]:.6g} between {over} = {xs[k - 1]:.6g} and {xs[k]:.6g}, "
                       "which the theory rules out")
    return out


def grid(text: str, given: str) -> list[float]:
    """``LO:HI:N`` as N points (geometric for weights when LO > 0, else even)."""
    from dualize.errors import DualizeError

    parts = text.split(":")
    try:
        lo, hi, n = float(parts[0]), float(parts[1]), int(parts[2])
    except (ValueError, IndexError):
        raise DualizeError(f"bad range '{text}': write LO:HI:N, e.g. 0.01:10:25",
                           exit_code=2) from None
    if len(parts) != 3 or not (np.isfinite(lo) and np.isfinite(hi)) or not 2 <= n <= MAX_POINTS \
            or lo >= hi or (given == "weight" and lo < 0):
        raise DualizeError(f"bad range '{text}': need LO < HI (LO >= 0 for weights) and 2 <= N "
                           f"<= {MAX_POINTS}", exit_code=2)
    if given == "weight" and lo > 0:
        return [float(v) for v in np.geomspace(lo, hi, n)]
    return [float(v) for v in np.linspace(lo, hi, n)]

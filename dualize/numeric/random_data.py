"""Random instances that honour every declared set and, where the structure
allows, make the primal strictly feasible.

The feasibility rule, in full:

1. Every dimension symbol not given is drawn uniformly from 3..6.
2. Every data value is drawn in its declared set: R_++ entries from
   [0.5, 2], R_+ entries from [0.1, 2], S^n as (B + B')/2, S^n_+ and S^n_++ as a
   random Gram matrix G G'/n plus 0.1 I; anything else standard normal.
3. A point x0 is drawn strictly inside each variable's domain: entries of free,
   R_+ and R_++ variables from [0.25, 1] (positive, so that sign constraints
   written as constraints, ``x >= 0``, hold strictly too), boxes in the middle
   half of [lo, hi], integers from {0, 1, 2}, binaries from {0, 1}, matrix
   variables in S^n (any of S^n, S^n_+, S^n_++) as a Gram matrix plus I.
4. A constraint with a data symbol alone on one side (``A*x == b``,
   ``G*x <= h``, ``||x|| <= r``, ``alpha <= C`` with C broadcast) whose symbol
   occurs in no other constraint, not on the other side and not in a domain
   bound, gets that data reset to the other side at x0 (the same holds for a
   data symbol that is one additive term of the normalized function, such as
   ``b`` in ``A*x - b <= 0``, with its coefficient divided out): equal for an
   equality, plus a positive slack from [0.1, 1] (times I for a matrix
   inequality) where the data is the upper side, minus one where it is the
   lower side.  An upper side pushed out of its set is raised back into it
   (which keeps x0 strictly feasible).  When a lower or equal side falls
   outside its set, x0 is redrawn (up to 20 times); if that never works the
   data keeps its step-2 value and feasibility is not promised.

5. Before step 4, when x0 violates a constraint that no target covers
   (``sum(x) == 1``), x0 is moved to the nearest point (least squares) that
   satisfies those constraints with a margin of 0.05 and keeps the arguments
   of every log and sqrt above 0.05 (then 1e-3, then 1e-6 when that is
   impossible); this needs a convex solve and is skipped when those
   constraints are not convex.

Constraints without such a data symbol that x0 cannot be moved into are left
as they are: the primal is then feasible only if some point happens to satisfy
them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import sympy

from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.model.problem import Constraint, Problem, Variable
from dualize.numeric.evaluate import evaluate, shape_of
from dualize.numeric.instance import Instance, set_violation

ATTEMPTS = 20


@dataclass(frozen=True)
class Target:
    """A data symbol alone on one side of a constraint: ``side`` is upper|lower|equal."""

    name: str
    other: ir.Expr
    side: str
    broadcast: bool
    psd: bool = False


def random_instance(problem: Problem, dims: dict[str, int] | None = None,
                    seed: int = 0) -> Instance:
    """A random instance of ``problem`` (see the module docstring for the rule)."""
    rng = np.random.default_rng(seed)
    sizes = draw_dims(problem, dims or {}, rng)
    values = {d.name: draw_value(d.symbol, sizes, rng) for d in problem.data}
    targets = find_targets(problem)
    for _ in range(ATTEMPTS):
        point = repair_point(problem, targets, values, draw_point(problem, values, sizes, rng),
                             sizes)
        fixed = _apply_targets(problem, targets, values, point, sizes, rng)
        if fixed is not None:
            values = fixed
            break
    return Instance(dict(sorted(values.items())), sizes, f"random(seed={seed})")


def draw_dims(problem: Problem, given: dict[str, int],
              rng: np.random.Generator) -> dict[str, int]:
    out = {}
    for dim in problem.dims:
        out[dim.name] = int(given[dim.name]) if dim.name in given else int(rng.integers(3, 7))
    return dict(sorted(out.items()))


def draw_value(symbol: ir.Symbol, dims: dict[str, int],
               rng: np.random.Generator) -> np.ndarray | float:
    """A value of ``symbol``'s shape inside the set its facts describe."""
    rows, cols = shape_of(symbol.sym_shape, dims)
    facts = symbol.facts
    if "pd" in facts:
        return _gram(rows, rng, 0.1)
    if "psd" in facts:
        return _low_rank_gram(rows, rng)
    if "symmetric" in facts:
        b = rng.normal(size=(rows, rows))
        return (b + b.T) / 2
    if "binary" in facts:
        arr = rng.integers(0, 2, size=(rows, cols)).astype(float)
    elif "integer" in facts:
        arr = rng.integers(-3, 4, size=(rows, cols)).astype(float)
    elif "pos" in facts:
        arr = rng.uniform(0.5, 2.0, size=(rows, cols))
    elif "nonneg" in facts:
        arr = rng.uniform(0.1, 2.0, size=(rows, cols))
    else:
        arr = rng.normal(size=(rows, cols))
    return _stored(arr)


def _gram(n: int, rng: np.random.Generator, shift: float) -> np.ndarray:
    g = rng.normal(size=(n, n))
    return g @ g.T / n + shift * np.eye(n)


def _low_rank_gram(n: int, rng: np.random.Generator) -> np.ndarray:
    """A singular member of S^n_+ (rank about n/2): S^n_+ data need not be invertible,
    and the singular case is the one that tests the range conditions.

    The factor has small dyadic entries (multiples of 1/4), so every product and sum
    is exact in floating point and the matrix is semidefinite exactly, as the exact
    test of an instance's sets requires (a float Gram matrix ``G G'`` is not: rounding
    leaves eigenvalues of about -1e-17 that an exact test rightly rejects)."""
    g = rng.integers(-4, 5, size=(n, max(1, n // 2))) / 4.0
    return g @ g.T / 4.0


def _stored(arr: np.ndarray) -> np.ndarray | float:
    """Scalars as floats, column vectors 1-D, matrices 2-D (the Instance form)."""
    if arr.size == 1 and arr.ndim == 2 and arr.shape == (1, 1):
        return float(arr[0, 0])
    if arr.ndim == 2 and arr.shape[1] == 1:
        return arr[:, 0].copy()
    return arr


def draw_point(problem: Problem, values: dict[str, np.ndarray | float], dims: dict[str, int],
               rng: np.random.Generator) -> dict[str, np.ndarray | float]:
    """A point strictly inside every variable's domain."""
    return {v.name: _draw_in_domain(v, values, dims, rng) for v in problem.variables}


def _draw_in_domain(var: Variable, values: dict[str, np.ndarray | float],
                    dims: dict[str, int], rng: np.random.Generator) -> np.ndarray | float:
    rows, cols = shape_of(var.symbol.sym_shape, dims)
    kind = var.domain.kind
    if kind in ("symmetric", "psd", "pd"):
        return _gram(rows, rng, 1.0)
    if kind == "binary":
        return _stored(rng.integers(0, 2, size=(rows, cols)).astype(float))
    if kind == "integer":
        return _stored(rng.integers(0, 3, size=(rows, cols)).astype(float))
    if kind == "box":
        lo = float(evaluate(var.domain.lo, values, dims))
        hi = float(evaluate(var.domain.hi, values, dims))
        return _stored(lo + (hi - lo) * rng.uniform(0.25, 0.75, size=(rows, cols)))
    return _stored(rng.uniform(0.25, 1.0, size=(rows, cols)))


def find_targets(problem: Problem) -> tuple[Target | None, ...]:
    """For each constraint, the data symbol the rule may reset, if any."""
    bound_names = _domain_data(problem)
    out: list[Target | None] = []
    for index, con in enumerate(problem.constraints):
        others = [c for i, c in enumerate(problem.constraints) if i != index]
        out.append(_target_of(con, others, bound_names))
    return tuple(out)


def _domain_data(problem: Problem) -> frozenset[str]:
    names: set[str] = set()
    for var in problem.variables:
        for bound in (var.domain.lo, var.domain.hi):
            if bound is not None:
                names.update(s.name for s in ir.symbols_of(bound))
    return frozenset(names)


def _lone_data(side: ir.Expr) -> tuple[str, bool] | None:
    if isinstance(side, ir.Symbol) and side.role == "data":
        return side.name, False
    if isinstance(side, ir.Broadcast) and isinstance(side.arg, ir.Symbol) \
            and side.arg.role == "data":
        return side.arg.name, True
    return None


def _target_of(con: Constraint, others: list[Constraint],
               bound_names: frozenset[str]) -> Target | None:
    for data_side, other, upper_when in ((con.rhs, con.lhs, ("<=", "preceq")),
                                         (con.lhs, con.rhs, (">=", "succeq"))):
        lone = _lone_data(data_side)
        if lone is None:
            continue
        name, broadcast = lone
        used = ir.depends_on(other, {name}) or name in bound_names or any(
            ir.depends_on(c.lhs, {name}) or ir.depends_on(c.rhs, {name}) for c in others)
        if used or (broadcast and con.kind == "eq"):
            continue
        side = "equal" if con.kind == "eq" else (
            "upper" if con.relation in upper_when else "lower")
        return Target(name, other, side, broadcast, con.kind == "psd")
    return _additive_target(con, others, bound_names)


def signed_terms(e: ir.Expr, k: sympy.Rational = ir.ONE
                 ) -> list[tuple[sympy.Rational, ir.Expr]]:
    """``e`` as a sum of rational multiples of terms (sums and number scalings flattened)."""
    if isinstance(e, ir.Add):
        return [pair for t in e.terms for pair in signed_terms(t, k)]
    if isinstance(e, ir.Scale) and isinstance(e.factor, ir.Number) \
            and not e.factor.value.free_symbols:
        return signed_terms(e.arg, k * e.factor.value)
    return [(k, e)]


def _additive_target(con: Constraint, others: list[Constraint],
                     bound_names: frozenset[str]) -> Target | None:
    """Data as one additive term k*D of the normalized function: ``A*x - b <= 0``."""
    terms = signed_terms(con.function)
    for index, (k, term) in enumerate(terms):
        lone = _lone_data(term)
        if lone is None or k == 0 or (lone[1] and con.kind == "eq"):
            continue
        name = lone[0]
        rest = [ir.Scale(ir.Number(c), t) for i, (c, t) in enumerate(terms) if i != index]
        if name in bound_names or any(ir.depends_on(t, {name}) for t in rest) or any(
                ir.depends_on(c.function, {name}) for c in others):
            continue
        body = rest[0] if len(rest) == 1 else ir.Add(tuple(rest)) if rest else \
            ir.Zero(term.shape)
        # F = k D + rest: D = -rest / k, and for F <= 0 D is the upper side when k < 0.
        side = "equal" if con.kind == "eq" else ("upper" if k < 0 else "lower")
        other = ir.Scale(ir.Number(-1 / k), body)
        return Target(name, other, side, lone[1], con.kind == "psd")
    return None


def _apply_targets(problem: Problem, targets: tuple[Target | None, ...],
                   values: dict[str, np.ndarray | float], point: dict[str, np.ndarray | float],
                   dims: dict[str, int], rng: np.random.Generator
                   ) -> dict[str, np.ndarray | float] | None:
    """The values with every target reset at ``point``, or None if a set is violated."""
    out = dict(values)
    facts = {d.name: d.symbol.facts for d in problem.data}
    for target in targets:
        if target is None:
            continue
        new = _target_value(target, {**values, **point}, dims, rng)
        if set_violation(new, facts[target.name]):
            if target.side != "upper":
                return None
            new = _raise_into_set(new, facts[target.name])
        out[target.name] = new
    return out


def _target_value(target: Target, env: dict[str, np.ndarray | float], dims: dict[str, int],
                  rng: np.random.Generator) -> np.ndarray | float:
    other = np.atleast_2d(np.asarray(evaluate(target.other, env, dims), dtype=float))
    if target.broadcast:
        other = np.array([[other.max() if target.side == "upper" else other.min()]])
    sign = {"upper": 1.0, "lower": -1.0, "equal": 0.0}[target.side]
    if target.psd:
        slack = float(rng.uniform(0.1, 1.0)) * np.eye(other.shape[0])
    else:
        slack = rng.uniform(0.1, 1.0, size=other.shape)
    return _stored(other + sign * slack)


def _raise_into_set(value: np.ndarray | float, facts: frozenset[str]) -> np.ndarray | float:
    """A larger value (entrywise, or in the semidefinite order) inside the set."""
    arr = np.asarray(value, dtype=float)
    if facts & {"psd", "pd", "symmetric"} and arr.ndim == 2:
        sym = (arr + arr.T) / 2
        low = float(np.linalg.eigvalsh(sym)[0])
        return sym + (max(0.0, -low) + 0.1) * np.eye(arr.shape[0])
    floor = 0.1 if facts & {"pos", "nonneg"} else -np.inf
    raised = np.maximum(arr, floor)
    return float(raised) if raised.ndim == 0 else raised


MARGIN = 0.05
MARGINS = (MARGIN, 1e-3, 1e-6)  # tried in turn: sum(x) == 1 over n = 40 needs x_i < 0.05


def repair_point(problem: Problem, targets: tuple[Target | None, ...],
                 values: dict[str, np.ndarray | float], point: dict[str, np.ndarray | float],
                 dims: dict[str, int]) -> dict[str, np.ndarray | float]:
    """x0 moved into the constraints no target covers (rule 5), or x0 unchanged."""
    loose = [c for c, t in zip(problem.constraints, targets, strict=True) if t is None]
    env = {**values, **point}
    if all(_holds(c, env, dims) for c in loose):
        return point
    for margin in MARGINS:
        try:
            moved = _project(problem, loose, values, point, dims, margin)
        except (ValueError, TypeError, ArithmeticError):
            return point
        if moved is not None:
            return moved
    return point


def _holds(con: Constraint, env: dict[str, np.ndarray | float], dims: dict[str, int]) -> bool:
    with np.errstate(all="ignore"):
        f = np.asarray(evaluate(con.function, env, dims), dtype=float)
    if con.kind == "eq":
        return bool(np.all(np.abs(f) <= 1e-9))
    if con.kind == "psd":
        return bool(np.linalg.eigvalsh((f + f.T) / 2)[-1] < 0)
    return bool(np.all(f < 0))


def _project(problem: Problem, loose: list[Constraint], values: dict[str, np.ndarray | float],
             point: dict[str, np.ndarray | float], dims: dict[str, int], margin: float
             ) -> dict[str, np.ndarray | float] | None:
    """The nearest point satisfying ``loose`` with ``margin``; None when there is none."""
    import cvxpy as cp

    from dualize.numeric.reference import domain_constraints, make_variable, run_solver
    from dualize.numeric.translate import to_cvxpy

    inst = Instance(values, dims)
    variables, cons = {}, []
    for var in problem.variables:
        if var.domain.kind in ("binary", "integer"):
            raise ValueError("integer domains are not projected onto")
        x, _ = make_variable(var, dims)
        variables[var.name] = x
        cons += domain_constraints(var, x, inst)
    for con in loose:
        f = to_cvxpy(con.function, variables, values, dims)
        cons.append(_with_margin(con.kind, f, margin))
    cons += _log_domains(problem, variables, values, dims, margin)
    distance = sum(cp.sum_squares(variables[k] - np.reshape(np.asarray(point[k]),
                                                             variables[k].shape))
                   for k in sorted(variables))
    prob = cp.Problem(cp.Minimize(distance), cons)
    if not prob.is_dcp():
        raise ValueError("the loose constraints are not certifiably convex")
    if run_solver(prob) not in ("optimal", "inaccurate"):
        return None
    return {k: _stored(np.asarray(v.value)) for k, v in variables.items()}


def _with_margin(kind: str, f: object, margin: float) -> object:
    if kind == "eq":
        return f == 0
    if kind == "psd":
        size = f.shape[0]  # type: ignore[attr-defined]
        return (f + f.T) / 2 << -margin * np.eye(size)  # type: ignore[attr-defined]
    return f <= -margin


def _log_domains(problem: Problem, variables: dict[str, object],
                 values: dict[str, np.ndarray | float], dims: dict[str, int],
                 margin: float) -> list[object]:
    """arg >= margin for every log or sqrt of a variable expression that cvxpy accepts."""
    from dualize.numeric.translate import to_cvxpy

    exprs = [problem.objective] + [c.function for c in problem.constraints]
    args = [node.arg for e in exprs for node in ir.walk(e)
            if isinstance(node, ir.Apply) and lookup(node.func).keep_positive
            and ir.depends_on(node.arg, set(variables))]
    out = []
    for arg in args:
        con = to_cvxpy(arg, variables, values, dims) >= margin
        if con.is_dcp():
            out.append(con)
    return out

"""Random data that also makes the derived dual strictly feasible.

A random instance with a feasible primal can still be unbounded (an LP whose
cost points out of the feasible set): then neither side has a finite value
and nothing is checked.  By weak duality a feasible dual bounds the primal, so
``verify`` also applies the rule of ``random_data`` to the dual:

- a y0 is drawn inside every dual variable's set (entries of nonneg variables
  from [0.25, 1], nonpos the negatives, free standard normal, psd a Gram
  matrix plus I);
- a dual constraint whose function ``lhs - rhs`` has a data symbol as one
  additive term (``A'y + c = 0``, ``nu A1 + C succeq 0``, ``A'nu >= -c``), the
  symbol occurring nowhere else in the constraint, in no other dual
  constraint, in no primal constraint and no domain bound, gets that data set
  so that the constraint holds at y0: with equality, or with a slack from
  [0.1, 1] (times I for a matrix inequality) on the strict side;
- when a reset value falls outside its declared set, y0 is shrunk (scales 1,
  0.3, 0.1, 0.01) and the rule tried again; failing that, the data keep their
  values.

The primal constraints never contain the reset data, so primal feasibility
set up by ``random_data`` is kept.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import sympy

from dualize.duality.result import Derivation, DualConstraint, DualVariable
from dualize.model import expr as ir
from dualize.numeric.evaluate import evaluate_2d, shape_of
from dualize.numeric.instance import Instance, set_violation
from dualize.numeric.random_data import signed_terms

SCALES = (1.0, 0.3, 0.1, 0.01)


@dataclass(frozen=True)
class DualTarget:
    """Data ``name`` enters ``constraint`` as ``coef * name`` plus the rest."""

    name: str
    coef: float
    rest: ir.Expr
    relation: str


def make_dual_feasible(derivation: Derivation, instance: Instance, seed: int) -> Instance:
    """``instance`` with data reset so the derived dual is strictly feasible (see above)."""
    targets = dual_targets(derivation)
    if not targets:
        return instance
    rng = np.random.default_rng(seed + 7919)
    facts = {d.name: d.symbol.facts for d in derivation.problem.data}
    base = _draw_dual_point(derivation.dual.variables, instance.dims, rng)
    for scale in SCALES:
        point = {k: scale * v for k, v in base.items()}
        values = _reset(targets, instance, point, facts, rng)
        if values is not None:
            return replace(instance, values=dict(sorted(values.items())))
    return instance


def dual_targets(derivation: Derivation) -> tuple[DualTarget, ...]:
    """The dual constraints the rule applies to, one data symbol each."""
    problem = derivation.problem
    data_names = {d.name for d in problem.data}
    blocked = _primal_names(derivation)
    out, used = [], set()
    cons = derivation.dual.constraints
    for index, con in enumerate(cons):
        others = [c for i, c in enumerate(cons) if i != index]
        target = _target_of(con, others, data_names - blocked - used)
        if target is not None:
            out.append(target)
            used.add(target.name)
    return tuple(out)


def _primal_names(derivation: Derivation) -> set[str]:
    names: set[str] = set()
    for con in derivation.problem.constraints:
        names.update(s.name for s in ir.symbols_of(con.function))
    for var in derivation.problem.variables:
        for bound in (var.domain.lo, var.domain.hi):
            if bound is not None:
                names.update(s.name for s in ir.symbols_of(bound))
    return names


def _terms(con: DualConstraint) -> list[tuple[sympy.Rational, ir.Expr]]:
    """``lhs - rhs`` as rational multiples of terms."""
    minus = ir.Scale(ir.Number(sympy.Integer(-1)), con.rhs)
    return signed_terms(ir.Add((con.lhs, minus)))


def _target_of(con: DualConstraint, others: list[DualConstraint],
               allowed: set[str]) -> DualTarget | None:
    if con.relation not in ("=", "<=", ">=", "succeq", "preceq"):
        return None
    terms = _terms(con)
    for index, (k, term) in enumerate(terms):
        if not (isinstance(term, ir.Symbol) and term.role == "data") or k == 0 \
                or term.name not in allowed:
            continue
        name = term.name
        rest_terms = [ir.Scale(ir.Number(c), t) for i, (c, t) in enumerate(terms) if i != index]
        if any(ir.depends_on(t, {name}) for t in rest_terms) or any(
                ir.depends_on(c.lhs, {name}) or ir.depends_on(c.rhs, {name}) for c in others):
            continue
        return DualTarget(name, float(k), _sum(rest_terms, term.shape), con.relation)
    return None


def _sum(terms: list[ir.Expr], shape: ir.Shape) -> ir.Expr:
    if not terms:
        return ir.Zero(shape)
    return terms[0] if len(terms) == 1 else ir.Add(tuple(terms))


def _draw_dual_point(variables: tuple[DualVariable, ...], dims: dict[str, int],
                     rng: np.random.Generator) -> dict[str, np.ndarray]:
    out = {}
    for var in variables:
        rows, cols = shape_of(var.symbol.sym_shape, dims)
        if var.set == "psd":
            g = rng.normal(size=(rows, rows))
            out[var.name] = g @ g.T / rows + np.eye(rows)
        elif var.set == "symmetric":
            b = rng.normal(size=(rows, rows))
            out[var.name] = (b + b.T) / 2
        elif var.set in ("nonneg", "nonpos"):
            sign = 1.0 if var.set == "nonneg" else -1.0
            out[var.name] = sign * rng.uniform(0.25, 1.0, size=(rows, cols))
        else:
            out[var.name] = rng.normal(size=(rows, cols))
    return out


def _reset(targets: tuple[DualTarget, ...], instance: Instance, point: dict[str, np.ndarray],
           facts: dict[str, frozenset[str]], rng: np.random.Generator
           ) -> dict[str, np.ndarray | float] | None:
    values = dict(instance.values)
    env = {**values, **point}
    for target in targets:
        rest = evaluate_2d(target.rest, env, instance.dims)
        new = (_goal(target.relation, rest.shape, rng) - rest) / target.coef
        stored = _stored(new, values[target.name])
        if set_violation(stored, facts[target.name]):
            return None
        values[target.name] = stored
    return values


def _goal(relation: str, shape: tuple[int, int], rng: np.random.Generator) -> np.ndarray:
    """What ``lhs - rhs`` should equal at y0: 0, or a slack on the strict side."""
    if relation == "=":
        return np.zeros(shape)
    sign = 1.0 if relation in (">=", "succeq") else -1.0
    if relation in ("succeq", "preceq"):
        return sign * float(rng.uniform(0.1, 1.0)) * np.eye(shape[0])
    return sign * rng.uniform(0.1, 1.0, size=shape)


def _stored(new: np.ndarray, old: np.ndarray | float) -> np.ndarray | float:
    if isinstance(old, float):
        return float(new.reshape(-1)[0])
    return new.reshape(np.shape(old)).copy()

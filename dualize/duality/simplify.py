"""Simplifying a dual problem into its textbook form.  Every rule is an
equivalence (the optimal value and the optimal remaining multipliers are
unchanged) and is recorded as a step.

* A multiplier beta >= 0 that occurs only as +-beta in one equation E = 0 is
  eliminated: beta = -+E0 >= 0 turns the equation into an inequality
  (C 1 - alpha - beta = 0 becomes alpha <= C 1).  The same with a
  semidefinite multiplier gives a matrix inequality.
* An auxiliary multiplier z that occurs as +-z in an equation is substituted
  away.
* A free scalar multiplier in which the objective is smooth and strictly
  concave, and which occurs in no constraint, is maximized in closed form when
  its stationarity equation has one real solution (the entropy dual).
"""

from __future__ import annotations

from dataclasses import replace

import sympy

from dualize.duality import build as b
from dualize.duality import derivation_cache as cache
from dualize.duality.normal import Term, expand, node_key, rebuild, tidy
from dualize.duality.result import DualConstraint, DualProblem, DualVariable, Equation, Step
from dualize.duality.scalar import Scope, from_sympy, to_sympy
from dualize.model.expr import Apply, Expr, Ones, Symbol, depends_on, substitute
from dualize.model.functions import EXP
from dualize.model.problem import Problem

FLIP = {"<=": ">=", ">=": "<=", "succeq": "preceq", "preceq": "succeq", "=": "="}


def simplify(dual: DualProblem, problem: Problem) -> tuple[DualProblem, list[Step]]:
    """The simplified dual and the steps taken; each step that fixes a multiplier
    carries it as its one equation ``y = value`` (see ``substitutions``)."""
    steps: list[Step] = []
    if dual.unbounded:
        return dual, steps
    changed = True
    while changed:
        changed = False
        for rule in (_eliminate_slack, _substitute_auxiliary):
            result = rule(dual)
            if result is not None:
                dual, step = result
                steps.append(step)
                changed = True
                break
    result = _maximize_free_scalars(dual)
    if result is not None:  # a partial maximum: the smoothness fact is not carried over
        dual, more = replace(result[0], strictly_convex_boxes=()), result[1]
        steps.extend(more)
    dual = replace(dual, constraints=_distinct(tuple(_readable(c) for c in dual.constraints)))
    return dual, steps


def _occurs(dual: DualProblem, name: str, skip: int | None = None) -> bool:
    if depends_on(dual.objective, {name}):
        return True
    return any(i != skip and (depends_on(c.lhs, {name}) or depends_on(c.rhs, {name}))
               for i, c in enumerate(dual.constraints))


def _lone_term(terms: list[Term], y: Symbol) -> tuple[int, sympy.Expr] | None:
    """(index, coefficient) of the term that is exactly +-y, when y occurs nowhere else."""
    found = None
    for i, t in enumerate(terms):
        parts = t.scalars + t.chain
        if not any(depends_on(p, {y.name}) for p in parts):
            continue
        if found is not None or parts != (y,) or abs(t.coef) != 1:
            return None
        found = (i, t.coef)
    return found


def _eliminate_slack(dual: DualProblem):  # type: ignore[no-untyped-def]
    for i, c in enumerate(dual.constraints):
        if c.relation != "=" or not b.is_zero(c.rhs):
            continue
        terms = expand(c.lhs)
        for v in dual.variables:
            if v.set not in ("nonneg", "psd") or v.symbol.shape != c.lhs.shape:
                continue
            hit = _lone_term(terms, v.symbol)
            if hit is None or _occurs(dual, v.name, skip=i):
                continue
            k, coef = hit
            rest = rebuild(terms[:k] + terms[k + 1 :], c.lhs.shape)
            cone = "succeq" if v.set == "psd" else ">="
            relation = cone if coef < 0 else FLIP[cone]
            new = DualConstraint(tidy(rest), relation, b.zeros(rest.shape),  # type: ignore[arg-type]
                                 f"{c.reason}; the multiplier {v.name} was eliminated",
                                 c.label)
            dual = _without(dual, v.name, i, new)
            text = (f"The multiplier ${v.name}$ occurs only in this equation, with its sign fixed "
                    "by its set: eliminating it turns the equation into an inequality.")
            return dual, Step("eliminate-slack-multiplier", text,
                              (Equation(new.lhs, relation, new.rhs),))  # type: ignore[arg-type]
    return None


def _without(dual: DualProblem, name: str, index: int, new: DualConstraint | None) -> DualProblem:
    constraints = list(dual.constraints)
    if new is None:
        del constraints[index]
    else:
        constraints[index] = new
    variables = tuple(v for v in dual.variables if v.name != name)
    return replace(dual, variables=variables, constraints=tuple(constraints))


def _substitute_auxiliary(dual: DualProblem):  # type: ignore[no-untyped-def]
    """y = value from an equation +-y + rest = 0: an auxiliary multiplier always, any
    other free or nonnegative multiplier when the value involves no multiplier."""
    for i, c in enumerate(dual.constraints):
        if c.relation != "=" or not b.is_zero(c.rhs):
            continue
        terms = expand(c.lhs)
        for v in dual.variables:
            if v.symbol.shape != c.lhs.shape or v.set not in ("free", "nonneg"):
                continue
            hit = _lone_term(terms, v.symbol)
            if hit is None:
                continue
            k, coef = hit
            rest = rebuild(terms[:k] + terms[k + 1 :], c.lhs.shape)
            auxiliary = v.set == "free" and v.origin.startswith("auxiliary")
            if not auxiliary and any(w.name != v.name and depends_on(rest, {w.name})
                                     for w in dual.variables):
                continue
            value = tidy(b.scale(b.num(-coef), rest))
            keep = None
            if v.set == "nonneg" and not _positive_number(value):
                keep = DualConstraint(value, ">=", b.zeros(value.shape),  # type: ignore[arg-type]
                                      f"the multiplier {v.name} is nonnegative", c.label)
            dual = _without(dual, v.name, i, keep)
            dual = _substitute(dual, v.symbol, value)
            text = f"The equation determines ${v.name}$; substituting it leaves the others."
            return dual, Step("substitute-multiplier", text, (Equation(v.symbol, "=", value),))
    return None


def _positive_number(e: Expr) -> bool:
    from dualize.model.expr import Number

    return isinstance(e, Number) and e.value > 0


def _substitute(dual: DualProblem, y: Symbol, value: Expr) -> DualProblem:
    mapping = {y: value}
    constraints = tuple(
        replace(c, lhs=tidy(substitute(c.lhs, mapping)), rhs=tidy(substitute(c.rhs, mapping)))
        for c in dual.constraints
    )
    return replace(dual, objective=tidy(substitute(dual.objective, mapping)),
                   constraints=constraints)


# -- closed-form maximization over a free scalar multiplier ----------------------


def _maximize_free_scalars(dual: DualProblem):  # type: ignore[no-untyped-def]
    steps = []
    for v in dual.variables:
        if v.set != "free" or not v.symbol.shape.is_scalar or dual.inner:
            continue
        if any(depends_on(c.lhs, {v.name}) or depends_on(c.rhs, {v.name})
               for c in dual.constraints):
            continue
        if not depends_on(dual.objective, {v.name}):
            continue
        result = _maximize_over(dual.objective, v)
        if result is None:
            continue
        value, argmax = result
        dual = replace(dual, objective=value,
                       variables=tuple(w for w in dual.variables if w.name != v.name))
        steps.append(Step("maximize-free-multiplier", (
            f"The dual objective is smooth and strictly concave in the free multiplier ${v.name}$, "
            "which occurs in no constraint: setting its derivative to zero gives it in closed "
            "form."), (Equation(v.symbol, "=", argmax),)))
    return (dual, steps) if steps else None


def _maximize_over(objective: Expr, v: DualVariable) -> tuple[Expr, Expr] | None:
    scope = Scope()
    expr = to_sympy(tidy(pull_out_of_exp(objective, v.symbol)), scope)
    nu = scope.symbol_for(v.symbol)
    if nu not in expr.free_symbols or _opaque_uses(scope, v.name):
        return None
    found = cache.memo(cache.key_of("maximize-free", expr, nu), lambda: _stationary(expr, nu),
                       _pair_payload, _pair_from_payload)
    if found is None:
        return None
    value, root = found
    try:
        return tidy(from_sympy(value, scope)), tidy(from_sympy(root, scope))
    except (ValueError, KeyError):
        return None


def _stationary(expr: sympy.Expr, nu: sympy.Symbol) -> tuple[sympy.Expr, sympy.Expr] | None:
    """(max value, argmax) of expr over nu from its one real stationary point, if concave there.

    sympy's own check and simplification of the roots, and its ``simplify``, import
    sympy's units package on first use (a third of a second); the roots are checked
    numerically here instead and shortened by ``shortest``, as is the value, so the
    common case imports none of it.
    """
    d1 = sympy.diff(expr, nu)
    try:
        roots = sympy.solve(d1, nu, dict=False, check=False, simplify=False)
    except (NotImplementedError, ValueError):
        return None
    roots = [shortest(r) for r in roots]
    roots = [r for r in roots if r.is_real is not False and _vanishes(d1.subs(nu, r))]
    if len(roots) != 1:
        return None
    second = sympy.diff(expr, nu, 2).subs(nu, roots[0])
    if second.is_negative is not True and sympy.simplify(second).is_negative is not True:
        return None
    return shortest(sympy.expand_log(expr.subs(nu, roots[0]), force=False)), roots[0]


_SAMPLES = (sympy.Rational(7, 10), sympy.Rational(19, 10))


def _vanishes(value: sympy.Expr) -> bool:
    """Whether ``value`` is zero at two sample points of its symbols (positive ones get
    positive values, the others both signs), to 1e-12; a point where it is not a finite
    real number counts against it."""
    symbols = sorted(value.free_symbols, key=lambda x: x.name)
    for k, sample in enumerate(_SAMPLES):
        point = {x: sample if x.is_positive or k == 0 else -sample for x in symbols}
        number = value.subs(point).evalf(30)
        if not (number.is_real and number.is_finite) or abs(float(number)) > 1e-12:
            return False
    return True


def shortest(expr: sympy.Expr) -> sympy.Expr:
    """The first stage of sympy's ``simplify`` (the shortest of the power, cancel and
    factor forms, then a number times a sum multiplied out), without its later stages
    and the import they bring."""

    def shorter(*choices: sympy.Expr) -> sympy.Expr:
        return min(choices, key=sympy.count_ops)

    short = shorter(sympy.powsimp(expr, combine="exp", deep=True), sympy.powsimp(expr), expr)
    short = shorter(short, sympy.cancel(short))
    short = shorter(short, sympy.factor_terms(short),
                    sympy.expand_power_exp(sympy.expand_mul(short)))
    return short.replace(
        lambda x: x.is_Mul and len(x.args) == 2 and x.args[0].is_Number and x.args[1].is_Add,
        lambda x: sympy.Mul(*x.args))


def _pair_payload(found: tuple[sympy.Expr, sympy.Expr] | None) -> object:
    return None if found is None else [cache.encode(found[0]), cache.encode(found[1])]


def _pair_from_payload(payload: object) -> tuple[sympy.Expr, sympy.Expr] | None:
    if payload is None:
        return None
    value, root = payload  # type: ignore[misc]
    return cache.decode(value), cache.decode(root)


def _opaque_uses(scope: Scope, name: str) -> bool:
    """True when the multiplier hides inside an opaque factor (then sympy cannot see it)."""
    return any(not isinstance(e, Symbol) and depends_on(e, {name}) for e in scope.to_ir.values())


def pull_out_of_exp(e: Expr, y: Symbol) -> Expr:
    """exp(a + s 1) = exp(s) exp(a) for a scalar s, everywhere in ``e``."""
    if isinstance(e, Apply) and e.func == EXP.name and not e.shape.is_scalar:
        scalar_terms, rest = [], []
        for t in expand(e.arg):
            (scalar_terms if t.chain == (Ones(e.shape.rows),) else rest).append(t)
        if scalar_terms and any(depends_on(p, {y.name}) for t in scalar_terms
                                for p in t.scalars):
            s = rebuild([Term(t.coef, t.scalars, ()) for t in scalar_terms], b.SCALAR)
            inner = b.apply(EXP.name, rebuild(rest, e.shape))
            return b.scale(b.apply(EXP.name, s), inner)
        return e
    from dataclasses import fields

    changes = {}
    for f in fields(e):  # type: ignore[arg-type]
        value = getattr(e, f.name)
        if isinstance(value, Expr):
            changes[f.name] = pull_out_of_exp(value, y)
        elif isinstance(value, tuple) and value and isinstance(value[0], Expr):
            changes[f.name] = tuple(pull_out_of_exp(x, y) for x in value)
    return replace(e, **changes) if changes else e  # type: ignore[type-var]


# -- stating constraints readably ------------------------------------------------


def _readable(c: DualConstraint) -> DualConstraint:
    """E rel 0 as (terms with multipliers) rel (the rest), signs made positive and a
    common positive rational factor divided out (both are equivalences)."""
    if not b.is_zero(c.rhs):
        return c
    terms = _divided(expand(c.lhs))
    if c.relation in ("succeq", "preceq"):
        if terms and all(t.coef < 0 for t in terms):
            terms = [Term(-t.coef, t.scalars, t.chain) for t in terms]
            return replace(c, lhs=rebuild(terms, c.lhs.shape), relation=FLIP[c.relation])
        return replace(c, lhs=rebuild(terms, c.lhs.shape))
    var_terms = [t for t in terms if _has_unknowns(t)]
    const_terms = [t for t in terms if not _has_unknowns(t)]
    if not var_terms:
        return c
    lhs = rebuild(var_terms, c.lhs.shape)
    rhs = tidy(b.neg(rebuild(const_terms, c.lhs.shape)))
    relation = c.relation
    if all(t.coef < 0 for t in var_terms):
        lhs, rhs, relation = tidy(b.neg(lhs)), tidy(b.neg(rhs)), FLIP[relation]
    return replace(c, lhs=lhs, rhs=rhs, relation=relation)  # type: ignore[arg-type]


def _distinct(constraints: tuple[DualConstraint, ...]) -> tuple[DualConstraint, ...]:
    """Each constraint once (two blocks may impose the same condition)."""
    seen: set[tuple[str, str, str]] = set()
    out = []
    for c in constraints:
        key = (node_key(c.lhs), c.relation, node_key(c.rhs))
        if key not in seen:
            seen.add(key)
            out.append(c)
    return tuple(out)


def _divided(terms: list[Term]) -> list[Term]:
    """The terms divided by the positive gcd of their rational coefficients."""
    coefs = [t.coef for t in terms]
    if not coefs or not all(isinstance(k, sympy.Rational) for k in coefs):
        return terms
    g = sympy.gcd_list([abs(k) for k in coefs]) if len(coefs) > 1 else abs(coefs[0])
    if g in (0, 1):
        return terms
    return [Term(t.coef / g, t.scalars, t.chain) for t in terms]


def _has_unknowns(t: Term) -> bool:
    from dualize.model.expr import symbols_of

    return any(s.role != "data" for p in t.scalars + t.chain for s in symbols_of(p))


def simplify_scalar(e: Expr) -> Expr:
    """A dual objective in scalars only, put over a common denominator by sympy."""
    from dualize.model.expr import symbols_of, walk

    if any(not s.shape.is_scalar for s in symbols_of(e)) or not any(
            isinstance(n, b.Power) and n.exponent < 0 for n in walk(e)):
        return e
    scope = Scope()
    value = sympy.cancel(sympy.together(to_sympy(e, scope)))
    try:
        return from_sympy(value, scope)
    except (ValueError, KeyError):
        return e


def substitutions(steps: list[Step]) -> dict[Expr, Expr]:
    """The multipliers fixed by simplification steps, for use in recovery formulas."""
    out: dict[Expr, Expr] = {}
    for step in steps:
        if step.rule in ("substitute-multiplier", "maximize-free-multiplier"):
            eq = step.equations[0]
            out[eq.lhs] = eq.rhs  # type: ignore[index]
    return out

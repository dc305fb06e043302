"""The derivation: from a typed problem to its dual, step by step.

1. Form the Lagrangian (``lagrangian``) and expand it into collected terms.
2. Give every term to the primal block it depends on.  A building block
   (norm, hinge, log-sum-exp, separable function, squared norm) whose argument
   is not simply one variable is split off: u = arg is introduced with a free
   multiplier z, which leaves an equivalent problem whose Lagrangian is affine
   in the original variables (S. Boyd and L. Vandenberghe, Convex
   Optimization, 2004, section 5.7).
3. Minimize block by block (``blocks``, ``building_blocks``, ``separable``).
4. Simplify the dual (``simplify``) and state KKT and recovery (``kkt``).
"""

from __future__ import annotations

from dataclasses import dataclass, field

from dualize.deadline import Deadline, DeadlineExceeded
from dualize.duality import build as b
from dualize.duality.blocks import Outcome, matrix_block, quadratic_block
from dualize.duality.building_blocks import (
    BuildingBlock,
    block_expression,
    infimum,
    orthant_norm,
    recognise,
    with_argument,
)
from dualize.duality.definite import definiteness
from dualize.duality.dual_statement import as_minimization as _as_minimization
from dualize.duality.dual_statement import derivation_notes
from dualize.duality.dual_statement import dual_sentence as _dual_sentence
from dualize.duality.dual_statement import substituted as _substituted
from dualize.duality.kernel_form import kernel_notes
from dualize.duality.kkt import conditions
from dualize.duality.lagrangian import lagrangian, multipliers
from dualize.duality.linear import Quadratic, hessian, quadratic, trace_linear
from dualize.duality.normal import Term, expand, rebuild, tidy
from dualize.duality.recovery import subgradient_note, with_split_relations
from dualize.duality.result import (
    Derivation,
    DualConstraint,
    DualProblem,
    DualVariable,
    Equation,
    Head,
    Recovery,
    Step,
)
from dualize.duality.separable import separable_infimum
from dualize.duality.simplify import simplify, substitutions
from dualize.duality.smoothness import strictly_convex_boxes
from dualize.model.expr import SCALAR, Expr, Symbol, symbols_of
from dualize.model.problem import Domain, Problem, Variable


@dataclass
class Work:
    """What the engine accumulates while it walks the blocks."""

    problem: Problem
    names: set[str]
    by_var: dict[str, list[Term]] = field(default_factory=dict)
    constant: list[Term] = field(default_factory=list)
    coupled: list[Term] = field(default_factory=list)
    extra: list[DualVariable] = field(default_factory=list)
    steps: list[Step] = field(default_factory=list)
    aux_blocks: list[tuple[Symbol, BuildingBlock, Symbol]] = field(default_factory=list)
    aux_args: dict[str, Expr] = field(default_factory=dict)
    deadline: Deadline = field(default_factory=Deadline.unlimited)
    cut: list[str] = field(default_factory=list)

    def fresh(self, base: str) -> str:
        name, k = base, 1
        while name in self.names:
            name, k = f"{base}{k}", k + 1
        self.names.add(name)
        return name


def derive(problem: Problem, deadline: Deadline | None = None) -> Derivation:
    """The dual of ``problem`` with its recorded steps, KKT conditions and recovery.

    Past ``deadline`` the blocks not yet minimized keep their infimum unevaluated and
    the simplification of the dual is skipped; the notes say which step was cut.
    """
    shown, L = lagrangian(problem)
    mults = multipliers(problem)
    work = Work(problem, _names(problem), deadline=deadline or Deadline.unlimited())
    work.steps.append(_lagrangian_step(problem, shown, mults))
    _distribute(work, expand(L))
    outcomes = _minimize_blocks(work)
    dual, recovery = _assemble(work, outcomes, mults)
    dual, more_steps = _simplified(work, dual)
    work.steps.extend(more_steps)
    recovery = _substituted(recovery, substitutions(more_steps))
    if problem.sense == "maximize":
        dual = _as_minimization(dual)
    work.steps.append(Step("dual-problem", _dual_sentence(dual, problem.sense)))
    kkt = conditions(problem, outcomes)
    notes = derivation_notes(work.cut, bool(work.aux_blocks), problem.sense) + tuple(
        kernel_notes(dual, recovery))
    return Derivation(problem, shown, tuple(mults) + tuple(work.extra), tuple(work.steps), dual,
                      kkt, tuple(recovery), notes)


def _simplified(work: Work, dual: DualProblem) -> tuple[DualProblem, list[Step]]:
    """The simplification of the dual, skipped (and noted) past the deadline."""
    if work.deadline.expired():
        work.cut.append(str(DeadlineExceeded("simplifying the dual", work.deadline.seconds or 0))
                        + ": the dual is shown as assembled, without simplification")
        return dual, []
    return simplify(dual, work.problem)


def _names(problem: Problem) -> set[str]:
    names = {v.name for v in problem.variables} | {d.name for d in problem.data}
    names |= {c.multiplier.name for c in problem.constraints} | {str(d) for d in problem.dims}
    return names


def _lagrangian_step(problem: Problem, L: Expr, mults) -> Step:  # type: ignore[no-untyped-def]
    args = tuple(v.name for v in problem.variables) + tuple(m.name for m in mults)
    if not problem.constraints:
        text = "The problem has no constraints, so the Lagrangian is the objective itself."
    elif problem.sense == "minimize":
        text = ("The Lagrangian adds each constraint function, weighted by its multiplier "
                "(nonnegative for inequalities, free for equalities, positive semidefinite for "
                "matrix inequalities), to the objective.")
    else:
        text = ("The problem is a maximization: its Lagrangian subtracts each constraint "
                "function, weighted by its multiplier, from the objective, and the dual "
                "function is the supremum over the primal variables, an upper bound on the "
                "optimal value.")
    return Step("lagrangian", text, (Equation(Head("L", args), "=", L),))


# -- distributing terms to blocks ----------------------------------------------


def _primal_names(work: Work) -> frozenset[str]:
    return frozenset(v.name for v in work.problem.variables)


def _vars_of(term: Term, names: frozenset[str]) -> list[str]:
    found: dict[str, None] = {}
    for part in term.scalars + term.chain:
        for s in symbols_of(part):
            if s.name in names:
                found.setdefault(s.name, None)
    return list(found)


def _distribute(work: Work, terms: list[Term]) -> None:
    names = _primal_names(work) | {a.name for a, _, _ in work.aux_blocks}
    for t in terms:
        owners = _vars_of(t, _primal_names(work))
        if not owners:
            work.constant.append(t)
        elif len(owners) == 1:
            work.by_var.setdefault(owners[0], []).append(t)
        else:
            atom = recognise(t, frozenset(names))
            if atom is not None and (atom.kind != "separable" or atom.arg not in
                                     [v.symbol for v in work.problem.variables]):
                _split(work, atom)
            else:
                work.coupled.append(t)


def _split(work: Work, atom: BuildingBlock) -> None:
    """Introduce u = arg with a free multiplier z: the term becomes atom(u) + z'(arg - u)."""
    u = Symbol(work.fresh("u"), "auxiliary", atom.arg.shape)
    z = Symbol(work.fresh("z"), "multiplier", atom.arg.shape)
    work.aux_blocks.append((u, with_argument(atom, u), z))
    work.aux_args[u.name] = atom.arg
    work.extra.append(DualVariable(z, "free", f"auxiliary u = {u.name}"))
    text = (f"Introduce ${u.name}$ for the argument of a {_kind_name(atom)} term, with a free "
            f"multiplier ${z.name}$: the problem is unchanged, and its Lagrangian is affine in "
            f"the original variables and separable in ${u.name}$.")
    work.steps.append(Step("split-affine-argument", text, (Equation(u, "=", atom.arg),)))
    _distribute(work, expand(b.inner(z, atom.arg)))


# -- minimizing block by block ---------------------------------------------------


def _minimize_blocks(work: Work) -> dict[str, Outcome]:
    outcomes: dict[str, Outcome] = _perspective(work)
    coupled = {n for t in work.coupled for n in _vars_of(t, _primal_names(work))}
    for v in work.problem.variables:
        if v.name in coupled or v.name in outcomes:
            continue
        outcomes[v.name] = _guarded_block(work, v)
    for u, atom, z in work.aux_blocks:
        outcomes[u.name] = _aux_block(u, atom, z)
    for v in work.problem.variables:
        if v.name in coupled:
            outcomes[v.name] = _kept(v, work.by_var.get(v.name, []), "it is coupled with another "
                                     "variable through a term that is not affine")
    if work.coupled:
        outcomes["(coupled)"] = Outcome(rebuild(work.coupled, SCALAR), inner=True)
    return outcomes


def _perspective(work: Work) -> dict[str, Outcome]:
    """The relative entropy of two variables, minimized jointly (``perspective``), when it
    is the only coupling and both variables otherwise enter linearly."""
    from dualize.duality.perspective import entropy_atom, pair_outcome, relative_entropy_pair
    from dualize.duality.scalar import Scope, to_sympy

    if len(work.coupled) != 1:
        return {}
    variables = {v.name: v for v in work.problem.variables}
    found = relative_entropy_pair(work.coupled[0], variables)
    if found is None or to_sympy(found[0], Scope()).is_positive is not True:
        return {}
    coef, u, v = found
    lu, lv = _linear_part(work, u), _linear_part(work, v)
    if lu is None or lv is None:
        return {}
    inf = separable_infimum(entropy_atom(coef, u.symbol), tidy(b.neg(lu[0])), u.symbol,
                            u.domain)
    if inf is None or inf.entries is None:
        return {}
    cons, steps, recs = pair_outcome(u.symbol, v.symbol, lu[0], lv[0], inf.entries,
                                     inf.constraints, inf.statement, inf.formulas)
    work.coupled = []
    return {u.name: Outcome(tidy(b.add(lu[1], lv[1])), cons, recs[0], steps),
            v.name: Outcome(b.num(0), recovery=recs[1])}


def _linear_part(work: Work, v: Variable) -> tuple[Expr, Expr] | None:
    """(g, r) with the variable's own terms g'x + r, or None when they are not affine."""
    terms = work.by_var.get(v.name, [])
    q = quadratic(rebuild(terms, SCALAR), v.symbol) if terms else Quadratic(None, None, None)
    if q is None or q.Q is not None:
        return None
    g = q.g if q.g is not None else b.zeros(v.symbol.shape)
    return tidy(g), q.r if q.r is not None else b.num(0)


def _guarded_block(work: Work, v: Variable) -> Outcome:
    """A block's rule, or the kept infimum when a rule fails on a form it did not
    anticipate: a missing closed form is reported, never a guessed one."""
    marks = (len(work.aux_blocks), len(work.extra), len(work.steps), set(work.names))
    try:
        work.deadline.check(f"minimizing the Lagrangian over {v.name}")
        return _block(work, v)
    except DeadlineExceeded as cut:
        del work.aux_blocks[marks[0]:], work.extra[marks[1]:], work.steps[marks[2]:]
        work.names = marks[3]
        work.cut.append(f"{cut}: the infimum over {v.name} is kept unevaluated")
        return _kept(v, work.by_var.get(v.name, []), str(cut))
    except (ValueError, TypeError, KeyError, AttributeError, AssertionError,
            NotImplementedError, ZeroDivisionError, RecursionError):
        del work.aux_blocks[marks[0]:], work.extra[marks[1]:], work.steps[marks[2]:]
        work.names = marks[3]
        return _kept(v, work.by_var.get(v.name, []), "no rule applies to its terms")


def _kept(v: Variable, terms: list[Term], why: str) -> Outcome:
    value = rebuild(terms, SCALAR)
    return Outcome(value, inner=True, steps=[Step(
        "no-closed-form", f"The infimum over ${v.name}$ is kept: {why}.", block=v.name)])


def _block(work: Work, v: Variable) -> Outcome:
    x, terms = v.symbol, work.by_var.get(v.name, [])
    if not x.shape.is_scalar and not x.shape.is_vector:
        lin = trace_linear(rebuild(terms, SCALAR), x)
        if lin is None:
            return _matrix_separable(work, v, terms) or _kept(
                v, terms, "the matrix variable enters other than linearly")
        return matrix_block(x, v.domain, lin) or _kept(v, terms, _domain_why(v))
    atoms, polys, others = _classify(terms, x)
    if others:
        return _kept(v, terms, "a term has no rule: " + _brief(others))
    nonsmooth = [a for a in atoms if a.kind != "square"]
    squares = [a for a in atoms if a.kind == "square"]
    bare = [a for a in squares if a.arg == x]
    mapped = [a for a in squares if a.arg != x]
    if not nonsmooth:
        q = _sum(polys + [_square_poly(a, x) for a in squares])
        assert q is not None
        H = hessian(q, x)
        if not mapped or H is None or definiteness(tidy(H)) == "pd":
            return quadratic_block(x, v.domain, q) or _kept(v, terms, _domain_why(v))
    if (mapped or nonsmooth) and not _convex_remainder(polys + [_square_poly(a, x) for a in bare],
                                                      x):
        return _kept(v, terms, "splitting its terms off would leave a quadratic remainder not "
                     "known to be convex, whose infimum alone may be minus infinity although "
                     "the whole is bounded below; no closed form is claimed")
    for a in mapped:
        _split_local(work, a, polys, x)
    direct = [a for a in nonsmooth if a.arg == x]
    if len(nonsmooth) == 1 and direct and not bare and _affine_only(polys, x):
        return _direct(work, v, nonsmooth[0], polys)
    for a in nonsmooth:
        _split_local(work, a, polys, x)
    polys = polys + [_square_poly(a, x) for a in bare]
    return _quadratic(v, polys) or _kept_quadratic(v, polys)


def _matrix_separable(work: Work, v: Variable, terms: list[Term]) -> Outcome | None:
    """inf over X of c sum(phi(X)) + <G, X> + r = r - c sum(phi*(-G/c)), entry by entry.

    A matrix variable that enters through one separable building block of its own
    entries (the entropy X .* log(X) of an entropic transport plan) and linearly
    otherwise is minimized entry by entry, exactly like a vector.
    """
    x = v.symbol
    names = frozenset({x.name})
    atoms = [(t, recognise(t, names)) for t in terms]
    own = [a for _, a in atoms if a is not None and a.kind == "separable" and a.arg == x]
    rest = [t for t, a in atoms if a is None or a.kind != "separable" or a.arg != x]
    if len(own) != 1:
        return None
    lin = trace_linear(rebuild(rest, SCALAR), x)
    if lin is None:
        return None
    s = tidy(b.neg(lin.lin)) if lin.lin is not None else b.zeros(x.shape)
    r = lin.const if lin.const is not None else b.num(0)
    return _conjugate_outcome(x, own[0], s, r, v.domain, work)


def _convex_remainder(polys: list[Quadratic], x: Symbol) -> bool:
    """Whether the quadratic part left in a block after splitting is known convex.

    Splitting u = arg off a block dualizes u = arg: for a convex remainder nothing
    is lost (strong duality of the split), but a concave or indefinite remainder
    alone is unbounded below, so the split dual would be minus infinity where the
    block's own infimum (x^4 - 2 x^2, say) is finite.
    """
    q = _sum(polys)  # type: ignore[arg-type]
    H = hessian(q, x) if q is not None else None
    return H is None or definiteness(tidy(H)) in ("pd", "psd", "zero")


def _kept_quadratic(v: Variable, polys: list[Quadratic]) -> Outcome:
    """The infimum kept over what remains of the block after splitting."""
    x = v.symbol
    q = _sum(polys)  # type: ignore[arg-type]
    assert q is not None
    parts = [b.mul(b.transpose(x), q.Q, x) if q.Q is not None else None,
             b.mul(b.transpose(q.g), x) if q.g is not None else None, q.r]
    value = tidy(b.add(*(p for p in parts if p is not None)))
    return Outcome(value, inner=True, steps=[Step(
        "no-closed-form", f"The infimum over ${v.name}$ is kept: {_domain_why(v)}.",
        block=v.name)])


def _domain_why(v: Variable) -> str:
    return (f"no rule minimizes this Lagrangian over the domain of ${v.name}$ "
            f"({v.domain.kind}), which is not dualized")


def _brief(terms: list[Term]) -> str:
    from dualize.model.expr import walk

    kinds = sorted({type(n).__name__ for t in terms for s in t.scalars + t.chain for n in walk(s)
                    if type(n).__name__ in ("Apply", "Norm", "Extremum", "Power", "Divide")})
    return ", ".join(kinds) if kinds else "an unrecognised form"


def _classify(terms: list[Term], x: Symbol):  # type: ignore[no-untyped-def]
    atoms, polys, others = [], [], []
    names = frozenset({x.name})
    for t in terms:
        atom = recognise(t, names)
        e = rebuild([t], SCALAR)
        if atom is not None and atom.kind == "square":
            atoms.append(atom)
            continue
        q = quadratic(e, x)
        if q is not None:
            polys.append(q)
        elif atom is not None:
            atoms.append(atom)
        else:
            others.append(t)
    return atoms, polys, others


def _affine_only(polys: list[Quadratic], x: Symbol) -> bool:
    return all(q.Q is None for q in polys)


def _square_poly(a: BuildingBlock, x: Symbol) -> Quadratic:
    q = quadratic(b.scale(a.coef, b.inner(a.arg, a.arg)), x)
    assert q is not None
    return q


def _sum(parts: list[Quadratic | None]) -> Quadratic | None:
    from dualize.duality.linear import quad_sum

    return quad_sum(parts) if parts else Quadratic(None, None, None)


def _quadratic(v: Variable, polys: list[Quadratic]) -> Outcome | None:
    q = _sum(polys)  # type: ignore[arg-type]
    assert q is not None
    return quadratic_block(v.symbol, v.domain, q)


def _split_local(work: Work, atom: BuildingBlock, polys: list[Quadratic], x: Symbol) -> None:
    """Split an atom of one block; its z'arg part joins that block's polynomial terms."""
    u = Symbol(work.fresh("u"), "auxiliary", atom.arg.shape)
    z = Symbol(work.fresh("z"), "multiplier", atom.arg.shape)
    work.aux_blocks.append((u, with_argument(atom, u), z))
    work.aux_args[u.name] = atom.arg
    work.extra.append(DualVariable(z, "free", f"auxiliary u = {u.name}"))
    work.steps.append(Step("split-affine-argument", (
        f"Introduce ${u.name}$ for the argument of a {_kind_name(atom)} term in ${x.name}$, "
        f"with a free multiplier ${z.name}$: the problem is unchanged, and the Lagrangian "
        "separates."),
        (Equation(u, "=", atom.arg),)))
    q = quadratic(b.inner(z, atom.arg), x)
    assert q is not None
    polys.append(q)


def _kind_name(atom: BuildingBlock) -> str:
    return {"norm": "norm", "square": "squared norm", "hinge": "hinge", "abs": "absolute value",
            "logsumexp": "log-sum-exp", "separable": "separable"}[atom.kind]


def _direct(work: Work, v: Variable, atom: BuildingBlock, polys: list[Quadratic]) -> Outcome:
    """inf over x of atom(x) + g'x + r = r - atom*(-g)."""
    q = _sum(polys)  # type: ignore[arg-type]
    assert q is not None
    g = tidy(q.g) if q.g is not None else b.zeros(v.symbol.shape)
    r = q.r if q.r is not None else b.num(0)
    s = tidy(b.neg(g))
    return _conjugate_outcome(v.symbol, atom, s, r, v.domain, work)


def _aux_block(u: Symbol, atom: BuildingBlock, z: Symbol) -> Outcome:
    """inf over u of atom(u) - z'u = -atom*(z)."""
    return _conjugate_outcome(u, atom, z, b.num(0), Domain("free"), None)


def _conjugate_outcome(x: Symbol, atom: BuildingBlock, s: Expr, r: Expr, domain: Domain,
                       work: Work | None) -> Outcome:
    if atom.kind == "separable":
        inf = separable_infimum(atom, s, x, domain,
                                work.deadline if work is not None else Deadline.unlimited())
    else:
        inf = infimum(atom, s, x) if domain.kind == "free" else (
            orthant_norm(atom, s, x) if domain.kind in ("nonneg", "pos") else None)
    if inf is None:
        kept = b.add(block_expression(atom), b.neg(b.inner(s, x)), r)
        return Outcome(tidy(kept), inner=True, steps=[Step(
            "no-closed-form", f"No closed form for the infimum over ${x.name}$ of this "
            f"{_kind_name(atom)} term: the infimum is kept.", block=x.name)])
    reason = f"for the infimum over {x.name} of the {_kind_name(atom)} term to be finite"
    constraints = [DualConstraint(lhs, rel, rhs, reason)  # type: ignore[arg-type]
                   for lhs, rel, rhs in inf.constraints]
    value = tidy(b.add(r, inf.value))
    rec = Recovery(x.name, tidy(inf.minimizer) if inf.minimizer is not None else None,
                   "" if inf.minimizer is not None else subgradient_note(x.name, atom))
    step = Step("conjugate", f"Minimizing over ${x.name}$: {inf.statement}. The block "
                "contributes $#value$ to the dual function.",
                tuple(Equation(lhs, rel, rhs) for lhs, rel, rhs in inf.constraints),  # type: ignore[arg-type]
                block=x.name, formulas=inf.formulas + (("#value", tidy(inf.value)),))
    smooth = atom.kind in ("square", "logsumexp", "separable") and domain.kind == "free"
    return Outcome(value, constraints, rec, [step], smooth=smooth, strict_box=inf.strict_box)


# -- assembling the dual ---------------------------------------------------------


def _assemble(work: Work, outcomes: dict[str, Outcome], mults):  # type: ignore[no-untyped-def]
    objective = rebuild(work.constant, SCALAR)
    constraints: list[DualConstraint] = []
    recovery: list[Recovery] = []
    inner: list[Variable] = []
    unbounded = False
    extra = list(work.extra)
    for name, out in outcomes.items():
        work.steps.extend(out.steps)
        objective = b.add(objective, out.value)
        constraints.extend(out.constraints)
        extra.extend(out.extra)
        unbounded = unbounded or out.unbounded
        if out.inner and name != "(coupled)":
            inner.append(work.problem.variable(name) if name in _primal_names(work)
                         else Variable(next(u for u, _, _ in work.aux_blocks if u.name == name),
                                       Domain("free")))
        if out.recovery is not None and name in _primal_names(work):
            recovery.append(out.recovery)
    work.extra = extra
    norms = {u.name: z.name for u, atom, z in work.aux_blocks if atom.kind == "norm"}
    recovery = [with_split_relations(r, work.aux_args, outcomes, norms) for r in recovery]
    variables = tuple(mults) + tuple(work.extra)
    dual = DualProblem("maximize", variables, tidy(objective), tuple(constraints),
                       tuple(inner), unbounded, strictly_convex_boxes(outcomes))
    return dual, recovery

"""How a generated solver finds the primal variables the derivation has no formula for.

Two rules, tried in this order; a variable that neither fits stays unrecovered
with the reasons of both.

1. **A linear program.**  With the recovered variables held, the primal is a
   linear program in the unrecovered ones once its max, min, absolute values and
   polyhedral norms are replaced by epigraph variables (``solver_lift``, with the
   primal as its subject): a minimized max is the least t above its pieces, so
   the lifted LP has the primal's optimal value and its x part is a primal
   optimum (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, sections
   4.1.3 and 4.3).  ``_restricted(x, d)`` prints that LP; the runtime hands it to
   HiGHS.
2. **A minimizer of the Lagrangian.**  When strong duality holds and the dual
   optimum is attained, every primal optimum minimizes L(x, multipliers) at the
   optimal multipliers, and a unique minimizer of it is the primal optimum (same
   book, section 5.5.5).  When L is smooth in the unrecovered variables and every
   constraint on them is priced in L by a multiplier the dual solves for,
   ``_lagrangian(x, z, d)`` prints L and its analytic gradient for L-BFGS-B over
   the variables' domains.  Uniqueness cannot be read off the symbols, so the
   runtime keeps a minimizer only when the duality gap and the constraint
   violation at it certify it; otherwise the variables stay unrecovered.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

import sympy

from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.model.functions import lookup
from dualize.model.problem import Variable
from dualize.solvergen.calculus import NotDifferentiable, gradient, jacobian
from dualize.solvergen.ir_rewrite import length, normalize
from dualize.solvergen.pynames import literal
from dualize.solvergen.solver_emit import Emitter, function
from dualize.solvergen.solver_lift import MINUS, Lift, Part, Subject, epigraph_lift

PRIMAL = Subject("_epi", "primal", "the unrecovered variables", "",
                 "the recovery lifts convex piecewise-linear terms only")
DOMAINS = ("free", "nonneg", "pos", "box")
"""Variable domains that are bounds, which both rules can take."""


@dataclass(frozen=True)
class Rule:
    """The rule that recovers the unrecovered variables, or why none does."""

    kind: Literal["linprog", "lagrangian", "none", "nothing"]
    reason: str = ""
    """Why the linear program does not apply (rule 2), why neither does (none)."""
    lift: Lift | None = None
    variables: tuple[str, ...] = ()
    """The variables it is to find: those without a formula that no earlier rule finds."""

    @property
    def auxiliary(self) -> tuple[ir.Symbol, ...]:
        return self.lift.auxiliary if self.lift else ()


def missing_of(derivation: Derivation) -> dict[str, str]:
    """The variables without a recovery formula, each with the derivation's note."""
    missing = {}
    for rec in derivation.recovery:
        if rec.formula is None:
            missing[rec.variable] = rec.note or "the Lagrangian does not determine it"
    for var in derivation.problem.variables:
        if var.name not in {r.variable for r in derivation.recovery}:
            missing[var.name] = "the derivation gives no recovery for it"
    return missing


def choose(derivation: Derivation, missing: dict[str, str]) -> Rule:
    """Rule 1 if it applies, else rule 2, else none (see the module doc)."""
    unknown = _unknown(derivation, missing)
    names = tuple(v.name for v in unknown)
    if not unknown:
        return Rule("nothing", "nothing to recover")
    lift, reason = _linear_program(derivation, unknown)
    if lift is not None:
        return Rule("linprog", lift=lift, variables=names)
    smooth = _not_smooth(derivation, unknown)
    if not smooth:
        return Rule("lagrangian", reason, variables=names)
    return Rule("none", f"{reason}; {smooth}", variables=names)


def _unknown(derivation: Derivation, missing: dict[str, str] | tuple[str, ...]
             ) -> list[Variable]:
    return [v for v in derivation.problem.variables if v.name in missing]


def _names(unknown: list[Variable]) -> str:
    return ", ".join(v.name for v in unknown)


def _beyond_bounds(unknown: list[Variable]) -> str:
    for var in unknown:
        if var.domain.kind not in DOMAINS:
            return f"{var.name} ranges over a {var.domain.kind} set, not a box"
    return ""


def _minimized(derivation: Derivation, expr: ir.Expr) -> ir.Expr:
    return expr if derivation.problem.sense == "minimize" else ir.Scale(MINUS, expr)


# --- rule 1: the primal as a linear program -----------------------------------
def _linear_program(derivation: Derivation, unknown: list[Variable]) -> tuple[Lift | None, str]:
    """The lifted primal when it is an LP in ``unknown``, else None and the reason."""
    problem = derivation.problem
    reason = _beyond_bounds(unknown)
    if not reason and any(c.kind == "psd" for c in problem.constraints):
        reason = "a semidefinite primal constraint is beyond a linear program"
    if reason:
        return None, reason
    parts: list[Part] = [(c.function, "<=" if c.kind == "ineq" else "=", ir.Zero(c.function.shape))
                         for c in problem.constraints]
    names = {v.name for v in unknown}
    try:
        lift = epigraph_lift(_minimized(derivation, problem.objective), parts, names, PRIMAL)
    except DualizeError as err:
        return None, f"the primal is not a linear program in {_names(unknown)}: {err.message}"
    reason = _not_linear(lift, [v.symbol for v in unknown])
    return (None, reason) if reason else (lift, "")


def _functions(lift: Lift) -> list[tuple[str, ir.Expr]]:
    """Each lifted constraint as (relation, function) with ``function rel 0``."""
    return [(rel, normalize(ir.Add((lhs, ir.Scale(MINUS, rhs))))) for lhs, rel, rhs in lift.parts]


def _not_linear(lift: Lift, unknown: list[ir.Symbol]) -> str:
    """Why the lifted primal is not linear in ``unknown`` and its auxiliaries (empty if it is)."""
    moving = [*unknown, *lift.auxiliary]
    names = {s.name for s in moving}
    after = f" after epigraph variables for {' and '.join(lift.lifted)}" if lift.lifted else ""
    for expr in [lift.objective, *(f for _, f in _functions(lift))]:
        for symbol in moving:
            try:
                jac = jacobian(expr, symbol)
            except NotDifferentiable as err:
                return f"the primal is not linear in {symbol.name}{after} ({err})"
            if ir.depends_on(jac, names):
                return f"the primal is not linear in {symbol.name}{after}"
    return ""


def _at_zero(expr: ir.Expr, moving: list[ir.Symbol]) -> ir.Expr:
    """``expr`` with the moving variables at zero: the constant part of an affine map."""
    return normalize(ir.substitute(expr, {s: ir.Zero(s.shape) for s in moving}))


def restricted(emitter: Emitter, derivation: Derivation, rule: Rule) -> str:
    """``_restricted(x, d)``: (c, [(relation, value at 0, Jacobian)], variables) or a reason.

    The variables are the unrecovered ones with their domain bounds, then the
    epigraph variables (free); rows hold ``Jacobian u + value (<= or =) 0``.
    """
    if rule.kind != "linprog" or rule.lift is None:
        text = rule.reason or "the primal is not a linear program in the unrecovered variables"
        return f"def _restricted(x, d):\n    return {literal(text)}"
    lift = rule.lift
    unknown = _unknown(derivation, rule.variables)
    moving = [v.symbol for v in unknown] + list(lift.auxiliary)
    used: set[str] = set()
    body = [f"c = {_jac_row(emitter, lift.objective, moving, used)}", "rows = []"]
    for relation, expr in _functions(lift):
        size, sreads = emitter.size(length(expr.shape))
        value, vreads = emitter.code(_at_zero(expr, moving))
        used |= sreads | vreads
        jac = _jac_blocks(emitter, expr, moving, size, used, sparse=True)
        body.append(f"rows.append(({relation!r}, _flat({value}, {size}), {jac}))")
    variables = _domain_bounds(emitter, unknown, used) + _free(emitter, lift.auxiliary, used)
    body.append(f"return c, rows, [{', '.join(variables)}]")
    return function(emitter, "def _restricted(x, d):", body, used)


def _jac_blocks(emitter: Emitter, expr: ir.Expr, moving: list[ir.Symbol], rows: str,
                used: set[str], sparse: bool = False) -> str:
    """The Jacobian of ``expr`` in ``moving``, side by side; as a sparse matrix when
    ``sparse`` (the restricted linear program, whose identity blocks are m x m)."""
    return jacobian_blocks(emitter, [jacobian(expr, s) for s in moving], moving, rows, used,
                           sparse)


def jacobian_blocks(emitter: Emitter, jacobians: list[ir.Expr], symbols: list[ir.Symbol],
                    rows: str, used: set[str], sparse: bool = False) -> str:
    """Jacobian blocks (one per symbol) printed side by side, dense or sparse; the names
    they read are added to ``used``."""
    blocks = []
    for jac, symbol in zip(jacobians, symbols, strict=True):
        code, reads = emitter.code(jac, sparse=sparse)
        cols, creads = emitter.size(length(symbol.shape))
        used |= reads | creads
        blocks.append(f"{'_sparse_block' if sparse else '_block'}({code}, {rows}, {cols})")
    if sparse:
        return f"scipy.sparse.hstack([{', '.join(blocks)}], format=\"csr\")"
    return f"np.hstack([{', '.join(blocks)}])"


def _jac_row(emitter: Emitter, expr: ir.Expr, moving: list[ir.Symbol], used: set[str]) -> str:
    return f"{_jac_blocks(emitter, expr, moving, '1', used)}[0]"


def _domain_bounds(emitter: Emitter, unknown: list[Variable], used: set[str]) -> list[str]:
    items = []
    for var in unknown:
        size, reads = emitter.size(length(var.symbol.shape))
        used |= reads
        lo, hi = "-np.inf", "np.inf"
        if var.domain.kind in ("nonneg", "pos"):
            lo = "0.0"
        elif var.domain.kind == "box":
            lo, lreads = emitter.code(var.domain.lo)
            hi, hreads = emitter.code(var.domain.hi)
            used |= lreads | hreads
        items.append(f"({literal(var.name)}, {size}, {lo}, {hi})")
    return items


def _free(emitter: Emitter, auxiliary: tuple[ir.Symbol, ...], used: set[str]) -> list[str]:
    items = []
    for symbol in auxiliary:
        size, reads = emitter.size(length(symbol.shape))
        used |= reads
        items.append(f"({literal(symbol.name)}, {size}, -np.inf, np.inf)")
    return items


def unknowns(emitter: Emitter, derivation: Derivation, rule: Rule) -> str:
    """``_unknowns(d)``: (name, size, lo, hi) of each variable the rule is to find."""
    used: set[str] = set()
    unknown = _unknown(derivation, rule.variables)
    items = _domain_bounds(emitter, unknown, used) if not _beyond_bounds(unknown) else []
    return function(emitter, "def _unknowns(d):", [f"return [{', '.join(items)}]"], used)


# --- rule 2: a minimizer of the Lagrangian ------------------------------------
def _squares(expr: ir.Expr) -> ir.Expr:
    """||u||^2 as u'u, whose derivative 2u needs no division by ||u||."""
    found = {n: ir.MatMul((ir.Transpose(n.base.arg), n.base.arg)) for n in ir.walk(expr)
             if isinstance(n, ir.Power) and isinstance(n.base, ir.Norm) and n.base.p == "2"
             and sympy.Rational(n.exponent) == 2}
    return ir.substitute(expr, found) if found else expr


def _lagrangian(derivation: Derivation) -> ir.Expr:
    """The minimized Lagrangian (negated for a maximization), squared norms as inner products."""
    return normalize(_squares(_minimized(derivation, derivation.lagrangian)))


def _not_smooth(derivation: Derivation, unknown: list[Variable]) -> str:
    """Why rule 2 does not apply to ``unknown`` (empty when it does)."""
    prefix = f"no smooth Lagrangian to minimize over {_names(unknown)}"
    reason = _beyond_bounds(unknown) or _unpriced(derivation, unknown)
    if reason:
        return f"{prefix}: {reason}"
    expr = _lagrangian(derivation)
    names = {v.name for v in unknown}
    for node in ir.walk(expr):
        if isinstance(node, ir.Norm) and node.p == "2" and ir.depends_on(node, names):
            return f"{prefix}: a 2-norm in it is not differentiable where its argument vanishes"
    for var in unknown:
        try:
            gradient(expr, var.symbol)
        except NotDifferentiable as err:
            return f"{prefix}: the Lagrangian is not smooth in {var.name} ({err})"
    return ""


def _unpriced(derivation: Derivation, unknown: list[Variable]) -> str:
    """A constraint on ``unknown`` or a multiplier in L that the dual does not solve for."""
    duals = {v.name for v in derivation.dual.variables}
    names = {v.name for v in unknown}
    for constraint in derivation.problem.constraints:
        if ir.depends_on(constraint.function, names) and constraint.multiplier.name not in duals:
            return f"the constraint {constraint.label} is not priced by a multiplier of the dual"
    for symbol in ir.symbols_of(derivation.lagrangian, "multiplier"):
        if symbol.name not in duals:
            return f"the Lagrangian reads {symbol.name}, which the dual does not solve for"
    return ""


def lagrangian(emitter: Emitter, derivation: Derivation, rule: Rule) -> str:
    """``_lagrangian(x, z, d)``: L at the multipliers in z and its gradient in the unknowns."""
    if rule.kind != "lagrangian":
        text = literal("the Lagrangian is not minimized for the recovery")
        return f"def _lagrangian(x, z, d):\n    return {text}"
    expr = _lagrangian(derivation)
    code, used = emitter.code(expr)
    pieces = []
    for var in _unknown(derivation, rule.variables):
        grad, reads = emitter.code(gradient(expr, var.symbol))
        size, sreads = emitter.size(length(var.symbol.shape))
        used |= reads | sreads
        pieces.append(f"_flat({grad}, {size})")
    body = [f"return float({code}), np.concatenate([{', '.join(pieces)}])"]
    return function(emitter, "def _lagrangian(x, z, d):", body, used)


def _domain_arguments(expr: ir.Expr, names: set[str]) -> list[ir.Expr]:
    """What must be positive for L to be finite: arguments of logs, roots, real powers."""
    found: list[ir.Expr] = []
    for node in ir.walk(expr):
        arg = None
        if isinstance(node, ir.Apply) and lookup(node.func).keep_positive:
            arg = node.arg
        elif isinstance(node, ir.Power) and not sympy.Rational(node.exponent).is_integer:
            arg = node.base
        if arg is not None and ir.depends_on(arg, names) and arg not in found:
            found.append(arg)
    return found


def lagrangian_domain(emitter: Emitter, derivation: Derivation, rule: Rule) -> str:
    """``_lagrangian_domain(x, d)``: [(value at 0, Jacobian)] of the affine arguments that
    must be positive, for a start inside L's domain; a reason when one is not affine."""
    head = "def _lagrangian_domain(x, d):"
    if rule.kind != "lagrangian":
        return f"{head}\n    return []"
    unknown = _unknown(derivation, rule.variables)
    moving = [v.symbol for v in unknown]
    names = {s.name for s in moving}
    body, used = ["rows = []"], set()
    for arg in _domain_arguments(_lagrangian(derivation), names):
        if any(ir.depends_on(jacobian(arg, s), names) for s in moving):
            text = "a logarithm, root or real power in the Lagrangian has an argument that " \
                "is not affine, so no linear program finds a point inside its domain"
            return f"{head}\n    return {literal(text)}"
        size, sreads = emitter.size(length(arg.shape))
        value, vreads = emitter.code(_at_zero(arg, moving))
        used |= sreads | vreads
        body.append(f"rows.append((_flat({value}, {size}), "
                    f"{_jac_blocks(emitter, arg, moving, size, used)}))")
    body.append("return rows")
    return function(emitter, head, body, used)


def rule_text(rule: Rule) -> str:
    """How the unrecovered variables are found, for the module's docstring."""
    if rule.kind == "linprog" and rule.lift is not None:
        lifted = " and ".join(rule.lift.lifted)
        after = f", after epigraph variables for {lifted}," if lifted else ""
        return "found by solving the primal as a linear program in the unrecovered " \
            f"variables{after} with the recovered ones held (HiGHS)"
    if rule.kind == "lagrangian":
        return "found by a numeric minimization of the Lagrangian at the optimal multipliers " \
            "(L-BFGS-B with its analytic gradient, from a start inside its domain), the " \
            "recovered variables held; such an x is kept only when the duality gap and the " \
            "constraint violation at it certify it, else it is reported unrecovered"
    if rule.kind == "none":
        return f"left unrecovered: {rule.reason}"
    return ""

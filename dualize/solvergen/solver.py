"""Generate a standalone Python module that solves a derived dual on user data.

``render_solver(derivation)`` prints every numeric function of the module from
the symbolic results (objective, gradient, constraint Jacobians, recovery
formulas, the primal objective and constraints) with our numpy printer and binds
them in a ``Spec``; a jinja2 template lays those strings out after the runtime,
the source of ``runtime*.py`` copied verbatim (input checking, the methods, the
report).  The module needs only numpy and scipy, reads data by string key and
pastes no user text except validated identifiers.
"""

from __future__ import annotations

from pathlib import Path

from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from dualize.model import expr as ir
from dualize.model.ops import is_zero
from dualize.render.caution import CAUTION
from dualize.solvergen.ir_rewrite import Kron, length
from dualize.solvergen.pynames import literal
from dualize.solvergen.python_code import python_names
from dualize.solvergen.solver_conic import ball_plan, conic_plan
from dualize.solvergen.solver_emit import Emitter, Scope, function
from dualize.solvergen.solver_plan import General, Plan, is_conic, make_plan
from dualize.solvergen.solver_recover import (
    Rule,
    choose,
    jacobian_blocks,
    lagrangian,
    lagrangian_domain,
    missing_of,
    restricted,
    rule_text,
    unknowns,
)
from dualize.solvergen.solver_stationary import TEXT as STATIONARY_TEXT
from dualize.solvergen.solver_stationary import stationary_rows
from dualize.solvergen.solver_text import docstring

RUNTIME = ("runtime", "runtime_methods", "runtime_interior", "runtime_lp", "runtime_conic",
           "runtime_recover", "runtime_report")
"""The runtime modules, in the order their sources are copied into a generated module."""
MARKER = "# ---- copied into the generated module from here ----\n"


def runtime_source() -> str:
    """The runtime's source as the generated module carries it: each module below its marker."""
    folder = Path(__file__).resolve().parent
    bodies = []
    for name in RUNTIME:
        _, marker, body = (folder / f"{name}.py").read_text(encoding="utf-8").partition(MARKER)
        if not marker:
            raise DualizeError(f"the runtime module {name}.py has lost its marker line", 3)
        bodies.append(body.strip("\n"))
    return "\n\n\n".join(bodies)


def render_solver(derivation: Derivation) -> str:
    """The source of a solver module for ``derivation``'s dual (see the module doc)."""
    dual = derivation.dual
    if dual.unbounded:
        raise DualizeError("cannot generate a solver: the dual function is unbounded", 2)
    if not dual.closed_form:
        inner = ", ".join(v.name for v in dual.inner)
        raise DualizeError(
            "cannot generate a solver: the dual has no closed form (the Lagrangian is "
            f"still minimized over {inner})", 2
        )
    plan = conic_plan(dual) if is_conic(dual) else (ball_plan(dual) or make_plan(dual))
    missing = missing_of(derivation)
    stationary = stationary_rows(derivation, plan, missing)
    rule = choose(derivation, {k: v for k, v in missing.items() if k not in stationary})
    scope = _scope(derivation, plan.auxiliary, rule.auxiliary)
    return _render(derivation, plan, rule, stationary, scope)


def _scope(derivation: Derivation, auxiliary: tuple[ir.Symbol, ...] = (),
           primal_auxiliary: tuple[ir.Symbol, ...] = ()) -> Scope:
    """The names in scope; the dual's epigraph variables follow the multipliers in ``z``,
    the primal's (for recovering x as a linear program) sit in ``x``.

    Their names start with an underscore, which ``python_names`` refuses for problem
    names, so they are their own identifiers and cannot clash.
    """
    problem = derivation.problem
    data = [d.name for d in problem.data] + [str(s) for s in problem.dims]
    dual = [v.name for v in derivation.dual.variables]
    primal = [v.name for v in problem.variables]
    names = python_names(data + dual + primal)
    names |= {s.name: s.name for s in (*auxiliary, *primal_auxiliary)}
    return Scope(names, frozenset(data), tuple(dual + [s.name for s in auxiliary]),
                 tuple(primal + [s.name for s in primal_auxiliary]))


def _sizes(emitter: Emitter, symbols: list[ir.Symbol], head: str) -> str:
    parts, used = [], set()
    for symbol in symbols:
        code, reads = emitter.size(length(symbol.shape))
        parts.append(code)
        used |= reads
    return function(emitter, head, [f"return [{', '.join(parts)}]"], used)


def _objective(emitter: Emitter, plan: Plan) -> str:
    code, used = emitter.code(plan.objective)
    return function(emitter, "def _objective(z, d):", [f"return float({code})"], used)


def _gradient(emitter: Emitter, plan: Plan, symbols: list[ir.Symbol]) -> str:
    if not plan.gradients and symbols:  # a conic dual over a matrix: read off numerically
        return "def _gradient(z, d):\n    return None"
    pieces, used = [], set()
    for grad, symbol in zip(plan.gradients, symbols, strict=True):
        code, reads = emitter.code(grad)
        size, sreads = emitter.size(length(symbol.shape))
        pieces.append(f"_flat({code}, {size})")
        used |= reads | sreads
    body = [f"return np.concatenate([{', '.join([*pieces, 'np.zeros(0)'])}])"]
    return function(emitter, "def _gradient(z, d):", body, used)


def _hessian(emitter: Emitter, plan: Plan, symbols: list[ir.Symbol]) -> str:
    """``_hessian(z, d)``: the Hessian of the objective, as one dense matrix.

    A constant Hessian is printed in place, not hoisted into ``_prepare``, so that
    it is formed only when no low-rank factor replaces it.
    """
    if plan.hessian is None:
        return "def _hessian(z, d):\n    return None"
    rows, used = [], set()
    for row, left in zip(plan.hessian, symbols, strict=True):
        blocks = []
        for block, right in zip(row, symbols, strict=True):
            code, reads = emitter.code(block, hoist=not plan.constant_hessian)
            height, hreads = emitter.size(length(left.shape))
            width, wreads = emitter.size(length(right.shape))
            used |= reads | hreads | wreads
            blocks.append(f"_block({code}, {height}, {width})")
        rows.append(f"[{', '.join(blocks)}]")
    body = [f"return np.block([{', '.join(rows)}])"]
    return function(emitter, "def _hessian(z, d):", body, used)


def diagonal_of(expr: ir.Expr) -> ir.Expr | None:
    """The vector v when ``expr`` is diag(v) by its structure (sums and scalings of diagonal
    matrices, identities, zeros), else None."""
    if isinstance(expr, ir.Diag):
        return expr.arg
    if isinstance(expr, ir.Identity):
        return ir.Ones(expr.n)
    if isinstance(expr, ir.Zero) and expr.shape.rows == expr.shape.cols:
        return ir.Zero(ir.Shape(expr.shape.rows, 1))
    if isinstance(expr, ir.Scale):
        inner = diagonal_of(expr.arg)
        return None if inner is None else ir.Scale(expr.factor, inner)
    if isinstance(expr, ir.Add):
        terms = [diagonal_of(t) for t in expr.terms]
        return None if any(t is None for t in terms) else ir.Add(tuple(terms))  # type: ignore
    return None


def _hessian_diagonal(emitter: Emitter, plan: Plan, symbols: list[ir.Symbol]) -> str:
    """``_hessian_diagonal(z, d)``: the Hessian's diagonal when the Hessian is diagonal by
    its structure (zero blocks off the diagonal), so that no m x m matrix is formed."""
    none = "def _hessian_diagonal(z, d):\n    return None"
    if plan.hessian is None:
        return none
    pieces, used = [], set()
    for i, (row, symbol) in enumerate(zip(plan.hessian, symbols, strict=True)):
        if any(j != i and not is_zero(block) for j, block in enumerate(row)):
            return none
        vector = row[i] if symbol.shape.is_scalar else diagonal_of(row[i])
        if vector is None:
            return none
        code, reads = emitter.code(vector, hoist=not plan.constant_hessian)
        size, sreads = emitter.size(length(symbol.shape))
        used |= reads | sreads
        pieces.append(f"_flat({code}, {size})")
    body = [f"return np.concatenate([{', '.join([*pieces, 'np.zeros(0)'])}])"]
    return function(emitter, "def _hessian_diagonal(z, d):", body, used)


def _bounds(emitter: Emitter, plan: Plan, symbols: list[ir.Symbol]) -> str:
    body, used = ["sizes = _dual_sizes(d)", "lo = [np.full(s, -np.inf) for s in sizes]",
                  "hi = [np.full(s, np.inf) for s in sizes]"], set()
    index = {s.name: i for i, s in enumerate(symbols)}
    for bound in plan.bounds:
        code, reads = emitter.code(bound.value)
        used |= reads
        i = index[bound.variable]
        pick = "np.maximum" if bound.side == "lo" else "np.minimum"
        body.append(f"{bound.side}[{i}] = {pick}({bound.side}[{i}], {code})")
    body.append("return np.concatenate([*lo, np.zeros(0)]), np.concatenate([*hi, np.zeros(0)])")
    return function(emitter, "def _bounds(d):", body, used)


def _constraints(emitter: Emitter, plan: Plan, symbols: list[ir.Symbol]) -> str:
    """``_constraints(z, d)``: a list of (relation, values, Jacobian) for the general ones."""
    body, used = ["out = []"], set()
    for general in plan.constraints:
        value, reads = emitter.code(general.function)
        rows, rreads = emitter.size(length(general.function.shape))
        used |= reads | rreads
        if not general.jacobians and symbols:  # read off numerically (a conic dual)
            body.append(f"out.append(({general.relation!r}, _flat({value}, {rows}), None))")
            continue
        jacobian = _jacobian_row(emitter, general, symbols, rows, used,
                                 sparse=plan.method == "linprog" and _has_kron(general))
        body.append(f"out.append(({general.relation!r}, _flat({value}, {rows}), {jacobian}))")
    body.append("return out")
    return function(emitter, "def _constraints(z, d):", body, used)


def _has_kron(general: General) -> bool:
    return any(isinstance(node, Kron) for jac in general.jacobians for node in ir.walk(jac))


def _jacobian_row(emitter: Emitter, general: General, symbols: list[ir.Symbol], rows: str,
                  used: set[str], sparse: bool) -> str:
    """The constraint's Jacobian blocks side by side; sparse when asked (a matrix-valued
    constraint of a linear program: kron(I_m, 1_n) kept at m n nonzeros for HiGHS)."""
    return jacobian_blocks(emitter, list(general.jacobians), symbols, rows, used, sparse)


def _recovery(emitter: Emitter, derivation: Derivation) -> str:
    """``_recover(z, d)`` for the variables with a formula (the others: ``solver_recover``)."""
    body, used = ["x = {}"], set()
    for rec in derivation.recovery:
        if rec.formula is not None:
            code, reads = emitter.code(rec.formula)
            used |= reads
            body.append(f"x[{literal(rec.variable)}] = {code}")
    body.append("return x")
    return function(emitter, "def _recover(z, d):", body, used)


def _primal_parts(emitter: Emitter, derivation: Derivation) -> str:
    """``_primal(x, d)``: the primal objective and each constraint function, flattened."""
    problem = derivation.problem
    code, used = emitter.code(problem.objective)
    body = [f"value = float({code})", "parts = []"]
    for constraint in problem.constraints:
        fcode, reads = emitter.code(constraint.function)
        used |= reads
        body.append(f"parts.append(({constraint.kind!r}, np.asarray({fcode}, dtype=float)))")
    body.append("return value, parts")
    return function(emitter, "def _primal(x, d):", body, used)


def _primal_shapes(emitter: Emitter, derivation: Derivation) -> str:
    """``_primal_shapes(d)``: (rows, cols) of each matrix variable, whose entries a method
    finds stacked row by row (the multipliers of a matrix-valued dual constraint)."""
    items, used = [], set()
    for var in derivation.problem.variables:
        shape = var.symbol.shape
        if shape.rows != 1 and shape.cols != 1:
            rows, rreads = emitter.size(shape.rows)
            cols, creads = emitter.size(shape.cols)
            used |= rreads | creads
            items.append(f"{literal(var.name)}: ({rows}, {cols})")
    return function(emitter, "def _primal_shapes(d):", [f"return {{{', '.join(items)}}}"], used)


def _cones(emitter: Emitter, plan: Plan) -> str:
    """``_cones(z, d)``: the matrices that must be positive semidefinite (a conic dual)."""
    body, used = ["out = []"], set()
    for matrix in plan.cones:
        code, reads = emitter.code(matrix)
        size, sreads = emitter.size(matrix.shape.rows)
        used |= reads | sreads
        body.append(f"out.append(_block({code}, {size}, {size}))")
    body.append("return out")
    return function(emitter, "def _cones(z, d):", body, used)


def _balls(emitter: Emitter, plan: Plan) -> str:
    """``_balls(z, d)``: (radius, argument) of each 2-norm ball, a second-order cone."""
    body, used = ["out = []"], set()
    for radius, argument in plan.balls:
        rcode, rreads = emitter.code(radius)
        acode, areads = emitter.code(argument)
        size, sreads = emitter.size(length(argument.shape))
        used |= rreads | areads | sreads
        body.append(f"out.append((_flat({rcode}, 1), _flat({acode}, {size})))")
    body.append("return out")
    return function(emitter, "def _balls(z, d):", body, used)


def _prepare(emitter: Emitter) -> str:
    """Constants are emitted last-registered last, so each sees the ones it reads."""
    body, reads = [], set()
    for name, code, used in emitter.constants.entries:
        reads |= {u for u in used if not u.startswith("_k")}
        body.append(f"{name} = {code}")
    names = [n for n, _, _ in emitter.constants.entries]
    body.append("return {" + ", ".join(f"{literal(n)}: {n}" for n in names) + "}")
    return function(emitter, "def _prepare(d):", body, reads)


def _declarations(derivation: Derivation, scope: Scope) -> str:
    """DATA: (name, rows, cols, facts) with sizes as ints or dimension names."""
    rows = []
    for decl in derivation.problem.data:
        shape = decl.symbol.shape
        facts = sorted(decl.symbol.facts)
        rows.append(f"    ({literal(decl.name)}, {_size_spec(shape.rows)}, "
                    f"{_size_spec(shape.cols)}, {literal(facts)}),")
    return "DATA = [\n" + "\n".join(rows) + "\n]" if rows else "DATA = []"


def _size_spec(size: object) -> str:
    text = str(size)
    if text.isdigit():
        return text
    if text.isidentifier():
        return literal(text)
    raise DualizeError(f"cannot generate a solver: a data size {text} is not a plain name", 2)


def _spec(derivation: Derivation, method: str, missing: dict[str, str], by_lagrangian: bool,
          constant_hessian: bool, stationary: dict[str, tuple[int, float]]
          ) -> list[tuple[str, str]]:
    """The keyword arguments of the module's ``Spec``, as code."""
    problem = derivation.problem
    dual = derivation.dual
    entries = [
        ("method", literal(method)),
        ("dual_names", literal([v.name for v in dual.variables])),
        ("dual_sense", literal(dual.sense)),
        ("primal_sense", literal(problem.sense)),
        ("primal_names", literal([v.name for v in problem.variables])),
        ("primal_scalar", repr([v.symbol.shape.is_scalar for v in problem.variables])),
        ("scalars", "SCALARS"),
        ("data", "DATA"),
        ("dims", "DIMS"),
        ("unrecovered", literal(dict(sorted(missing.items())))),
        ("by_lagrangian", repr(by_lagrangian)),
        ("stationary", literal([(k, i, f) for k, (i, f) in sorted(stationary.items())])),
        ("constant_hessian", repr(constant_hessian)),
        ("caution", literal(CAUTION)),
    ]
    return entries + [(name, f"_{code}") for name, code in _PRINTED]


_PRINTED = (("prepare", "prepare"), ("sizes", "dual_sizes"), ("objective", "objective"),
            ("gradient", "gradient"), ("hessian", "hessian"), ("bounds", "bounds"),
            ("constraints", "constraints"), ("recover", "recover"), ("primal", "primal"),
            ("unknowns", "unknowns"), ("restricted", "restricted"), ("lagrangian", "lagrangian"),
            ("lagrangian_domain", "lagrangian_domain"), ("cones", "cones"),
            ("hessian_diagonal", "hessian_diagonal"), ("primal_shapes", "primal_shapes"),
            ("balls", "balls"))


def _scalars(derivation: Derivation, auxiliary: tuple[ir.Symbol, ...]) -> str:
    """Per part of z: True (a number), False (a vector) or "square" (a matrix multiplier,
    its k * k entries in z)."""
    def kind(symbol: ir.Symbol) -> object:
        if symbol.shape.cols != 1 and symbol.shape.rows != 1:
            return "square"
        return symbol.shape.is_scalar

    return repr([kind(v.symbol) for v in derivation.dual.variables] +
                [kind(s) for s in auxiliary])


def _render(derivation: Derivation, plan: Plan, rule: Rule,
            stationary: dict[str, tuple[int, float]], scope: Scope) -> str:
    from dualize.render.templating import fill

    emitter = Emitter(scope)
    symbols = [v.symbol for v in derivation.dual.variables] + list(plan.auxiliary)
    missing = missing_of(derivation)
    functions = [
        _sizes(emitter, symbols, "def _dual_sizes(d):"),
        _objective(emitter, plan),
        _gradient(emitter, plan, symbols),
        _hessian(emitter, plan, symbols),
        _hessian_diagonal(emitter, plan, symbols),
        _bounds(emitter, plan, symbols),
        _constraints(emitter, plan, symbols),
        _recovery(emitter, derivation),
        _primal_parts(emitter, derivation),
        unknowns(emitter, derivation, rule),
        restricted(emitter, derivation, rule),
        lagrangian(emitter, derivation, rule),
        lagrangian_domain(emitter, derivation, rule),
        _cones(emitter, plan),
        _primal_shapes(emitter, derivation),
        _balls(emitter, plan),
    ]
    functions.insert(0, _prepare(emitter))
    return fill(
        "solver.py.j2",
        docstring=docstring(derivation, plan.method, plan.reason, missing, rule_text(rule),
                            {name: STATIONARY_TEXT for name in stationary}),
        runtime=runtime_source(),
        declarations=_declarations(derivation, scope),
        dims=literal(sorted(str(s) for s in derivation.problem.dims)),
        scalars=_scalars(derivation, plan.auxiliary),
        functions="\n\n\n".join(functions),
        spec=_spec(derivation, plan.method, missing, rule.kind == "lagrangian",
                   plan.constant_hessian, stationary),
    )

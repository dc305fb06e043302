"""Which form a problem is in, and the other one written out (see ``forms``)."""

from __future__ import annotations

from dualize.model.problem import Problem
from dualize.multipliers import forms as F
from dualize.syntax import ast


def other_form(problem: Problem, weight: str | None = None, bound: str | None = None,
               new_name: str | None = None, new_label: str | None = None) -> F.Pair:
    """The pair of forms of ``problem``.

    ``weight`` names the data weight of a penalized problem; ``bound`` the label
    of a constrained problem's bound; with neither, the only candidate is taken.
    ``new_name`` is the name given to the new bound ``t`` or weight ``w``.
    """
    doc = F.parsed(problem)
    w_name, t_name = new_name or _free(problem, "w"), new_name or _free(problem, "t")
    new_label = new_label or _free(problem, "bound", {t_name})
    if bound is not None:
        return _from_constrained(problem, doc, bound, w_name)
    if weight is not None:
        return _from_penalized(problem, doc, weight, t_name, new_label)
    weights = [name for name, _, _ in _weighted_terms(problem, doc)]
    if len(weights) == 1:
        return _from_penalized(problem, doc, weights[0], t_name, new_label)
    bounds = _bounds(problem, doc)
    if not weights and len(bounds) == 1:
        return _from_constrained(problem, doc, bounds[0], w_name)
    found = ", ".join(f"weight {w}" for w in weights) + ", ".join(f"bound {b}" for b in bounds)
    if found:
        raise F.FormError(f"{problem.path}: more than one candidate ({found}); choose one "
                          "with --weight NAME or --bound LABEL")
    raise F.FormError(f"{problem.path}: no weighted term (a scalar data weight declared in "
                      "R_+ or R_++ times a term of the variables) and no labelled scalar "
                      "bound r(x) <= t to rewrite")


def _weightable(problem: Problem, doc: F.Document) -> set[str]:
    """Scalar data declared nonnegative: R_+ or R_++."""
    return {d.name for d in doc.doc.data if isinstance(d.set, ast.NamedSet)
            and d.set.name == "R" and not d.set.sizes and d.set.sign in ("+", "++")}


def _weighted_terms(problem: Problem, doc: F.Document) -> list[tuple[str, ast.Expr, str]]:
    """(weight, term, r as written) for each ``w * r`` term with the sign that penalizes.

    The weight is the first or the last factor of a product chain
    (``w * x' * S * x`` or ``||x||_1 * w``).
    """
    wanted = 1 if problem.sense == "minimize" else -1
    weights, variables = _weightable(problem, doc), {v.name for v in problem.variables}
    out = []
    for sign, node in F.signed_terms(doc.doc.objective.expr):
        if sign != wanted or not (isinstance(node, ast.BinOp) and node.op in PRODUCT_OPS):
            continue
        found = _weight_factor(node, doc.source, weights)
        if found is not None and F.names_in(node) - {found[0]} & variables:
            out.append((found[0], node, found[1]))
    return out


PRODUCT_OPS = ("*", ".*", "/", "./")


def _chain(node: ast.Expr) -> list[tuple[str, ast.Expr]]:
    """A left-associated product chain as (operator before, factor); the first has ""."""
    if isinstance(node, ast.BinOp) and node.op in PRODUCT_OPS:
        return _chain(node.left) + [(node.op, node.right)]
    return [("", node)]


def _factor_text(source: str, node: ast.Expr) -> str:
    """A factor as written, in parentheses when it is a sum, a negation or a product
    (a product as a factor was parenthesized in the source: ``a / (b * c)``)."""
    text = F.cut(source, node)
    return f"({text})" if isinstance(node, ast.BinOp | ast.Neg) else text


def _weight_factor(node: ast.BinOp, source: str, weights: set[str]) -> tuple[str, str] | None:
    """The weight and the text of the other factors: the weight is a factor of the chain
    joined by ``*`` on both sides (``w * r``, ``2 * w * r``, ``r * w``), so, being a
    scalar, it factors out of the product."""
    items = _chain(node)
    for k, (op, f) in enumerate(items):
        after = items[k + 1][0] if k + 1 < len(items) else "*"
        if (isinstance(f, ast.Name) and f.name in weights and op in ("", "*")
                and after == "*" and len(items) > 1):
            rest = items[:k] + items[k + 1:]
            rest[0] = ("", rest[0][1])
            text = _factor_text(source, rest[0][1]) + "".join(
                f" {o} {_factor_text(source, g)}" for o, g in rest[1:])
            return f.name, text if len(rest) == 1 else f"({text})"
    return None


def _bounds(problem: Problem, doc: F.Document) -> list[str]:
    """Labels of scalar one-relation constraints ``r(x) <= t`` with ``t`` free of variables."""
    scalar = {c.label for c in problem.constraints if c.kind == "ineq" and c.labelled
              and c.function.shape.is_scalar}
    out = []
    for c in doc.doc.constraints:
        if len(c.relations) == 1 and c.labels and c.labels[0].name in scalar:
            try:
                _split_bound(problem, c)
            except F.FormError:
                continue
            out.append(c.labels[0].name)
    return out


def _taken(problem: Problem) -> set[str]:
    return ({d.name for d in problem.data} | {v.name for v in problem.variables}
            | {c.label for c in problem.constraints} | {str(d) for d in problem.dims})


def _free(problem: Problem, stem: str, also: set[str] | None = None) -> str:
    """``stem``, else ``stem1``, ``stem2``, ...: the first name the problem does not use."""
    taken, k = _taken(problem) | (also or set()), 0
    while (f"{stem}{k}" if k else stem) in taken:
        k += 1
    return f"{stem}{k}" if k else stem


def _fresh(problem: Problem, name: str, what: str) -> None:
    if not name.isidentifier() or not name.isascii():
        raise F.FormError(f"'{name}' is not a name of our language (letters, digits, _)")
    if name in _taken(problem):
        raise F.FormError(f"{problem.path}: the name '{name}' for the {what} is already "
                          "used; choose another with --name")


def _from_penalized(problem: Problem, doc: F.Document, weight: str, bound: str,
                    label: str) -> F.Pair:
    found = {w: (term, text) for w, term, text in _weighted_terms(problem, doc)}
    if weight not in found:
        raise F.FormError(f"{problem.path}: no term '{weight} * r(x)' that penalizes "
                          f"({'+' if problem.sense == 'minimize' else '-'} {weight} * ...); "
                          "the weight must be scalar data declared in R_+ or R_++")
    terms = F.signed_terms(doc.doc.objective.expr)
    rest = [(s, n) for s, n in terms if n is not found[weight][0]]
    others = [n for _, n in rest] + list(doc.doc.constraints)
    if any(weight in F.names_in(n) for n in others):
        raise F.FormError(f"{problem.path}: the weight '{weight}' appears elsewhere in the "
                          "problem, so removing its term changes more than the weighted term")
    _fresh(problem, bound, "bound")
    _fresh(problem, label, "bound's label")
    r_text, f_text = found[weight][1], F.joined(doc.source, rest)
    text = F.problem_text(
        f"The constrained form: the weighted term {weight} * ({r_text}) became the bound "
        f"labelled {label}: {r_text} <= {bound}.", f"{_base(doc)} (constrained form)",
        doc.data_lines({weight}, [f"{bound} in R"]), problem.sense, f_text, doc.over(),
        doc.constraint_lines() + [f"  {label}: {r_text} <= {bound}"])
    constrained = F.reread(text, _sibling(problem.path, "constrained"), "constrained")
    return _pair("penalized", problem, constrained, weight, bound, label, r_text, f_text)


def _split_bound(problem: Problem, c: ast.Constraint) -> tuple[ast.Expr, ast.Expr]:
    """(r, t) of ``r <= t`` or ``t >= r``; t free of variables, r not."""
    op = c.relations[0].op
    if op not in ("<=", ">="):
        raise F.FormError(f"{problem.path}: the bound must be written with <= or >=")
    r, t = (c.parts[0], c.parts[1]) if op == "<=" else (c.parts[1], c.parts[0])
    variables = {v.name for v in problem.variables}
    if F.names_in(t) & variables or not F.names_in(r) & variables:
        raise F.FormError(f"{problem.path}: the bound must read r(x) <= t with the "
                          "variables on one side only")
    return r, t


def _from_constrained(problem: Problem, doc: F.Document, label: str, weight: str) -> F.Pair:
    found = [c for c in doc.doc.constraints if label in [lb.name for lb in c.labels]]
    resolved = [c for c in problem.constraints if c.label == label]
    if not found or not resolved:
        raise F.FormError(f"{problem.path}: no constraint labelled '{label}'")
    if len(found[0].relations) != 1 or not resolved[0].function.shape.is_scalar:
        raise F.FormError(f"{problem.path}: '{label}' must be one scalar relation "
                          "r(x) <= t on a line of its own")
    r, t = _split_bound(problem, found[0])
    _fresh(problem, weight, "weight")
    r_text, t_text = F.cut(doc.source, r), F.cut(doc.source, t)
    others = [doc.doc.objective.expr] + [c for c in doc.doc.constraints if c is not found[0]]
    drop = {t.name} if isinstance(t, ast.Name) and not any(
        t.name in F.names_in(n) for n in others) else set()
    f_text = F.cut(doc.source, doc.doc.objective.expr)
    op = "+" if problem.sense == "minimize" else "-"
    text = F.problem_text(
        f"The penalized form: the bound labelled {label}: {r_text} <= {t_text} became the "
        f"weighted term {op} {weight} * ({r_text}).", f"{_base(doc)} (penalized form)",
        doc.data_lines(drop, [f"{weight} in R_+"]), problem.sense,
        f"{f_text} {op} {weight} * {F.factor(r, r_text)}", doc.over(),
        doc.constraint_lines(skip=found[0]))
    penalized = F.reread(text, _sibling(problem.path, "penalized"), "penalized")
    return _pair("constrained", penalized, problem, weight, t_text, label, r_text, f_text)


def _base(doc: F.Document) -> str:
    title = doc.title()
    for suffix in (" (constrained form)", " (penalized form)"):
        title = title.removesuffix(suffix)
    return title


def _sibling(path: str, form: str) -> str:
    stem = path[:-5] if path.endswith(".prob") else path
    return f"{stem}_{form}.prob"


def _pair(given: str, penalized: Problem, constrained: Problem, weight: str, bound: str,
          label: str, r_text: str, f_text: str) -> F.Pair:
    conditions = _conditions(constrained, label, weight, bound)
    return F.Pair(given, constrained.sense, weight, bound, label, r_text, f_text,
                  penalized.source, constrained.source, penalized, constrained, conditions)


def _conditions(constrained: Problem, label: str, weight: str,
                bound_name: str) -> tuple[tuple[str, str], ...]:
    """Each condition of the equivalence and what the analysis says of it."""
    from dualize.analysis.convexity import variable_signs
    from dualize.analysis.public import curvature

    signs = variable_signs(constrained)
    bound = next(c for c in constrained.constraints if c.label == label)
    f_curv = curvature(constrained.objective, signs)
    r_curv = curvature(bound.function, signs)
    want = "convex" if constrained.sense == "minimize" else "concave"
    return (
        (f"f is {want}", _status(f_curv, want)),
        ("r is convex", _status(r_curv, "convex")),
        (f"{bound_name} lies above the smallest value of r over the other constraints "
         "(Slater's condition for the bound)", "to be checked on an instance (dualize "
         "trade-off)"),
        (f"{weight} is the optimal multiplier of the bound {label}", "the relation between "
         f"{weight} and {bound_name}"),
    )


def _status(found: str, want: str) -> str:
    if found in (want, "affine", "constant"):
        return f"holds ({found}, by the curvature rules)"
    return "not shown: the curvature rules find it " + found

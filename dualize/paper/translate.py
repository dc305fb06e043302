"""A claim of a draft -> a claim file in our language, with a map back to the .tex.

The paper's variables (under the max or min) are matched with the derived dual's
variables and the primal's multipliers: by the name map first, then by name, then
by shape (the one assignment under which the translation loads).  The claim text
declares the primal data it uses, so ``dualize.checking`` reads it as it is.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import permutations

from dualize.diagnostics import Diagnostic, make
from dualize.model.expr import Shape
from dualize.model.problem import Problem
from dualize.paper import rules as R
from dualize.paper import tree as T
from dualize.paper.emit import Emitter
from dualize.paper.locate import PaperClaim
from dualize.paper.notation import Index, Refusal, Symbol, children, free_use
from dualize.paper.piece import Piece, innermost
from dualize.paper.reader import read_display
from dualize.syntax.span import Span

MAX_TRIALS = 24


@dataclass(frozen=True)
class NameMatch:
    """Paper name -> our name, and how: map | name | shape | only (the one pairing left)."""

    paper: str
    ours: str
    how: str


@dataclass(frozen=True)
class Translation:
    """The claim text (None when refused), where each line came from, and findings."""

    claim: PaperClaim
    text: str | None
    lines: tuple[Span | None, ...]
    marks: tuple[tuple[int, int, Span], ...]
    matches: tuple[NameMatch, ...]
    diagnostics: tuple[Diagnostic, ...]

    @property
    def ok(self) -> bool:
        return self.text is not None and not self.diagnostics

    def tex_span(self, line: int, column: int) -> Span | None:
        """The .tex span that produced the claim text at (line, column), 1-based."""
        if self.text is None or not 1 <= line <= len(self.lines):
            return None
        offset = sum(len(t) + 1 for t in self.text.split("\n")[:line - 1]) + column - 1
        return innermost(self.marks, offset) or self.lines[line - 1]


def translate(claim: PaperClaim, problem: Problem, derivation: object | None = None
              ) -> Translation:
    """Read the claim's display and write it in our language (see the module docstring)."""
    read = read_display(claim.tex, claim.body_start, claim.body_end, claim.path)
    if read.problem is None:
        return Translation(claim, None, (), (), (), read.diagnostics)
    paper = with_variables(read.problem, problem, claim.name_map)
    try:
        shapes = _candidates(problem, derivation)
        matches = match_names(claim, paper, problem, shapes)
        built = build(claim, paper, problem, matches, shapes)
    except Refusal as err:
        diag = make(_kind(err.rule), claim.path, err.span, hint=err.hint, what=err.what)
        return Translation(claim, None, (), (), (), (diag,))
    text, lines, marks = built
    return Translation(claim, text, lines, marks, matches, _loaded(claim, text, lines, marks))


def with_variables(paper: T.PaperProblem, problem: Problem,
                   claim_map: tuple[tuple[str, str], ...] = ()) -> T.PaperProblem:
    """A problem stated without variables under the max (``\\mbox{maximize} -b^T\\lambda``)
    has as variables the names it uses that are not data, in order of appearance."""
    if paper.variables:
        return paper
    from dataclasses import replace

    data = {d.name for d in problem.data} | {d.name for d in problem.dims}
    data |= {paper for paper, ours in claim_map if ours in data}
    seen: dict[str, T.Name] = {}
    for name in _all_names(paper):
        if name.text not in data and name.text not in seen and name.text != "e":
            seen[name.text] = name
    found = tuple(T.VarDecl(n, span=n.span) for n in seen.values() if not _is_index(n, paper))
    return replace(paper, variables=found)


def _all_names(paper: T.PaperProblem) -> list[T.Name]:
    out: list[T.Name] = []
    stack: list[T.Node] = [paper.objective, *paper.items]
    while stack:
        node = stack.pop(0)
        if isinstance(node, T.Name):
            out.append(node)
        elif isinstance(node, T.Chain):
            stack[:0] = list(node.terms)
        else:
            stack[:0] = children(node)
    return out


def _is_index(name: T.Name, paper: T.PaperProblem) -> bool:
    """Index letters (of sums and for-all conditions) are not variables."""
    if len(name.text) != 1:
        return False
    indices = {i.index for i in paper.items if isinstance(i, T.ForAll)}
    return name.text in indices or name.text in _sum_indices(paper)


def _sum_indices(paper: T.PaperProblem) -> set[str]:
    out: set[str] = set()
    stack: list[T.Node] = [paper.objective, *paper.items]
    while stack:
        node = stack.pop()
        if isinstance(node, T.Sum):
            out.update(node.indices)
        stack += list(node.terms) if isinstance(node, T.Chain) else children(node)
    return out


def _kind(rule: str) -> object:
    return {"paper-index": R.PAPER_INDEX, "paper-name": R.PAPER_NAME}.get(
        rule, R.PAPER_UNSUPPORTED)


def _candidates(problem: Problem, derivation: object | None) -> dict[str, Shape]:
    """Names a claim variable may take: the derived dual's variables, then multipliers."""
    out: dict[str, Shape] = {}
    if derivation is None:
        from dualize.duality.engine import derive

        derivation = derive(problem)
    for v in derivation.dual.variables:  # type: ignore[attr-defined]
        out[v.symbol.name] = v.symbol.sym_shape
    for c in problem.constraints:
        out.setdefault(c.multiplier.name, c.multiplier.sym_shape)
    return out


def match_names(claim: PaperClaim, paper: T.PaperProblem, problem: Problem,
                candidates: dict[str, Shape]) -> tuple[NameMatch, ...]:
    """Each paper variable with a candidate name: map, then name, then by shape."""
    given = dict(claim.name_map)
    found: list[NameMatch] = []
    left: list[T.VarDecl] = []
    for decl in paper.variables:
        name = decl.name.text
        if name in given:
            found.append(NameMatch(name, given[name], "map"))
        elif name in candidates:
            found.append(NameMatch(name, name, "name"))
        else:
            left.append(decl)
    _check_known(paper, candidates, found)
    if left:
        found += _by_shape(claim, paper, problem, candidates, found, left)
    return tuple(found)


def _check_known(paper: T.PaperProblem, candidates: dict[str, Shape],
                 found: list[NameMatch]) -> None:
    spans = {d.name.text: d.span for d in paper.variables}
    for m in found:
        if m.ours not in candidates:
            decl = T.VarDecl(T.Name(m.paper), span=spans.get(m.paper, paper.span))
            raise Refusal("paper-name", decl.span, f"`{m.paper}` is mapped to `{m.ours}`, "
                          "which is neither a dual variable nor a multiplier of the problem",
                          "choose one of: " + ", ".join(sorted(candidates)))


def _by_shape(claim: PaperClaim, paper: T.PaperProblem, problem: Problem,
              candidates: dict[str, Shape], found: list[NameMatch],
              left: list[T.VarDecl]) -> list[NameMatch]:
    """The one assignment of the remaining names under which the translation loads."""
    free = [n for n in candidates if n not in {m.ours for m in found}]
    viable: list[list[NameMatch]] = []
    trials = list(permutations(free, len(left)))[:MAX_TRIALS]
    for choice in trials:
        trial = [NameMatch(d.name.text, ours, "shape") for d, ours in zip(left, choice,
                                                                            strict=True)]
        if _loads(claim, paper, problem, _ordered(paper, found + trial), candidates):
            viable.append(trial)
    if len(viable) == 1:
        return viable[0]
    if not viable and len(trials) == 1:
        # The only possible pairing: its translation's own errors say what is wrong.
        return [NameMatch(d.name.text, ours, "only") for d, ours in zip(left, trials[0],
                                                                          strict=True)]
    names = ", ".join(f"`{d.name.text}`" for d in left)
    if not viable:
        raise Refusal("paper-name", left[0].span, f"no multiplier of the problem fits {names} "
                      "by shape", "give a map: % dualize: claim for FILE map alpha=a")
    raise Refusal("paper-name", left[0].span, f"several multipliers fit {names} by shape",
                  "give a map: % dualize: claim for FILE map lambda=capacity")


def _ordered(paper: T.PaperProblem, matches: list[NameMatch]) -> tuple[NameMatch, ...]:
    by = {m.paper: m for m in matches}
    return tuple(by[d.name.text] for d in paper.variables if d.name.text in by)


def _loads(claim: PaperClaim, paper: T.PaperProblem, problem: Problem,
           matches: tuple[NameMatch, ...], shapes: dict[str, Shape]) -> bool:
    from dualize.model import load

    try:
        text, _, _ = build(claim, paper, problem, matches, shapes)
    except Refusal:
        return False
    loaded = load(text, claim.path)
    return loaded.problem is not None and not any(
        d.severity == "error" for d in loaded.diagnostics)


# ---- writing the claim -------------------------------------------------------
def build(claim: PaperClaim, paper: T.PaperProblem, problem: Problem,
          matches: tuple[NameMatch, ...], shapes: dict[str, Shape]
          ) -> tuple[str, tuple[Span | None, ...], tuple]:
    """The claim text, the .tex span of each of its lines, and finer marks.

    ``shapes`` holds the shapes of the names claim variables may take."""
    names = _names(problem, matches, shapes, claim.name_map)
    em = Emitter(names, frozenset(d.name for d in problem.dims))
    lines: list[tuple[Piece, Span | None]] = [
        (Piece(f"# Claim of {claim.path}, line {claim.line} ({claim.environment})"), None)]
    used = _used_data(paper, problem, names)
    lines += [(Piece(f"data {d.name} in {d.set_text}"), None) for d in used]
    lines.append((Piece(paper.sense + " ") + em.expression(paper.objective), paper.span))
    declared = ", ".join(f"{names[m.paper].name} in {set_text(names[m.paper].shape)}"
                         for m in matches)
    lines.append((Piece("over " + declared), paper.span))
    body = _constraints(em, paper, names)
    if body:
        lines.append((Piece("subject to"), None))
        lines += [(Piece("  ") + piece, span) for piece, span in body]
    text, spans, marks = _assemble(lines)
    return semidefinite_order(text, claim.path), spans, marks


def _assemble(lines: list[tuple[Piece, Span | None]]) -> tuple[str, tuple, tuple]:
    out = Piece("")
    for k, (piece, _) in enumerate(lines):
        out = out + ("\n" if k else "") + piece
    return out.text + "\n", tuple(span for _, span in lines), out.marks


def _names(problem: Problem, matches: tuple[NameMatch, ...], shapes: dict[str, Shape],
           claim_map: tuple[tuple[str, str], ...] = ()) -> dict[str, Symbol]:
    """Paper names -> symbols: the problem's data (also under mapped paper names), and
    the claim's variables under the names they were matched with."""
    names = {d.name: Symbol(d.name, d.symbol.sym_shape) for d in problem.data}
    data = dict(names)
    for paper, ours in claim_map:
        if ours in data:
            names[paper] = data[ours]
    for m in matches:
        names[m.paper] = Symbol(m.ours, shapes[m.ours], variable=True)
    return names


def _used_data(paper: T.PaperProblem, problem: Problem, names: dict[str, Symbol]) -> list:
    used = {s.name for s in names.values() if not s.variable}
    return [d for d in problem.data if d.name in used]


def _constraints(em: Emitter, paper: T.PaperProblem, names: dict[str, Symbol]
                 ) -> list[tuple[Piece, Span]]:
    """The head's conditions (``\\lambda \\succeq 0``), then each chain, pair by pair."""
    out: list[tuple[Piece, Span]] = []
    for decl in paper.variables:
        if decl.relation is not None and decl.bound is not None:
            chain = T.Chain((decl.name, decl.bound), (decl.relation,), span=decl.span)
            out += _chain(em, chain, None)
    for chain, index in _indexed_chains(paper):
        out += _chain(em, chain, index)
    return out


def _indexed_chains(paper: T.PaperProblem) -> list[tuple[T.Chain, Index | None]]:
    """Each chain with the for-all condition that follows it in its row, when the chain
    uses that index outside a sum (``\\sum_i \\alpha_i y_i = 0, 0 \\le \\alpha_i \\le C,
    i = 1, \\dots, m``: the condition is the second chain's only)."""
    bound: dict[int, Index] = {}
    waiting: list[T.Chain] = []
    for item in paper.items:
        if isinstance(item, T.Chain):
            waiting.append(item)
            continue
        users = [c for c in waiting if c.row == item.row
                 and any(free_use(t, item.index) for t in c.terms)]
        if not users:
            raise Refusal("paper-index", item.span, f"the condition on {item.index} follows "
                          f"no constraint that uses {item.index}")
        bound.update({k: Index(item.index, item.upper) for k, c in enumerate(paper.items)
                      if any(c is u for u in users)})
        waiting = []
    return [(c, bound.get(k)) for k, c in enumerate(paper.items) if isinstance(c, T.Chain)]


def _chain(em: Emitter, chain: T.Chain, index: Index | None) -> list[tuple[Piece, Span]]:
    """One constraint line per relation of the chain (``0 <= a <= C`` is two)."""
    out = []
    for k, relation in enumerate(chain.relations):
        left, right = chain.terms[k], chain.terms[k + 1]
        piece = em.expression(left, index) + f" {relation} " + em.expression(right, index)
        out.append((piece, chain.span))
    return out


def semidefinite_order(text: str, path: str) -> str:
    """``\\succeq`` between vectors is the entrywise order (``\\lambda \\succeq 0``), between
    matrices the semidefinite one: the sides' shape decides, read from the constraint
    loaded alone as an equality (which loads whenever its shapes conform)."""
    lines = text.split("\n")
    if "subject to" not in lines:
        return text
    head = [_neutral(line) for line in lines[:lines.index("subject to") + 1]]
    for k, line in enumerate(lines):
        if _order_of(line) and _is_vector_constraint(head, line, path):
            lines[k] = line.replace(" succeq ", " >= ").replace(" preceq ", " <= ")
    return "\n".join(lines)


def _is_vector_constraint(head: list[str], line: str, path: str) -> bool:
    from dualize.model import load

    probe = "\n".join([*head, line.replace(" succeq ", " == ").replace(" preceq ", " == ")])
    loaded = load(probe + "\n", path)
    if loaded.problem is None or not loaded.problem.constraints:
        return False
    shape = loaded.problem.constraints[0].lhs.shape
    return shape.cols == 1


def _neutral(line: str) -> str:
    """The objective replaced by 0, so that the probe depends on the constraint alone."""
    for sense in ("maximize ", "minimize "):
        if line.startswith(sense):
            return sense + "0"
    return line


def _order_of(line: str) -> bool:
    return line.startswith("  ") and (" succeq " in line or " preceq " in line)


def set_text(shape: Shape) -> str:
    if shape.is_scalar:
        return "R"
    if shape.cols == 1:
        return f"R^{shape.rows}"
    if shape.rows == shape.cols:
        return f"S^{shape.rows}"
    return f"R^({shape.rows},{shape.cols})"


# ---- findings of the loaded claim, back in the .tex ---------------------------
def _loaded(claim: PaperClaim, text: str, lines: tuple, marks: tuple) -> tuple[Diagnostic, ...]:
    from dualize.model import load

    loaded = load(text, claim.path + "#claim")
    holder = Translation(claim, text, lines, marks, (), ())
    out = []
    for d in loaded.diagnostics:
        if d.severity != "error":
            continue
        span = holder.tex_span(d.span.line, d.span.column) if d.span else None
        line = text.split("\n")[d.span.line - 1] if d.span else ""
        out.append(make(R.PAPER_CLAIM, claim.path, span, hint=d.hint,
                        notes=(f"[{d.rule}] in the translation: {line.strip()}",),
                        message=d.message))
    return tuple(out)

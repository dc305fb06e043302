"""LaTeX of one display -> a ``PaperProblem``, or a located diagnostic.

The grammar is grammar/paper_latex.lark (in a wheel: dualize/grammar/); rule
names are node names.  Positions are reported in the .tex file: the reader is
given the display's body and where that body starts.
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from pathlib import Path

from lark import Lark, Token, Transformer, Tree, UnexpectedInput, v_args
from lark.exceptions import UnexpectedCharacters, UnexpectedEOF, UnexpectedToken

from dualize.diagnostics import Diagnostic, make
from dualize.paper import tree as T
from dualize.paper.rules import PAPER_SYNTAX
from dualize.paper.text_positions import Positions
from dualize.paper.tokens import PaperTokens
from dualize.paper.words import expected_text, found_text, greek_name, relation_of
from dualize.syntax.span import Span

GRAMMAR_NAME = "paper_latex.lark"
STRICT_HINT = ("strict inequalities are not part of the problem language (a dual's "
               "feasible set is closed); write \\le or \\ge")


def grammar_path() -> Path:
    """The installed grammar if present, else the checkout's grammar/ folder."""
    from importlib import resources

    installed = resources.files("dualize") / "grammar" / GRAMMAR_NAME
    if installed.is_file():
        return Path(str(installed))
    return Path(__file__).resolve().parents[2] / "grammar" / GRAMMAR_NAME


@lru_cache(maxsize=1)
def lark_parser() -> Lark:
    """The LALR parser, built once per process."""
    return Lark(grammar_path().read_text(encoding="utf-8"), parser="lalr", lexer="basic",
                postlex=PaperTokens(), propagate_positions=True, maybe_placeholders=True)


@dataclass(frozen=True)
class ReadResult:
    problem: T.PaperProblem | None
    diagnostics: tuple[Diagnostic, ...]


def read_display(tex: str, start: int, end: int, path: str) -> ReadResult:
    """Read ``tex[start:end]`` (a display's body) as an optimization problem."""
    positions = Positions(tex, start)
    body = tex[start:end]
    try:
        parsed = lark_parser().parse(body)
    except UnexpectedInput as err:
        return ReadResult(None, (_syntax_diagnostic(err, body, positions, path),))
    problem = Build(positions).transform(parsed)
    return ReadResult(problem, ())


def _syntax_diagnostic(err: UnexpectedInput, body: str, positions: Positions,
                       path: str) -> Diagnostic:
    """What stood where, and what the grammar would have taken there."""
    if isinstance(err, UnexpectedToken) and err.token.type != "$END":
        tok = err.token
        span = positions.span(tok.start_pos or 0, tok.end_pos or (tok.start_pos or 0) + 1)
        return make(PAPER_SYNTAX, path, span, found=found_text(tok),
                    expected=expected_text(err.expected))
    if isinstance(err, UnexpectedCharacters):
        span = positions.span(err.pos_in_stream, err.pos_in_stream + 1)
        char = body[err.pos_in_stream]
        hint = STRICT_HINT if char in "<>" else None
        return make(PAPER_SYNTAX, path, span, hint=hint, found=f"unknown character `{char}`",
                    expected="a formula (letters, commands, operators, braces)")
    where = len(body.rstrip())
    expected = err.expected if isinstance(err, (UnexpectedEOF, UnexpectedToken)) else set()
    return make(PAPER_SYNTAX, path, positions.span(where, where + 1),
                found="the display ends here", expected=expected_text(expected or set()))


def _text(tok: Token) -> str:
    return str(tok)


@v_args(tree=True)
class Build(Transformer):
    """Lark tree -> paper nodes (one method per rule; an unknown rule raises)."""

    def __init__(self, positions: Positions) -> None:
        super().__init__(visit_tokens=False)
        self.positions = positions

    def __default__(self, data: str, children: list, meta: object) -> object:
        raise NotImplementedError(f"no paper node for the rule {data}")

    def _span(self, tree: Tree) -> Span:
        m = tree.meta
        if m.empty:
            return T.NOWHERE
        return self.positions.span(m.start_pos, m.end_pos)

    def _tok_span(self, tok: Token) -> Span:
        return self.positions.span(tok.start_pos or 0, tok.end_pos or 0)

    # ---- the problem --------------------------------------------------------
    def start(self, t: Tree) -> T.PaperProblem:
        head, rest = _split_head(t.children)
        sense, variables = head
        objective = rest[0]
        items = _items(rest[1:])
        return T.PaperProblem(sense, variables, objective, items, span=self._span(t))

    def head(self, t: Tree) -> tuple[str, tuple[T.VarDecl, ...]]:
        sense_tok, under = t.children
        return _sense(sense_tok), (under if under is not None else ())

    def head_underset(self, t: Tree) -> tuple[str, tuple[T.VarDecl, ...]]:
        variables, sense_tok = t.children[1], t.children[2]
        return _sense(sense_tok), variables

    def under(self, t: Tree) -> tuple[T.VarDecl, ...]:
        (child,) = t.children
        if isinstance(child, T.Name):
            return (T.VarDecl(child, span=child.span),)
        return child

    def var_list(self, t: Tree) -> tuple[T.VarDecl, ...]:
        return tuple(c for c in t.children if isinstance(c, T.VarDecl))

    def var_decl(self, t: Tree) -> T.VarDecl:
        name, relation, bound = t.children
        return T.VarDecl(name, relation, bound, span=self._span(t))

    def var_in(self, t: Tree) -> T.VarDecl:
        name, sign = t.children[0], t.children[-1]
        if sign:
            return T.VarDecl(name, ">=", T.Num(Fraction(0), span=name.span), span=self._span(t))
        return T.VarDecl(name, span=self._span(t))

    def real_set(self, t: Tree) -> bool:
        sign = t.children[-1]
        return isinstance(sign, Token) and sign.type == "SET_SIGN"

    def size_list(self, t: Tree) -> None:
        return None

    def chain(self, t: Tree) -> T.Chain:
        terms = tuple(c for c in t.children[0::2])
        relations = tuple(t.children[1::2])
        return T.Chain(terms, relations, span=self._span(t))

    def relation(self, t: Tree) -> str:
        return relation_of(str(t.children[0]))

    def item(self, t: Tree) -> tuple[T.Chain, T.ForAll | None]:
        chain, clause = t.children
        return chain, clause

    def for_range(self, t: Tree) -> T.ForAll:
        tok = t.children[-1]
        text = str(tok)
        upper = text.rsplit(",", 1)[1].strip().strip("{}").strip()
        return T.ForAll(text.strip()[0], upper, span=self._span(t))

    def for_all(self, t: Tree) -> T.ForAll:
        name, in_range = t.children[1], t.children[2]
        upper = None
        if in_range is not None:
            upper = str(in_range).rstrip("\\}]").rstrip().rstrip("\\}").split(",")[-1]
            upper = upper.replace("[", "").replace("\\in", "").strip()
        return T.ForAll(name.text, upper or None, span=self._span(t))

    # ---- expressions --------------------------------------------------------
    def add(self, t: Tree) -> T.Binary:
        return T.Binary("+", t.children[0], t.children[2], span=self._span(t))

    def sub(self, t: Tree) -> T.Binary:
        return T.Binary("-", t.children[0], t.children[2], span=self._span(t))

    def neg(self, t: Tree) -> T.Neg:
        return T.Neg(t.children[1], span=self._span(t))

    def signed(self, t: Tree) -> T.Node:
        return t.children[-1]

    def juxt(self, t: Tree) -> T.Node:
        return absorbed(t.children[0], t.children[-1], self._span(t))

    def divide(self, t: Tree) -> T.Frac:
        return T.Frac(t.children[0], t.children[-1], span=self._span(t))

    def hadamard(self, t: Tree) -> T.Binary:
        """``a \\circ b`` or ``a \\odot b``: the elementwise product."""
        return T.Binary(".*", t.children[0], t.children[-1], span=self._span(t))

    def hadamard_quotient(self, t: Tree) -> T.Binary:
        """``a \\oslash b``: the elementwise quotient."""
        return T.Binary("./", t.children[0], t.children[-1], span=self._span(t))

    def ones_macro(self, t: Tree) -> T.Constant:
        """``\\one``, ``\\ones``: the macros papers define for the all-ones vector."""
        return T.Constant(1, span=self._span(t))

    def group(self, t: Tree) -> T.Group:
        return T.Group(t.children[0], span=self._span(t))

    def big_sum(self, t: Tree) -> T.Sum:
        indices, _eq, lower, upper, body = t.children[1:]
        start = str(lower) if lower is not None else None
        return T.Sum(indices, upper, body, start, span=self._span(t))

    def big_sum_short(self, t: Tree) -> T.Sum:
        return T.Sum((t.children[1].text,), None, t.children[2], span=self._span(t))

    def upper(self, t: Tree) -> str:
        (child,) = t.children
        return child.text if isinstance(child, T.Name) else str(child).lstrip("^").strip()

    def index_list(self, t: Tree) -> tuple[str, ...]:
        return tuple(c.text for c in t.children if isinstance(c, T.Name))

    def index_pair(self, t: Tree) -> tuple[str, ...]:
        return tuple(c.text for c in t.children)

    def func(self, t: Tree) -> T.Call:
        tok, arg = t.children
        return T.Call(_function(str(tok)), arg, span=self._span(t))

    def sqrt(self, t: Tree) -> T.Call:
        return T.Call("sqrt", t.children[-1], span=self._span(t))

    def power(self, t: Tree) -> T.Power:
        base, exponent = t.children[0], t.children[-1]
        if isinstance(exponent, Token):
            exponent = _sup_atom(exponent, self._tok_span(exponent))
        return T.Power(base, exponent, span=self._span(t))

    def transpose(self, t: Tree) -> T.Transpose:
        return T.Transpose(t.children[0], span=self._span(t))

    def entry(self, t: Tree) -> T.Entry:
        target, indices = t.children
        return T.Entry(target, indices, span=self._span(t))

    def subscript(self, t: Tree) -> tuple[str, ...]:
        return tuple(c.text if isinstance(c, T.Name) else c for c in t.children if c != ",")

    def sub_number(self, t: Tree) -> str:
        return str(t.children[0])

    def sub_infinity(self, t: Tree) -> str:
        return "inf"

    def sub_comma(self, t: Tree) -> str:
        return ","

    def number(self, t: Tree) -> T.Num:
        return T.Num(Fraction(str(t.children[0])), span=self._span(t))

    def constant(self, t: Tree) -> T.Node:
        digit = Fraction(str(t.children[1]))
        if digit not in (0, 1):
            return T.Num(digit, span=self._span(t))
        return T.Constant(int(digit), span=self._span(t))

    def frac(self, t: Tree) -> T.Frac:
        return T.Frac(t.children[1], t.children[2], span=self._span(t))

    def frac_digits(self, t: Tree) -> T.Frac:
        digits = [ch for ch in str(t.children[0]) if ch.isdigit()]
        span = self._span(t)
        num, den = (T.Num(Fraction(d), span=span) for d in digits[-2:])
        return T.Frac(num, den, span=span)

    def norm(self, t: Tree) -> T.Norm:
        arg, sub = t.children[1], t.children[3]
        return T.Norm(arg, sub or "2", span=self._span(t))

    def norm_sub(self, t: Tree) -> str:
        tok = str(t.children[0])
        return "inf" if "infty" in tok else tok

    def abs(self, t: Tree) -> T.Abs:
        return T.Abs(t.children[1], span=self._span(t))

    def name(self, t: Tree) -> T.Name:
        tok = t.children[-1]
        text = str(tok)
        if tok.type == "WORD_NAME":  # \mathrm{budget}: a multi-letter name, as we print it
            return T.Name(text[text.index("{") + 1:text.rindex("}")].strip(), span=self._span(t))
        spelled = greek_name(text) if text.startswith("\\") else text
        return T.Name(spelled, span=self._span(t))


def absorbed(left: T.Node, right: T.Node, span: Span) -> T.Node:
    """``\\log a b`` is the log of ``a b``: an operator without parentheses takes the
    whole product that follows it, as ``\\sum`` does; ``\\mathbf{1}^\\top a b`` is the
    sum of the entries of ``a b`` (the product is associative)."""
    if _is_ones_row(left):
        return T.Call("sum", right, span=span)
    if isinstance(left, T.Call) and not isinstance(left.arg, T.Group):
        inner = absorbed(left.arg, right, left.arg.span.merge(right.span))
        return T.Call(left.func, inner, span=span)
    if isinstance(left, T.Binary) and left.op == "*" and _is_open(left.right):
        return T.Binary("*", left.left, absorbed(left.right, right, span), span=span)
    return T.Binary("*", left, right, span=span)


def _is_open(node: T.Node) -> bool:
    return _is_ones_row(node) or (isinstance(node, T.Call) and not isinstance(node.arg, T.Group))


def _is_ones_row(node: T.Node) -> bool:
    return isinstance(node, T.Transpose) and isinstance(node.arg, T.Constant) \
        and node.arg.digit == 1


def _split_head(children: list) -> tuple[tuple[str, tuple[T.VarDecl, ...]], list]:
    """The head and the rest, separators (SEP tokens) kept as row markers."""
    rest = [c for c in children if not (isinstance(c, tuple) and len(c) == 2
                                        and isinstance(c[0], str))]
    head = next(c for c in children if isinstance(c, tuple) and len(c) == 2
                and isinstance(c[0], str))
    first = next(i for i, c in enumerate(rest) if not isinstance(c, Token))
    return head, rest[first:]


def _items(parts: list) -> tuple[T.Chain | T.ForAll, ...]:
    """Items numbered by row: a separator with ``\\\\`` in it starts a new row."""
    row = 0
    out: list[T.Chain | T.ForAll] = []
    for part in parts:
        if isinstance(part, Token):
            row += "NEWROW" in str(part)
            continue
        pieces = part if isinstance(part, tuple) else (part,)
        for piece in pieces:
            if piece is not None:
                out.append(_with_row(piece, row))
    return tuple(out)


def _with_row(item: T.Chain | T.ForAll, row: int) -> T.Chain | T.ForAll:
    from dataclasses import replace

    return replace(item, row=row)


def _sense(tok: Token) -> str:
    return "maximize" if "max" in str(tok) else "minimize"


def _function(text: str) -> str:
    for word, func in (("diag", "diag"), ("Diag", "diag"), ("tr", "trace"), ("Tr", "trace"),
                       ("log", "log"), ("ln", "log"), ("exp", "exp"), ("sqrt", "sqrt"),
                       ("softplus", "softplus")):
        if word in text:
            return func
    raise ValueError(text)


def _sup_atom(tok: Token, span: Span) -> T.Node:
    """The one-character exponent of ``^2`` or ``^n``."""
    ch = str(tok).lstrip("^").strip()
    if ch.isdigit():
        return T.Num(Fraction(ch), span=span)
    return T.Name(ch, span=span)

"""The elementary functions of the language, each described once.

Every stage that meets an elementwise function (``Apply`` in the IR) asks this
table what it needs: the resolver for the spellings and the arity, the
curvature and sign analyses for the composition facts, the duality engine for
the sympy form (its conjugate is then derived by the Legendre transform, never
looked up), the numeric evaluator and the generated solvers for the numpy
form, the reference solve for the numeric reference's form, the printers for
the LaTeX and text forms, and the solver generator for the derivative.

The table is data: the entries name their forms (a numpy function and its
leading arguments, a reference-solver attribute, a printing template) and the
few forms that need code are small builder functions that import what they
use when called, so importing this module costs no numpy, scipy or cvxpy.

How to add a function
---------------------
1. Write one ``Function`` entry below and add it to ``TABLE``.  Name it as
   mathematics does; ``spellings`` are the names a ``.prob`` file may call it
   by (the grammar treats calls generically, so no grammar change is needed;
   the name becomes reserved for declarations).
2. State the facts honestly: ``curvature`` and ``monotone`` on the whole
   ``domain`` of the argument (they drive the composition rules), ``sign`` of
   the value, ``keep_positive`` when the relative interior of the domain asks
   the argument to be positive (log, sqrt).  ``homogeneous`` only for a
   function with f(a t) = |a| f(t) (abs).
3. Give ``sympy_form``: a builder of the scalar sympy expression.  The
   conjugate engine (``dualize/duality/conjugate.py``) derives and numerically
   checks the conjugate from it; no conjugate is written by hand.  Name the
   sympy head (``sympy_head``) only when the function is a sympy class of its
   own, so derived formulas lift back to it.
4. Give the numpy form as a numerically stable numpy function with leading
   constant arguments (``NumpyForm("logaddexp", (0,))`` is
   ``np.logaddexp(0, u)``), the numeric reference's attribute name
   (``reference``), the LaTeX and text forms (an operator name printed before
   parentheses, or a template with ``{0}``), and ``derivative`` (a builder of
   the IR derivative in terms of the argument and the node, or None where the
   function is not differentiable everywhere).
5. Document it in ``docs/language.md`` and test it: a curvature test and a
   derivation whose dual is checked numerically against the reference solver.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from enum import StrEnum
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:
    from dualize.model.expr import Expr


class ArgumentDomain(StrEnum):
    """Where the argument of a function may lie."""

    REALS = "reals"
    NONNEG = "nonneg"
    POS = "pos"


@dataclass(frozen=True)
class NumpyForm:
    """``np.<name>(*leading, u)``: a numpy function and its constant leading arguments."""

    name: str
    leading: tuple[float, ...] = ()
    template: str | None = None
    """Source text with ``{0}`` for the argument and ``{m}`` for the numpy module, for a
    form that is no single call (a piecewise function); ``python`` is then its callable."""
    python: Callable[[Any], Any] | None = None

    def code(self, arg: str, module: str = "np") -> str:
        """The call as Python source text, for the generated solvers."""
        if self.template is not None:
            return self.template.format(f"({arg})", m=module)
        parts = [repr(v) for v in self.leading] + [arg]
        return f"{module}.{self.name}({', '.join(parts)})"

    def callable(self) -> Callable[[Any], Any]:
        """The numpy function with its leading arguments bound."""
        import numpy as np

        if self.python is not None:
            return self.python

        func = getattr(np, self.name)
        if not self.leading:
            return func  # type: ignore[no-any-return]
        leading = self.leading
        return lambda u: func(*leading, u)


@dataclass(frozen=True)
class Function:
    """One elementwise function of the language and everything the stages need of it."""

    name: str
    spellings: tuple[str, ...]
    arity: int
    domain: ArgumentDomain
    keep_positive: bool
    sign: str
    curvature: str
    monotone: str
    homogeneous: bool
    sympy_form: Callable[[Any], Any]
    sympy_head: str | None
    numpy: NumpyForm
    reference: str
    latex: str
    text: str
    derivative: Callable[[Expr, Expr], Expr] | None
    inverse: str | None = None
    source: str = ""
    reference_affine: tuple[float, float] = (1.0, 1.0)
    """(a, b): the numeric reference's form is a * ref(b * u) (Huber's function there is
    twice ours; the loss of a margin is the reference's softplus of -u)."""

    def to_sympy(self, arg: Any) -> Any:
        return self.sympy_form(arg)

    def print_with(self, inner: str, form: str, paren: Callable[[str], str]) -> str:
        """``form`` (this entry's latex or text) applied to an already printed argument."""
        if "{0}" in form:
            return form.format(inner)
        return form + paren(inner)


# ---------------------------------------------------------------- sympy forms


def _sympy_exp(t: Any) -> Any:
    import sympy

    return sympy.exp(t)


def _sympy_log(t: Any) -> Any:
    import sympy

    return sympy.log(t)


def _sympy_sqrt(t: Any) -> Any:
    import sympy

    return sympy.sqrt(t)


def _sympy_abs(t: Any) -> Any:
    import sympy

    return sympy.Abs(t)


def _sympy_softplus(t: Any) -> Any:
    import sympy

    return sympy.log(1 + sympy.exp(t))


def _sympy_quadlin(t: Any) -> Any:
    import sympy

    return sympy.Piecewise((t**2 / 2, sympy.Abs(t) <= 1),
                           (sympy.Abs(t) - sympy.Rational(1, 2), True))


def _sympy_logcost(t: Any) -> Any:
    import sympy

    return sympy.log(1 + sympy.exp(-t))


def _np_quadlin(u: Any) -> Any:
    import numpy as np

    a = np.abs(u)
    return np.where(a <= 1, 0.5 * np.square(u), a - 0.5)


def _np_logcost(u: Any) -> Any:
    import numpy as np

    return np.logaddexp(0, -np.asarray(u, dtype=float))


# ---------------------------------------------------------------- derivatives


def _d_exp(arg: Expr, node: Expr) -> Expr:
    return node


def _d_log(arg: Expr, node: Expr) -> Expr:
    import sympy

    from dualize.model.expr import Power

    return Power(arg, sympy.Integer(-1))


def _d_sqrt(arg: Expr, node: Expr) -> Expr:
    import sympy

    from dualize.model.expr import Number, Power, Scale

    return Scale(Number(sympy.Rational(1, 2)), Power(arg, sympy.Rational(-1, 2)))


def _d_softplus(arg: Expr, node: Expr) -> Expr:
    """The logistic sigmoid written exp(u - softplus(u)): it never overflows."""
    import sympy

    from dualize.model.expr import Add, Apply, Number, Scale

    return Apply("exp", Add((arg, Scale(Number(sympy.Integer(-1)), node))))


def _filled(value: int, like: Expr) -> Expr:
    import sympy

    from dualize.model.expr import Broadcast, Number

    n = Number(sympy.Integer(value))
    return n if like.shape.is_scalar else Broadcast(n, like.shape)


def _d_quadlin(arg: Expr, node: Expr) -> Expr:
    """quadlin'(u) = u clipped to [-1, 1]."""
    from dualize.model.expr import Extremum

    return Extremum("min", Extremum("max", arg, _filled(-1, arg)), _filled(1, arg))


def _d_logcost(arg: Expr, node: Expr) -> Expr:
    """d/du log(1 + e^-u) = -1/(1 + e^u) = -exp(-softplus(u)), which never overflows."""
    import sympy

    from dualize.model.expr import Apply, Number, Scale

    minus = Number(sympy.Integer(-1))
    return Scale(minus, Apply("exp", Scale(minus, Apply("softplus", arg))))


# ---------------------------------------------------------------- the table

EXP = Function(
    name="exp", spellings=("exp",), arity=1, domain=ArgumentDomain.REALS,
    keep_positive=False, sign="pos", curvature="convex", monotone="inc",
    homogeneous=False, sympy_form=_sympy_exp, sympy_head="exp",
    numpy=NumpyForm("exp"), reference="exp", latex=r"\exp", text="exp",
    derivative=_d_exp, inverse="log",
)
LOG = Function(
    name="log", spellings=("log",), arity=1, domain=ArgumentDomain.POS,
    keep_positive=True, sign="unknown", curvature="concave", monotone="inc",
    homogeneous=False, sympy_form=_sympy_log, sympy_head="log",
    numpy=NumpyForm("log"), reference="log", latex=r"\log", text="log",
    derivative=_d_log, inverse="exp",
)
SQRT = Function(
    name="sqrt", spellings=("sqrt",), arity=1, domain=ArgumentDomain.NONNEG,
    keep_positive=True, sign="nonneg", curvature="concave", monotone="inc",
    homogeneous=False, sympy_form=_sympy_sqrt, sympy_head=None,
    numpy=NumpyForm("sqrt"), reference="sqrt", latex=r"\sqrt{{{0}}}", text="√",
    derivative=_d_sqrt,
)
ABS = Function(
    name="abs", spellings=(), arity=1, domain=ArgumentDomain.REALS,
    keep_positive=False, sign="nonneg", curvature="convex", monotone="by-sign",
    homogeneous=True, sympy_form=_sympy_abs, sympy_head="Abs",
    numpy=NumpyForm("abs"), reference="abs", latex=r"\lvert {0} \rvert", text="|{0}|",
    derivative=None,
)
SOFTPLUS = Function(
    name="softplus", spellings=("softplus",), arity=1, domain=ArgumentDomain.REALS,
    keep_positive=False, sign="pos", curvature="convex", monotone="inc",
    homogeneous=False, sympy_form=_sympy_softplus, sympy_head=None,
    numpy=NumpyForm("logaddexp", (0,)), reference="logistic",
    latex=r"\operatorname{softplus}", text="softplus", derivative=_d_softplus,
    # log(1 + e^u) is convex and increasing; its conjugate s log s + (1 - s) log(1 - s)
    # on [0, 1] (S. Boyd and L. Vandenberghe, Convex Optimization, 2004, section 3.3,
    # from memory) is derived by the engine, not stated here.
    source="softplus(u) = log(1 + exp(u))",
)

QUADLIN = Function(
    name="quadlin", spellings=("quadlin",), arity=1, domain=ArgumentDomain.REALS,
    keep_positive=False, sign="nonneg", curvature="convex", monotone="by-sign",
    homogeneous=False, sympy_form=_sympy_quadlin, sympy_head=None,
    numpy=NumpyForm("quadlin", template="{m}.where({m}.abs{0} <= 1, 0.5 * {0} ** 2, "
                    "{m}.abs{0} - 0.5)", python=_np_quadlin),
    reference="huber", reference_affine=(0.5, 1.0),
    latex=r"\operatorname{quadlin}", text="quadlin", derivative=_d_quadlin,
    # Huber's function with threshold 1 (P. J. Huber, Robust estimation of a location
    # parameter, 1964, from memory): quadratic near 0, linear beyond; its conjugate
    # s^2/2 on [-1, 1] is derived by the engine piece by piece, not stated here.
    source="quadlin(u) = u^2/2 for |u| <= 1, |u| - 1/2 otherwise",
)
LOGCOST = Function(
    name="logcost", spellings=("logcost",), arity=1, domain=ArgumentDomain.REALS,
    keep_positive=False, sign="pos", curvature="convex", monotone="dec",
    homogeneous=False, sympy_form=_sympy_logcost, sympy_head=None,
    numpy=NumpyForm("logcost", template="{m}.logaddexp(0, -{0})", python=_np_logcost),
    reference="logistic", reference_affine=(1.0, -1.0),
    latex=r"\operatorname{logcost}", text="logcost", derivative=_d_logcost,
    # The logistic loss of a margin u, log(1 + e^-u) (T. Hastie, R. Tibshirani and
    # J. Friedman, The Elements of Statistical Learning, 2009, section 4.4, from memory);
    # convex and decreasing; its conjugate is derived by the engine.
    source="logcost(u) = log(1 + exp(-u))",
)

TABLE: dict[str, Function] = {f.name: f for f in (EXP, LOG, SQRT, ABS, SOFTPLUS, QUADLIN,
                                                  LOGCOST)}
"""Every elementwise function, by its IR name (``Apply.func``)."""

BY_SPELLING: dict[str, Function] = {s: f for f in TABLE.values() for s in f.spellings}
"""The functions a ``.prob`` file may call by name."""


def lookup(name: str) -> Function:
    """The entry for an IR function name; a missing entry is a bug, so it raises KeyError."""
    return TABLE[name]


def by_sympy_head(head: str) -> Function | None:
    """The entry whose sympy form is the sympy class named ``head``, if any."""
    for f in TABLE.values():
        if f.sympy_head == head:
            return f
    return None

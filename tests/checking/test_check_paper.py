"""Claims that are right but were left undecided or called loose.

Sources: Boyd and Vandenberghe, Convex Optimization, 2004, section 5.2.5 (from
memory) on optimal dual values that are not attained; common practice for the
rational-function identity (a sum put over one denominator is the same function
wherever both forms are defined).
"""

from __future__ import annotations

import sympy

from dualize.checking import check_claim
from dualize.checking.rational import same_rational_form
from dualize.model import expr as ir
from dualize.model.loading import load
from tests.checking.paths import claim_path, claim_text, example

SEEDS = (0, 1, 2)

# minimize x subject to x^2 <= 0: p* = 0 at x = 0; the dual function -1/(4 pin) tends to
# 0 as pin grows and no multiplier attains it (Boyd and Vandenberghe, 2004, sec. 5.2.5,
# from memory: strong duality can hold with no optimal multiplier when Slater fails).
PIN = 'title "A point as a quadratic constraint"\nminimize x\nover x in R\nsubject to\n' \
      "  pin: x^2 <= 0\n"


def pin_problem():  # type: ignore[no-untyped-def]
    loaded = load(PIN)
    assert loaded.problem is not None
    return loaded.problem


def test_a_dual_over_one_denominator_is_proved_equal() -> None:
    # examples/window_scalar.prob has the dual 8 w - 9 w^2/(w + 1) + 1; the claim writes
    # it as (9 w + 1 - w^2)/(w + 1), the same rational function.
    name = "window_common_denominator"
    report = check_claim(example("window_scalar"), claim_text(name), seeds=SEEDS,
                         claim_path=claim_path(name))
    assert report.verdict == "equivalent" and report.method == "symbolic", report.messages


def test_rational_forms_cancel_chain_by_chain_with_symbolic_sizes() -> None:
    n = sympy.Symbol("n", positive=True, integer=True)
    lam = ir.Symbol("lam", "multiplier", ir.SCALAR)
    x = ir.Symbol("x", "multiplier", ir.Shape(n, 1))
    P = ir.Symbol("P", "data", ir.Shape(n, n))
    form = ir.MatMul((ir.Transpose(x), P, x))
    one = ir.Number(sympy.Integer(1))
    share = ir.Divide(one, ir.Add((lam, one)))
    left = ir.Add((ir.Scale(share, form), ir.Scale(ir.Scale(lam, share), form)))
    assert same_rational_form(left, form)  # (1 + lam)/(1 + lam) x'Px = x'Px
    assert not same_rational_form(left, ir.Scale(ir.Number(sympy.Integer(2)), form))
    assert not same_rational_form(ir.Scale(share, form), form)


def test_a_supremum_approached_along_a_ray_is_tight_not_attained() -> None:
    # -1/pin is not the derived dual -1/(4 pin), but its supremum over pin >= 0 is 0 = p*
    # too, approached as pin grows: the verdict names the ray instead of "not tight".
    claim = "maximize -1/pin\nover pin in R_+\n"
    report = check_claim(pin_problem(), claim, seeds=SEEDS)
    assert report.verdict == "tight, not attained", report.messages
    assert report.ok
    assert "ray: pin = " in report.messages[0]


def test_a_loose_bound_is_still_called_loose() -> None:
    # -1/pin - 1 rises only to -1 < 0 = p*: a valid bound that is not tight.
    report = check_claim(pin_problem(), "maximize -1/pin - 1\nover pin in R_+\n", seeds=SEEDS)
    assert report.verdict == "valid bound, not tight", report.messages
    assert not report.ok

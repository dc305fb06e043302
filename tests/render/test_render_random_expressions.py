"""Random well-shaped IR expressions: every one prints, and its LaTeX compiles.

The references are pdflatex (common practice: what it compiles without errors is
valid LaTeX) and the invariant that printed parentheses balance.  The trees are
drawn from a seeded generator, so the test is the same on every run.
"""

from __future__ import annotations

import random
import shutil
import subprocess
from pathlib import Path

import pytest
import sympy

from dualize.model import expr as ir
from dualize.render.latex_printer import latex_expr
from dualize.render.text_printer import text_expr

n = sympy.Symbol("n", positive=True, integer=True)
SCALAR, VECTOR, MATRIX = ir.SCALAR, ir.Shape(n, sympy.Integer(1)), ir.Shape(n, n)
NAMES = {SCALAR: ("t", "lambda1", "gamma", "C"), VECTOR: ("x", "nu", "alpha_i", "demand"),
         MATRIX: ("A", "P", "Sigma", "Z")}


def leaf(rng: random.Random, shape: ir.Shape) -> ir.Expr:
    if shape == SCALAR and rng.random() < 0.4:
        return ir.Number(sympy.Rational(rng.randint(-5, 5), rng.choice((1, 1, 2, 3))))
    if shape == VECTOR and rng.random() < 0.2:
        return ir.Ones(n)
    if shape == MATRIX and rng.random() < 0.2:
        return ir.Identity(n)
    role = rng.choice(("data", "variable", "multiplier"))
    return ir.Symbol(rng.choice(NAMES[shape]), role, shape)


def scalar(rng: random.Random, depth: int) -> ir.Expr:
    choices = [
        lambda: ir.Norm(tree(rng, VECTOR, depth), rng.choice(("1", "2", "inf"))),
        lambda: ir.SumAll(tree(rng, VECTOR, depth)),
        lambda: ir.MatMul((ir.Transpose(tree(rng, VECTOR, depth)), tree(rng, VECTOR, depth))),
        lambda: ir.Trace(tree(rng, MATRIX, depth)),
        lambda: ir.Apply(rng.choice(("exp", "log", "sqrt", "abs")), tree(rng, SCALAR, depth)),
        lambda: ir.Power(tree(rng, SCALAR, depth), sympy.Rational(rng.choice((2, -1, 3)),
                                                                   rng.choice((1, 2)))),
        lambda: ir.Divide(tree(rng, SCALAR, depth), tree(rng, SCALAR, depth)),
    ]
    return rng.choice(choices)()


def vector(rng: random.Random, depth: int) -> ir.Expr:
    choices = [
        lambda: ir.MatMul((tree(rng, MATRIX, depth), tree(rng, VECTOR, depth))),
        lambda: ir.Hadamard(tree(rng, VECTOR, depth), tree(rng, VECTOR, depth)),
        lambda: ir.Broadcast(tree(rng, SCALAR, depth), VECTOR),
        lambda: ir.Apply(rng.choice(("exp", "log", "abs")), tree(rng, VECTOR, depth)),
        lambda: ir.Divide(tree(rng, VECTOR, depth), tree(rng, rng.choice((SCALAR, VECTOR)),
                                                          depth)),
        lambda: ir.Extremum(rng.choice(("max", "min")), tree(rng, VECTOR, depth),
                            ir.Zero(VECTOR)),
    ]
    return rng.choice(choices)()


def matrix(rng: random.Random, depth: int) -> ir.Expr:
    choices = [
        lambda: ir.Diag(tree(rng, VECTOR, depth)),
        lambda: ir.Inverse(tree(rng, MATRIX, depth)),
        lambda: ir.PseudoInverse(tree(rng, MATRIX, depth)),
        lambda: ir.Transpose(tree(rng, MATRIX, depth)),
        lambda: ir.MatMul((tree(rng, MATRIX, depth), tree(rng, MATRIX, depth))),
    ]
    return rng.choice(choices)()


def tree(rng: random.Random, shape: ir.Shape, depth: int) -> ir.Expr:
    """A random expression of ``shape``, at most ``depth`` levels deep."""
    if depth == 0 or rng.random() < 0.25:
        return leaf(rng, shape)
    roll = rng.random()
    if roll < 0.2:
        return ir.Add(tuple(tree(rng, shape, depth - 1) for _ in range(rng.randint(2, 3))))
    if roll < 0.35:
        return ir.Scale(tree(rng, SCALAR, depth - 1), tree(rng, shape, depth - 1))
    maker = {SCALAR: scalar, VECTOR: vector, MATRIX: matrix}[shape]
    return maker(rng, depth - 1)


def expressions(count: int = 120) -> list[ir.Expr]:
    rng = random.Random(20240501)
    out = [tree(rng, rng.choice((SCALAR, VECTOR, MATRIX)), 4) for _ in range(count)]
    out.append(ir.Block(((tree(rng, MATRIX, 2), tree(rng, VECTOR, 2)),
                         (ir.Transpose(tree(rng, VECTOR, 2)), tree(rng, SCALAR, 2)))))
    return out


def test_every_expression_prints_with_balanced_parentheses() -> None:
    for node in expressions():
        text, latex = text_expr(node), latex_expr(node)
        assert text.count("(") == text.count(")"), text
        assert latex.count("{") == latex.count("}"), latex
        assert "+ -" not in text and "+ -" not in latex, text


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex missing")
def test_every_expression_compiles(tmp_path: Path) -> None:
    body = "\n".join(f"\\[ {latex_expr(node)} \\]" for node in expressions())
    source = ("\\documentclass{article}\n\\usepackage{amsmath,amssymb}\n\\begin{document}\n"
              f"{body}\n\\end{{document}}\n")
    (tmp_path / "doc.tex").write_text(source, encoding="utf-8")
    subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "doc.tex"],
                   cwd=tmp_path, capture_output=True, timeout=120, check=False)
    log = (tmp_path / "doc.log").read_text(encoding="latin-1")
    assert (tmp_path / "doc.pdf").exists(), log[-2000:]
    assert "\n! " not in log, log[-2000:]

"""Finding 1, names that Python treats as one: normalization when read, mangled
identifiers and escaped literals in the generated solver module."""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
from scipy.optimize import linprog

from dualize.model import load
from dualize.solvergen.pynames import comment_text, literal, python_names
from tests.reliability.helpers import dualize, env

ASTRAL = "\U00020000"  # a CJK letter outside the Basic Multilingual Plane, unchanged by NFKC


def test_finding1_fullwidth_twin_is_a_located_duplicate():
    # `b` and fullwidth `ｂ` are one identifier to Python (NFKC; Python language
    # reference, 2.3 Identifiers and keywords): one name here too, so declaring both
    # is a located "declared twice", never two names that a module would merge.
    loaded = load("data b in R^m\ndata ｂ in R^m\nminimize sum(x)\nover x in R^m_+\n"
                  "subject to\n  c: x >= b\n", "twins.prob")
    assert loaded.problem is None
    [diag] = [d for d in loaded.diagnostics if d.severity == "error"]
    assert diag.rule == "declared-twice"
    assert (diag.span.line, diag.span.column) == (2, 6)
    assert "NFKC" in (diag.hint or "")


def test_finding1_spellings_of_one_name_resolve_to_it():
    loaded = load("data ｂ in R^m\nminimize sum(x)\nover x in R^m_+\nsubject to\n"
                  "  c: x >= b\n", "one.prob")
    assert loaded.problem is not None
    assert [d.name for d in loaded.problem.data] == ["b"]


def test_finding1_mangled_names_never_collide_or_shadow():
    names = ["np", "int", "float", "lambda", "x", "θ", "θ_1", ASTRAL, "u_x"]
    table = python_names(names)
    assert len(set(table.values())) == len(names)
    for ident in table.values():
        assert ident.isascii() and ident.isidentifier()
        assert ident not in dir(__builtins__) and ident not in {"np", "scipy", "json", "sys"}


def test_finding1_literals_survive_every_code_point():
    for text in ["a\x00b", "\ud800", ASTRAL, "\U0001d44f", "quote\"'\\", "\u2028"]:
        code = literal(text)
        assert code.isascii()
        assert eval(compile(code, "<literal>", "eval")) == text  # noqa: S307 - our own literal
    assert "\x00" not in comment_text("a\x00b") and "\ud800" not in comment_text("\ud800")


PROBLEM = ('title "odd\x00title"\ndata int in R^float\ndata ' + ASTRAL + ' in R^float_+\n'
           "minimize " + ASTRAL + "' * np\nover np in R^float_+\nsubject to\n"
           "  ｆloat_c: np >= int\n")


def test_finding1_hostile_names_give_the_right_optimum(tmp_path):
    # A size named `float`, data named `int`, a variable named `np`, an astral-plane
    # data name and a NUL in the title: the module compiles, reads the instance by the
    # user's own keys and finds the optimum scipy's HiGHS finds for the same LP.
    prob = tmp_path / "names.prob"
    prob.write_text(PROBLEM, encoding="utf-8")
    module = tmp_path / "solve.py"
    made = dualize("solver", str(prob), "-o", str(module))
    assert made.returncode == 0, made.stderr
    b, c = [1.0, -2.0, 3.0], [1.0, 2.0, 0.5]
    instance = tmp_path / "i.json"
    instance.write_text(json.dumps({"int": b, ASTRAL: c}, ensure_ascii=False),
                        encoding="utf-8")
    run = subprocess.run([sys.executable, str(module), str(instance)], capture_output=True,
                         text=True, env=env(), check=False, timeout=120)
    assert run.returncode == 0, run.stderr
    report = json.loads(run.stdout)
    reference = linprog(c, A_ub=-np.eye(3), b_ub=[-v for v in b], bounds=[(0, None)] * 3)
    assert abs(report["primal_value"] - reference.fun) < 1e-7
    assert abs(report["dual_value"] - reference.fun) < 1e-7

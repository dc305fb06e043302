"""The analysis stays cheap for the linter: no scipy, numpy or cvxpy without an instance,
and robust: no exception on any problem that loads."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

ROOT = Path(__file__).resolve().parents[2]
PROBLEM = ("data r in R_++\ndata A in R^(m,n)\ndata b in R^m\n"
           "minimize ||A*x - b||^2 + exp(-t)\nover x in R^n, t in R\n"
           "subject to\n  ball: ||x|| <= r\n  c: t^2 <= 1\n")


def test_no_numeric_imports_without_an_instance() -> None:
    code = ("import sys\nfrom dualize.model import load\nfrom dualize.analysis import analyze\n"
            f"analyze(load({PROBLEM!r}).problem)\n"
            "print(sorted(m for m in ('scipy', 'numpy', 'cvxpy') if m in sys.modules))\n")
    out = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True,
                         text=True, check=True, env={"PYTHONPATH": str(ROOT)})
    assert out.stdout.strip() == "[]"


PIECES = ["x", "y", "2", "1/2", "r", "exp(x)", "log(y)", "sqrt(x)", "||x||", "x^2", "x^3",
          "max(x, y)", "min(x, 0)", "|x - y|", "x * y", "x / y", "y^(-1)", "-x"]


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.sampled_from(PIECES), min_size=1, max_size=4),
       st.lists(st.tuples(st.sampled_from(PIECES), st.sampled_from(["<=", ">=", "=="]),
                          st.sampled_from(PIECES)), max_size=3),
       st.sampled_from(["x in R, y in R_++", "x in R_+, y in R", "x in [0, 1], y in R"]))
def test_any_scalar_problem_is_analysed(terms: list[str], cons: list[tuple[str, str, str]],
                                        over: str) -> None:
    from dualize.analysis import analyze
    from dualize.model import load

    lines = [f"  {a} {rel} {b}" for a, rel, b in cons]
    text = (f"data r in R_++\nminimize {' + '.join(terms)}\nover {over}\n"
            + ("subject to\n" + "\n".join(lines) + "\n" if lines else ""))
    loaded = load(text)
    if loaded.problem is None:
        return
    a = analyze(loaded.problem)
    assert a.strong_duality_status in ("guaranteed", "not-guaranteed", "unknown")
    if a.strong_duality_status == "guaranteed" and loaded.problem.constraints:
        assert a.convex is True
    if a.witness:
        _check_witness(loaded.problem, a)


def _check_witness(problem: object, a: object) -> None:
    """A shown Slater point is strictly feasible for every positive r it was proved for."""
    from dualize.numeric.evaluate import evaluate

    classes = dict(a.constraint_classes)  # type: ignore[attr-defined]
    for r in (0.01, 1.0, 100.0):
        values = {"r": r, **a.witness}  # type: ignore[attr-defined]
        for c in problem.constraints:  # type: ignore[attr-defined]
            value = float(evaluate(c.function, values, {}))
            if c.kind == "eq":
                assert abs(value) < 1e-12
            elif classes[c.label] == "convex-inequality":
                assert value < 0
            else:
                assert value <= 1e-12

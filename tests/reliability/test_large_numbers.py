"""Finding 5, large exact numbers: refused with a located diagnostic when the problem is
read, and no printing path stops on Python's 4,300-digit limit (common practice: the
limit is CPython's int_max_str_digits, Python 3.11 documentation, "Integer string
conversion length limitation")."""

from __future__ import annotations

import pytest

from dualize.model import load
from tests.reliability.helpers import dualize

ONE_E400 = "*".join(["1e400"] * 12)


@pytest.mark.parametrize("objective, column", [
    ("10^5000 * sum(x)", 10),
    ("2^100000 * sum(x)", 10),
    ("2^2^2^2^2 * sum(x)", 10),
    (f"{ONE_E400} * sum(x)", 10),
    ("sum((1e400 * x).^3)", 14),
])
def test_finding5_huge_numbers_are_located_errors(objective, column):
    text = f"minimize {objective}\nover x in R^n_+\nsubject to\n  c: x >= 1\n"
    loaded = load(text, "big.prob")
    errors = [d for d in loaded.diagnostics if d.severity == "error"]
    assert loaded.problem is None and [d.rule for d in errors] == ["number-too-large"]
    assert (errors[0].span.line, errors[0].span.column) == (1, column)


def test_finding5_derive_refuses_in_one_line(tmp_path):
    prob = tmp_path / "big.prob"
    prob.write_text("minimize 10^5000 * sum(x)\nover x in R^n_+\nsubject to\n  c: x >= 1\n",
                    encoding="utf-8")
    run = dualize("derive", str(prob))
    assert run.returncode == 2 and "number-too-large" in run.stderr
    assert "internal error" not in run.stderr and "Traceback" not in run.stderr


def test_finding5_largest_allowed_numbers_print(tmp_path):
    # 10^999 is allowed (1,000 digits); its square in the dual has 1,999 digits and a
    # product of a few such numbers may pass 4,300: every output format prints them.
    prob = tmp_path / "wide.prob"
    prob.write_text("minimize 10^999 * sum(x.^2) + 7^1000 * sum(x)\nover x in R^n\n"
                    "subject to\n  c: 10^999 * x >= 3^2000\n", encoding="utf-8")
    for fmt in ("text", "latex", "markdown", "json"):
        run = dualize("derive", str(prob), "--format", fmt)
        assert run.returncode == 0, (fmt, run.stderr)
        assert "internal error" not in run.stderr

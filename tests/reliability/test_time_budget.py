"""Finding 4, no bound on a run: one deadline per run (--time-limit), steps that say
they were cut, and text output that grows linearly with the number of constraints."""

from __future__ import annotations

import json
import time

import pytest

from dualize.deadline import Deadline, DeadlineExceeded
from tests.reliability.helpers import ROOT, dualize

POWERS = """data b in R^n
minimize sum(x.^1000001) + sum(y.^999999) + sum(z.^1234567) + sum(w.^7654321)
over x in R^n_+, y in R^n_+, z in R^n_+, w in R^n_+
subject to
  c: x + y + z + w >= b
"""


def many_constraints(count: int) -> str:
    """``count`` one-line constraints x >= k a of a few forms (a synthetic stress case)."""
    lines = ['title "Many one-line constraints"', "data a in R^n", "minimize sum(x)",
             "over x in R^n_+", "subject to"]
    lines += [f"  c{i}: x >= {1 + (7 * i) % 9} * a" for i in range(count)]
    return "\n".join(lines) + "\n"


def test_deadline_names_the_step_and_never_runs_backwards():
    ticks = iter([0.0, 1.0, 5.0, 11.0])
    deadline = Deadline(10, clock=lambda: next(ticks))
    deadline.check("reading")  # t = 1
    assert deadline.remaining() == 5.0  # t = 5
    with pytest.raises(DeadlineExceeded, match="while minimizing over x"):
        deadline.check("minimizing over x")  # t = 11
    assert Deadline.unlimited().remaining() == float("inf")
    with pytest.raises(ValueError):
        Deadline(0)


def test_finding4_huge_separable_powers_end_within_the_limit(tmp_path):
    prob = tmp_path / "powers.prob"
    prob.write_text(POWERS, encoding="utf-8")
    start = time.monotonic()
    run = dualize("derive", str(prob), "--time-limit", "20")
    elapsed = time.monotonic() - start
    assert run.returncode == 0, run.stderr
    assert elapsed < 20 + 10, elapsed  # start-up and rendering on a shared machine
    assert "infimum over x" in run.stdout or "conjugate" in run.stdout


def test_finding4_a_cut_step_is_named_and_its_result_kept(tmp_path):
    # A limit too short for the entropy conjugate: the output says which step was cut
    # and keeps the infimum unevaluated; it is not an error (exit 0, no traceback).
    run = dualize("derive", str(ROOT / "examples" / "route_entropy.prob"), "--time-limit",
                  "0.001", "--format", "json")
    assert run.returncode == 0, run.stderr
    notes = " ".join(json.loads(run.stdout)["notes"])
    assert "time limit of 0.001 s was reached while" in notes
    assert "kept unevaluated" in notes or "without simplification" in notes


def test_finding4_text_output_grows_linearly(tmp_path):
    # The text output was quadratic (5,000 constraints gave 366 MB); summarized, its size
    # stays nearly flat while the JSON keeps every constraint.
    sizes = {}
    for count in (200, 1600):
        prob = tmp_path / f"many{count}.prob"
        prob.write_text(many_constraints(count), encoding="utf-8")
        text = dualize("derive", str(prob))
        assert text.returncode == 0, text.stderr
        sizes[count] = len(text.stdout.encode("utf-8"))
        if count == 1600:
            data = json.loads(dualize("derive", str(prob), "--format", "json").stdout)
            assert len(data["primal"]["constraints"]) == count
    assert sizes[1600] < 2 * sizes[200] + 2_000 and sizes[1600] < 50_000, sizes

"""``analyze``: convexity, constraint classes, strong duality and the lint rules, in one pass."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from dualize.analysis.convexity import analyse_convexity
from dualize.analysis.measured import Evaluate, Measured
from dualize.analysis.report import Analysis
from dualize.analysis.slater import strong_duality
from dualize.deadline import Deadline
from dualize.model.problem import Problem


def analyze(problem: Problem, instance: Mapping[str, Any] | Any | None = None,
            evaluate: Evaluate | None = None, deadline: Deadline | None = None) -> Analysis:
    """Analyse ``problem``; with ``instance`` (name -> numpy array, or an ``Instance``)
    decide Slater numerically, computing expressions with ``evaluate`` (the numeric
    stage's evaluator, passed in because the analysis sits below that stage;
    ``dualize.api.analyze`` passes it).

    Without an instance only scalar symbolic work is done, so linting stays cheap.
    Past ``deadline`` the symbolic Slater search stops between candidates.
    """
    from dualize.analysis.checks import diagnostics_for

    if instance is not None and evaluate is None:
        raise TypeError("analyze: an instance needs the evaluator that computes on it")
    measured = None if instance is None else Measured(instance, evaluate)  # type: ignore[arg-type]
    conv = analyse_convexity(problem)
    verdict = strong_duality(problem, conv, measured, deadline)
    classes = tuple((p.label, p.kind) for p in conv.constraints) + tuple(
        (name, "integrality") for name in conv.integral)
    return Analysis(conv.convex, conv.reasons, classes, verdict.status, verdict.reason,
                    verdict.witness, diagnostics_for(problem, conv, verdict, measured))

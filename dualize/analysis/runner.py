"""``analyze``: convexity, constraint classes, strong duality and the lint rules, in one pass."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from dualize.analysis.convexity import analyse_convexity
from dualize.analysis.report import Analysis
from dualize.analysis.slater import strong_duality
from dualize.model.problem import Problem


def analyze(problem: Problem, instance: Mapping[str, Any] | None = None) -> Analysis:
    """Analyse ``problem``; with ``instance`` (name -> numpy array) decide Slater numerically.

    Without an instance only scalar symbolic work is done, so linting stays cheap.
    """
    from dualize.analysis.checks import diagnostics_for

    conv = analyse_convexity(problem)
    verdict = strong_duality(problem, conv, instance)
    classes = tuple((p.label, p.kind) for p in conv.constraints) + tuple(
        (name, "integrality") for name in conv.integral)
    return Analysis(conv.convex, conv.reasons, classes, verdict.status, verdict.reason,
                    verdict.witness, diagnostics_for(problem, conv, verdict, instance))

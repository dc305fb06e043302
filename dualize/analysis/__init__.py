"""Curvature, constraint classes, the strong-duality verdict and the lint rules."""

from dualize.analysis.public import curvature, sign
from dualize.analysis.report import Analysis, Verdict
from dualize.analysis.runner import analyze

__all__ = ["Analysis", "Verdict", "analyze", "curvature", "sign"]

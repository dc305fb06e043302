"""Source positions, kept on every syntax node and carried into the IR.

The class lives in the base module ``dualize.span`` so that ``dualize.diagnostics``
(below every stage) can carry one without importing the syntax stage; the syntax
stage and those above it name it from here or from there alike.
"""

from dualize.span import Span

__all__ = ["Span"]

"""The derivation engine: Lagrangian, inner minimization, simplification, KKT."""

from dualize.duality.engine import derive

__all__ = ["derive"]

"""The verdict words of ``verify`` that the command line needs without numpy."""

CONSISTENT = "infinite-agree"
"""Every instance is a pair of infinite optima that weak duality predicts: primal
infeasible with dual unbounded, or primal unbounded with dual infeasible."""

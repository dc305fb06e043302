"""What a hover says about a function of the language: definition, domain, curvature.

The elementwise functions are described by the model's function table when it
is present (``dualize.model.functions``); the structural ones (sums, traces,
diagonal and identity matrices) are described here, in the words of
docs/language.md, since they are linear maps or constructors rather than
curved functions of one argument.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class FunctionFacts:
    name: str
    definition: str
    domain: str
    curvature: str


STRUCTURAL: dict[str, FunctionFacts] = {f.name: f for f in (
    FunctionFacts("sum", "sum(e): the sum of all entries of e (a scalar)", "any shape",
                  "affine (linear) in e"),
    FunctionFacts("max", "max(a, b): the larger of a and b, entry by entry (a scalar "
                  "broadcast)", "two arguments of one shape, or a scalar and anything",
                  "convex, nondecreasing in each argument"),
    FunctionFacts("min", "min(a, b): the smaller of a and b, entry by entry (a scalar "
                  "broadcast)", "two arguments of one shape, or a scalar and anything",
                  "concave, nondecreasing in each argument"),
    FunctionFacts("diag", "diag(v): the diagonal matrix with the entries of v", "a vector",
                  "affine (linear) in v"),
    FunctionFacts("trace", "trace(M): the sum of the diagonal entries of M", "a square matrix",
                  "affine (linear) in M"),
    FunctionFacts("inv", "inv(M): the inverse of M", "square data (or scalar data); never "
                  "an expression in a variable", "not applied to variables"),
    FunctionFacts("ones", "ones(n): the all-ones vector of length n",
                  "a positive integer or a dimension symbol", "constant"),
    FunctionFacts("identity", "identity(n): the n-by-n identity matrix",
                  "a positive integer or a dimension symbol", "constant"),
)}
ELEMENTWISE: dict[str, FunctionFacts] = {f.name: f for f in (
    FunctionFacts("exp", "exp(e): e raised to the power of each entry (elementwise)",
                  "every real number", "convex, increasing; positive"),
    FunctionFacts("log", "log(e): the natural logarithm of each entry (elementwise)",
                  "positive numbers (the problem's domain keeps e > 0)",
                  "concave, increasing"),
    FunctionFacts("sqrt", "sqrt(e): the nonnegative square root of each entry "
                  "(elementwise)", "nonnegative numbers (the problem's domain keeps e >= 0)",
                  "concave, increasing; nonnegative"),
)}


def function_facts(name: str) -> FunctionFacts | None:
    """The facts about the function spelled ``name``, or None for an unknown name."""
    return STRUCTURAL.get(name) or ELEMENTWISE.get(name)


def function_names() -> tuple[str, ...]:
    """Every function a problem file may call, sorted."""
    from dualize.model.scope import FUNCTIONS

    return tuple(sorted(set(FUNCTIONS) | set(STRUCTURAL)))

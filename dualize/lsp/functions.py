"""What a hover says about a function of the language: definition, domain, curvature.

The elementwise functions are described by the model's function table
(``dualize.model.functions``: domain, curvature, monotonicity, sign); the
structural ones (sums, traces,
diagonal and identity matrices) are described here, in the words of
docs/language.md, since they are linear maps or constructors rather than
curved functions of one argument.
"""

from __future__ import annotations

from dataclasses import dataclass

from dualize.model.functions import Function


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
DOMAIN_WORDS = {"reals": "every real number",
                "nonneg": "nonnegative numbers (the problem's domain keeps the argument >= 0)",
                "pos": "positive numbers (the problem's domain keeps the argument > 0)"}
MONOTONE_WORDS = {"inc": "increasing", "dec": "decreasing",
                  "by-sign": "decreasing for negative and increasing for positive arguments"}
SIGN_WORDS = {"pos": "positive", "nonneg": "nonnegative", "neg": "negative",
              "nonpos": "nonpositive"}


def _elementwise(entry: Function, spelling: str) -> FunctionFacts:
    """Facts from the model's function table, in words."""
    definition = f"{spelling}(e): applied to each entry of e"
    if entry.source:
        definition += f"; {entry.source}"
    curvature = f"{entry.curvature}, {MONOTONE_WORDS.get(entry.monotone, entry.monotone)}"
    if entry.sign in SIGN_WORDS:
        curvature += f"; {SIGN_WORDS[entry.sign]}"
    return FunctionFacts(spelling, definition, DOMAIN_WORDS.get(str(entry.domain),
                                                                 str(entry.domain)), curvature)


def function_facts(name: str) -> FunctionFacts | None:
    """The facts about the function spelled ``name``, or None for an unknown name."""
    from dualize.model.functions import BY_SPELLING

    entry = BY_SPELLING.get(name)
    return _elementwise(entry, name) if entry is not None else STRUCTURAL.get(name)


def function_names() -> tuple[str, ...]:
    """Every function a problem file may call, sorted."""
    from dualize.model.functions import BY_SPELLING
    from dualize.model.scope import FUNCTIONS

    return tuple(sorted(set(FUNCTIONS) | set(BY_SPELLING)))

"""Function names a reader brings from other notations, and how this language writes them.

A file that calls a quadratic-form or a largest-eigenvalue function by a name
it knows from elsewhere gets the rewrite in this language (rule
``other-notation``), not just the list of functions.  The table only maps a
name to our own spelling; none of these names is accepted.
"""

from __future__ import annotations

REWRITES: dict[str, str] = {
    "quad_form": "a quadratic form is written x' * P * x",
    "quadform": "a quadratic form is written x' * P * x",
    "matrix_frac": "write x' * inv(P) * x for data P",
    "sum_squares": "write ||e||^2 (the squared Euclidean norm) or sum(e^2)",
    "sumsquares": "write ||e||^2 (the squared Euclidean norm) or sum(e^2)",
    "lambda_max": "bound the largest eigenvalue with a semidefinite constraint: minimize t "
                  "subject to A preceq t * identity(n)",
    "max_eig": "bound the largest eigenvalue with a semidefinite constraint: minimize t "
               "subject to A preceq t * identity(n)",
    "eigmax": "bound the largest eigenvalue with a semidefinite constraint: minimize t "
              "subject to A preceq t * identity(n)",
    "lambda_min": "bound the smallest eigenvalue with a semidefinite constraint: maximize t "
                  "subject to A succeq t * identity(n)",
    "min_eig": "bound the smallest eigenvalue with a semidefinite constraint: maximize t "
               "subject to A succeq t * identity(n)",
    "log_sum_exp": "write log(sum(exp(e)))",
    "logsumexp": "write log(sum(exp(e)))",
    "entr": "the entropy is written -e .* log(e) (elementwise; sum(...) for a scalar)",
    "entropy": "the entropy is written -e .* log(e) (elementwise; sum(...) for a scalar)",
    "kl_div": "the relative entropy is written relent(u, v), or u .* log(u ./ v)",
    "rel_entr": "the relative entropy is written relent(u, v), or u .* log(u ./ v)",
    "huber": "Huber's function is written quadlin(e) (threshold 1); with threshold M, "
             "M^2 * quadlin(e / M)",
    "logistic": "log(1 + exp(e)) is written softplus(e); the loss of a margin u is "
                "logcost(u)",
    "pos": "the positive part is written max(e, 0)",
    "neg": "the negative part is written max(-e, 0)",
    "inv_pos": "write e^-1 (elementwise, for e > 0)",
    "maximum": "the elementwise maximum is written max(a, b)",
    "minimum": "the elementwise minimum is written min(a, b)",
    "dot": "an inner product is written a' * b",
    "inner": "an inner product is written a' * b",
    "vdot": "an inner product is written a' * b",
    "pow": "a power is written e^p (elementwise)",
    "power": "a power is written e^p (elementwise)",
    "norm1": "write ||e||_1",
    "norm2": "write ||e|| or ||e||_2",
    "norm_inf": "write ||e||_inf",
    "mean": "write sum(e) / n",
    "multiply": "the elementwise product is written a .* b",
    "matmul": "the matrix product is written A * B",
    "eye": "the identity matrix is written identity(n)",
}
"""Names from other notations -> the rewrite in this language (sorted lookups only)."""


def rewrite_for(name: str) -> str | None:
    """The rewrite for a function name from another notation, or None."""
    return REWRITES.get(name.lower())

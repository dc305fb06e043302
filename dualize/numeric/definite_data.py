"""Is a data matrix positive (semi)definite?  Decided right for badly scaled matrices.

An eigenvalue test with a tolerance relative to the largest entry rejects
``diag(1, 1e-10)``, which is positive definite.  Instead:

- up to :data:`EXACT_SIZE` rows, a "yes" is exact: symmetric Gaussian
  elimination (LDL') over the rationals with diagonal pivoting, on the
  matrix's exact entries; a positive pivot at every step proves it definite, a
  nonnegative one with zero rests semidefinite (G. H. Golub and C. F. Van Loan,
  Matrix Computations, 4th ed., 2013, section 4.2, from memory); an exactly
  singular semidefinite matrix is not definite.  A negative pivot may be
  rounding of a singular semidefinite matrix computed in floating point, so
  that "no" is said only when the scaled test below also finds the smallest
  eigenvalue below minus its margin; else "undecided".
- above, a scaled test: with D = diag(a_ii)^(-1/2) the matrix S = D A D has a
  unit diagonal and the same inertia (Sylvester's law of inertia), so its
  smallest eigenvalue is compared with a stated margin, ``MARGIN * n``, well
  above the error of a symmetric eigensolver (about n * 1e-16 * ||S||, with
  ||S|| <= n).  Below minus the margin the answer is "no", above it "yes",
  and in between "undecided": the caller never states a wrong "holds".
"""

from __future__ import annotations

from fractions import Fraction
from typing import Literal

import numpy as np

EXACT_SIZE = 40
MARGIN = 1e-9
Answer = Literal["yes", "no", "undecided"]


def decide(matrix: np.ndarray, strict: bool, exact: np.ndarray | None = None) -> Answer:
    """Whether the symmetric part of ``matrix`` is positive definite (``strict``) or
    semidefinite; ``exact`` holds its entries as Fractions when they are known."""
    n = matrix.shape[0]
    if n == 0:
        return "yes"
    if n <= EXACT_SIZE:
        found = _exact(_symmetric(matrix, exact), strict)
        if found in ("yes", "singular"):  # exactly singular: semidefinite, never definite
            return "no" if found == "singular" else "yes"
    scaled = _scaled(np.asarray(matrix, dtype=float), strict)
    if n <= EXACT_SIZE and scaled == "yes":
        return "undecided"  # definite to the margin, not exactly: rounding decides
    return scaled


def _symmetric(matrix: np.ndarray, exact: np.ndarray | None) -> list[list[Fraction]]:
    n = matrix.shape[0]
    source = exact.reshape(n, n) if exact is not None and exact.size == n * n else matrix
    entries = [[Fraction(source[i][j]) for j in range(n)] for i in range(n)]
    return [[(entries[i][j] + entries[j][i]) / 2 for j in range(n)] for i in range(n)]


def _exact(a: list[list[Fraction]], strict: bool) -> str:
    """LDL' with diagonal pivoting over the rationals (see the module doc): "yes",
    "singular" (exactly semidefinite and singular, asked for definite) or "no"."""
    rest = list(range(len(a)))
    while rest:
        pivot = max(rest, key=lambda i: a[i][i])
        if a[pivot][pivot] < 0:
            return "no"
        if a[pivot][pivot] == 0:
            if any(a[i][j] != 0 for i in rest for j in rest):
                return "no"
            return "singular" if strict else "yes"
        rest.remove(pivot)
        lead = a[pivot][pivot]
        for i in rest:
            factor = a[i][pivot] / lead
            if factor:
                row, prow = a[i], a[pivot]
                for j in rest:
                    row[j] -= factor * prow[j]
    return "yes"


def _scaled(matrix: np.ndarray, strict: bool) -> Answer:
    """Unit-diagonal scaling, then the smallest eigenvalue against the stated margin."""
    sym = (matrix + matrix.T) / 2
    diagonal = np.diag(sym)
    if np.any(diagonal < 0) or (strict and np.any(diagonal == 0)):
        return "no"
    keep = diagonal > 0
    if np.any(sym[~keep][:, keep]) or np.any(sym[~keep][:, ~keep]):
        return "no"  # a zero diagonal entry with a nonzero entry in its row
    inv = 1.0 / np.sqrt(diagonal[keep])
    scaled = sym[np.ix_(keep, keep)] * inv[:, None] * inv[None, :]
    low = float(np.linalg.eigvalsh(scaled)[0]) if scaled.size else 1.0
    margin = MARGIN * len(diagonal)
    if low > margin:
        return "yes"
    if low < -margin:
        return "no"
    return "undecided"

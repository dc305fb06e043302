"""When a duality gap counts as zero.

A gap counts as zero when ``|p - d| <= ABS_TOL + REL_TOL * max(1, |p|, |d|)``:
loose enough for interior-point solves (Clarabel stops at about 1e-8 relative),
tight enough to catch a wrong constant or a lost term (``dualize.numeric.verify``).
"""

from __future__ import annotations

import math

ABS_TOL = 1e-6
REL_TOL = 1e-5


def tolerance(p: float, d: float) -> float:
    scale = max(1.0, abs(p) if math.isfinite(p) else 1.0, abs(d) if math.isfinite(d) else 1.0)
    return ABS_TOL + REL_TOL * scale

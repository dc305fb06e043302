"""Checking duals: the derived one against the primal (``verify``), and a user's
claimed dual against the derived one (``check_claim``).

- ``claims``: a claim file read against its primal (data lines lent to it).
- ``matching``: claim variables paired with derived dual variables.
- ``symbolic``: a proof that the claim is the derived dual, when one exists.
- ``numeric`` / ``verdict``: three optima per instance and the verdict they give.
- ``counterexample``: the failing instance, written atomically for replay.
- ``report``: ``check_claim`` and ``ClaimReport``.
"""

from __future__ import annotations

from dualize.checking.claims import Claim, ClaimError, load_claim
from dualize.checking.report import ClaimInstance, ClaimReport, check_claim
from dualize.checking.verdict import VERDICTS
from dualize.numeric.verify import VerifyReport, verify

__all__ = ["VERDICTS", "Claim", "ClaimError", "ClaimInstance", "ClaimReport", "VerifyReport",
           "check_claim", "load_claim", "verify"]

"""A time budget for one run, passed down as an argument.

A command makes one :class:`Deadline` (``--time-limit SECONDS``) and hands it to
every step of the run (deriving, analysing, rendering).  A step asks
``deadline.check("what it is doing")`` between units of work; past the limit
that raises :class:`DeadlineExceeded`, which names the step, and the caller
keeps what it has (an infimum left unevaluated, a verdict left undecided) and
says so.  No signal, no timer, no module state: a library call without a
deadline gets :func:`Deadline.unlimited`, and two runs never share one.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable

DEFAULT_SECONDS = 60.0


class DeadlineExceeded(Exception):  # noqa: N818 - a condition of the run, named for it
    """The time limit was reached during ``step``."""

    def __init__(self, step: str, seconds: float) -> None:
        super().__init__(f"the time limit of {seconds:g} s was reached while {step}")
        self.step = step
        self.seconds = seconds


class Deadline:
    """A point in time after which steps stop; ``seconds=None`` means no limit."""

    def __init__(self, seconds: float | None = DEFAULT_SECONDS,
                 clock: Callable[[], float] = time.monotonic) -> None:
        if seconds is not None and not seconds > 0:
            raise ValueError("a time limit must be a positive number of seconds")
        self.seconds = seconds
        self._clock = clock
        self._end = math.inf if seconds is None else clock() + seconds

    @classmethod
    def unlimited(cls) -> Deadline:
        return cls(None)

    def remaining(self) -> float:
        """Seconds left (``inf`` without a limit, never negative)."""
        return max(0.0, self._end - self._clock())

    def expired(self) -> bool:
        return self._clock() >= self._end

    def check(self, step: str) -> None:
        """Raise :class:`DeadlineExceeded` naming ``step`` when the time is up."""
        if self.expired():
            raise DeadlineExceeded(step, self.seconds or 0.0)

    def limited(self, seconds: float) -> float:
        """A budget of at most ``seconds`` for one call, within what is left."""
        return min(seconds, self.remaining())

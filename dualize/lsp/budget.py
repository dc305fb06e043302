"""Time limits for the server's requests.

Each request gets its own limit: the lint findings of a keystroke, a hover and
a derivation are bounded separately, so a slow derivation never holds back the
diagnostics.  The work itself runs in worker threads; the server waits for it
no longer than the limit and answers with what it has (or a protocol error).
A derivation also gets a ``dualize.deadline.Deadline`` of ``derive`` seconds,
so the engine itself stops, keeps what it has and notes the step it cut.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Limits:
    """Seconds allowed per kind of request."""

    lint: float = 10.0
    hover: float = 2.0
    derive: float = 60.0
    debounce: float = 0.15

    @classmethod
    def from_total(cls, seconds: float) -> Limits:
        """Limits scaled from the one figure a user gives (``--time-limit``): the
        derivation gets it all, a lint a sixth of it (at least 1 s), a hover a thirtieth
        (between 0.5 and 2 s)."""
        return cls(lint=max(seconds / 6, 1.0), hover=min(max(seconds / 30, 0.5), 2.0),
                   derive=seconds)

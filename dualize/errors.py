"""User-facing errors that stop a command, each with its exit code."""

from __future__ import annotations


class DualizeError(Exception):
    """An error to report in one line (no traceback) and exit with ``exit_code``."""

    def __init__(self, message: str, exit_code: int = 2) -> None:
        super().__init__(message)
        self.message = message
        self.exit_code = exit_code

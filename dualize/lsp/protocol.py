"""pygls's protocol with one repair: a request whose parameters do not fit the
protocol's types is answered with InvalidParams under its own id.

pygls reports such a request in a window message and never answers it, which
leaves the client waiting; JSON-RPC 2.0 (section 5.1) asks for an error
response.  Logs keep one line per failure: the editor's log is no place for a
Python traceback.
"""

from __future__ import annotations

import logging
from typing import Any

from pygls.exceptions import JsonRpcException
from pygls.protocol import LanguageServerProtocol


class _Answered:
    """Stands for a request already answered with an error: its ``jsonrpc`` is no
    protocol version, so the dispatcher logs it and goes on."""

    jsonrpc = "none"

    def __repr__(self) -> str:
        return "request with parameters of the wrong shape (answered with InvalidParams)"


IGNORED = _Answered()


class ProblemProtocol(LanguageServerProtocol):
    def structure_message(self, data: dict[str, Any]) -> Any:
        try:
            return super().structure_message(data)
        except JsonRpcException as err:
            if "id" in data and "method" in data:
                self._send_response(data["id"], error=err.to_response_error())
                return IGNORED  # handle_message skips a message of another version
            raise


class OneLineFormatter(logging.Formatter):
    """One line per record: the message's first line and the exception's own line,
    never a traceback (pygls puts some into the message text itself)."""

    def format(self, record: logging.LogRecord) -> str:
        lines = record.getMessage().splitlines() or [""]
        text = f"dualize serve: {record.levelname.lower()}: {lines[0]}"
        if record.exc_info and record.exc_info[1] is not None:
            err = record.exc_info[1]
            text += f" ({type(err).__name__}: {str(err).splitlines()[0] if str(err) else ''})"
        return text


def log_to_stderr() -> None:
    """WARNING and above to standard error, one line each (standard output is the
    protocol's channel)."""
    import sys

    handler = logging.StreamHandler(sys.stderr)
    handler.setFormatter(OneLineFormatter())
    root = logging.getLogger()
    root.handlers[:] = [handler]
    root.setLevel(logging.WARNING)

"""Start the server on standard input and output, and end the process cleanly."""

from __future__ import annotations

import sys
from typing import NoReturn


def serve(time_limit: float) -> NoReturn:
    """Serve until the client says ``exit``; the exit code is 0 after an orderly shutdown
    (``shutdown`` then ``exit``), 1 otherwise.

    The worker threads may still hold a derivation that outlived its request; the
    process does not wait for it (the protocol's ``exit`` means now).
    """
    import os

    from dualize.lsp.budget import Limits
    from dualize.lsp.protocol import log_to_stderr
    from dualize.lsp.server import build

    log_to_stderr()
    server = build(Limits.from_total(time_limit), _version())
    code = 1
    try:
        server.start_io()
    except SystemExit as done:
        code = done.code if isinstance(done.code, int) else 1
    else:
        code = 0 if server.orderly else 1
    finally:
        server.work.close()
        sys.stderr.flush()  # standard output is closed by the exit request: each
    os._exit(code)  # message was flushed as it was written


def _version() -> str:
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("dualize")
    except PackageNotFoundError:
        return "0"

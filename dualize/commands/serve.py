"""``dualize serve``: the language server, speaking LSP on standard input and output."""

from __future__ import annotations

import click

from dualize.commands.common import time_limit_option


@click.command("serve")
@time_limit_option
def serve_command(time_limit: float) -> None:
    """Serve editors: diagnostics, hovers and the dual over the Language Server Protocol.

    Reads requests on standard input and answers on standard output; an editor
    starts it (see docs/editor.md). Logs go to standard error. The time limit bounds
    each derivation; the lint findings of a version get a sixth of it (at least 1 s),
    a hover or a completion a thirtieth (between 0.5 and 2 s).
    """
    from dualize.lsp.run import serve

    serve(time_limit)

"""``dualize serve``: the language server, speaking LSP on standard input and output."""

from __future__ import annotations

import click


@click.command("serve")
@click.option("--time-limit", type=click.FloatRange(min=1.0), default=60.0, show_default=True,
              metavar="SECONDS",
              help="Longest a derivation may take; lint findings get a sixth of it, a hover "
              "a thirtieth (at most 2 s).")
def serve_command(time_limit: float) -> None:
    """Serve editors: diagnostics, hovers and the dual over the Language Server Protocol.

    Reads requests on standard input and answers on standard output; an editor
    starts it (see docs/editor.md). Logs go to standard error.
    """
    from dualize.lsp.run import serve

    serve(time_limit)

"""A language server for problem files: diagnostics, hovers and the dual in the editor.

Built on pygls (the JSON-RPC transport and the Language Server Protocol types
from lsprotocol); everything dualize-specific lives in plain functions over the
document's text, so that it can be tested without an editor.  ``server.py`` only
wires those functions to protocol requests, keeps the event loop free (every
analysis and derivation runs in a worker thread under a time limit) and
publishes the results.
"""

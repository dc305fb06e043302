"""Command objects that ``dualize.cli`` registers on its group.

Each module defines one click command that parses its options, calls one
function of ``dualize.api`` and formats the result; it imports nothing heavy at
load time, so ``dualize --help`` stays fast.  ``common`` holds what they share:
the one place where a user error becomes an exit code, progress bars, printing.
"""

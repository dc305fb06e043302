"""Command objects that ``dualize.cli`` registers on its group.

Each module defines one click command and imports nothing heavy at load time,
so ``dualize --help`` stays fast; the work is imported inside the command.
``common`` holds what the commands share: loading a problem, choosing
instances, reporting a user error with its exit code.
"""

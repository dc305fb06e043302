"""``python -m dualize`` runs the command line (see ``dualize.cli.run``)."""

from dualize.cli import run

run()

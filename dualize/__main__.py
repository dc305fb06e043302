"""``python -m dualize`` runs the command line."""

from dualize.cli import main

main()

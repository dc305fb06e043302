"""The solver generator: plan, lift, recovery and emission of a standalone module that
solves a derived dual, and the runtime that module carries."""

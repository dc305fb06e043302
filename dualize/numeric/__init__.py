"""Numbers for the symbolic results: instances, random data, evaluation, references.

- ``instance``: ``Instance``, ``read_instance``, ``random_instance``, ``parse_dims``.
- ``random_data`` / ``dual_data``: random instances that honour the declared sets
  and make the primal (and, for ``verify``, the derived dual) strictly feasible.
- ``evaluate``: a numpy evaluator of every IR node.
- ``translate`` / ``reference``: IR to cvxpy; ``solve_primal``, ``solve_dual``.
- ``local``: several local solves where cvxpy cannot certify convexity.
- ``verify`` / ``samples``: the derived dual against the primal, and weak duality
  on random feasible points.

Nothing is imported here, so ``import dualize.numeric`` stays cheap; cvxpy and
scipy are imported only inside the functions that solve.
"""

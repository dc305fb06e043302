"""What the multipliers mean, on an instance.

- ``sensitivity``: each constraint's optimal multiplier read as a price, the
  global bound ``p*(u) >= p*(0) - lambda*'u`` and the local rates
  ``dp*/du_i = -lambda_i``, each rate checked by re-solving the perturbed problem
  (Boyd and Vandenberghe, Convex Optimization, 2004, section 5.6).
- ``forms``: the penalized form ``f + w r`` and the constrained form ``f`` with
  ``r <= t`` of one problem, each written from the other as a problem file.
- ``path``: the correspondence between ``w`` and ``t`` on an instance, point by
  point or as a whole curve, each point checked by solving the other form.

The numeric work uses the project's reference (cvxpy, in ``dualize.numeric``).
This package sits beside ``checking``: it may import numeric, duality, analysis,
model, syntax and the render printers, never the commands or the command line.
"""

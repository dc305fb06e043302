"""When a dual function with max and min in its printed form is smooth all the same.

A dual function is concave whatever its printed form (S. Boyd and L. Vandenberghe,
Convex Optimization, 2004, section 5.1.2).  Minimizing over a box leaves max and min
of the multipliers in the block's value (a projection onto the box, or a conjugate
restricted to it); when the Lagrangian is strictly convex in the block's variable
over the box, its minimizer there is unique for every multiplier, so the block's
value is continuously differentiable with gradient the multipliers' coefficients at
that minimizer (Danskin's theorem; D. Bertsekas, Nonlinear Programming, 2nd ed.,
1999, Prop. B.25).  The engine records that fact on the dual (``DualProblem.
strictly_convex_boxes``) only when every block whose value has such a kink is one
of those; a solver may then differentiate the max and min piece by piece.
"""

from __future__ import annotations

from collections.abc import Mapping

from dualize.duality.blocks import Outcome
from dualize.model.expr import Apply, Expr, Extremum, Norm, depends_on, symbols_of, walk
from dualize.model.functions import ABS


def _kinked(value: Expr) -> bool:
    """Whether ``value`` has a max, min, absolute value or polyhedral norm of multipliers."""
    names = {s.name for s in symbols_of(value, "multiplier")}
    for node in walk(value):
        kink = isinstance(node, Extremum) or (isinstance(node, Apply) and node.func == ABS.name) \
            or (isinstance(node, Norm) and node.p in ("1", "inf"))
        if kink and depends_on(node, names):
            return True
    return False


def strictly_convex_boxes(outcomes: Mapping[str, Outcome]) -> tuple[str, ...]:
    """The blocks whose kinks are smooth as a whole (see the module doc), or () when a
    block with a kink is not shown strictly convex over a box, or no block has one."""
    kinked = [name for name, out in outcomes.items() if _kinked(out.value)]
    if not kinked or any(not outcomes[name].strict_box for name in kinked):
        return ()
    return tuple(kinked)

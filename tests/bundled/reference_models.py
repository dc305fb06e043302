"""Each bundled example restated by hand as a cvxpy problem, to check its instance.

cvxpy is the independent reference here: if an instance were infeasible,
unbounded or inconsistent with its declared sizes, these solves would say so
without trusting any part of dualize.  Every builder takes the instance mapping
(numpy arrays and floats) and returns the problem; the keys it reads are listed
so a test notices when a problem file and its instance drift apart.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

import numpy as np

Data = dict[str, Any]
Builder = Callable[[Data], Any]


def _flour_blend_lp(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(d["c"] @ x), [d["A"] @ x == d["b"], x >= 0])


def _joinery_lp(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(d["c"] @ x), [d["A"] @ x <= d["b"]])


def _survey_least_norm(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(cp.sum_squares(x)), [d["A"] @ x == d["b"]])


def _drone_thrust_qp(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["P"].shape[0])
    objective = 0.5 * cp.quad_form(x, d["P"]) + d["q"] @ x
    return cp.Problem(cp.Minimize(objective), [d["G"] @ x <= d["h"]])


def _parts_soft_margin(d: Data) -> Any:
    import cvxpy as cp
    m, n = d["X"].shape
    w, b, s = cp.Variable(n), cp.Variable(), cp.Variable(m)
    margin = cp.multiply(d["y"], d["X"] @ w + b)
    objective = 0.5 * cp.sum_squares(w) + d["C"] * cp.sum(s)
    return cp.Problem(cp.Minimize(objective), [margin >= 1 - s, s >= 0])


def _antenna_norm_min(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(cp.norm(x, 2)), [d["A"] @ x == d["b"]])


def _pipe_leaks_l1(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(cp.norm(x, 1)), [d["A"] @ x == d["b"]])


def _spectrum_lasso(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    fit = cp.sum_squares(d["A"] @ x - d["y"])
    return cp.Problem(cp.Minimize(fit + d["lambda"] * cp.norm(x, 1)))


def _route_entropy(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(-cp.sum(cp.entr(x))),
                      [d["A"] @ x <= d["b"], cp.sum(x) == 1])


def _vibration_sdp(d: Data) -> Any:
    import cvxpy as cp
    X = cp.Variable(d["C"].shape, symmetric=True)
    return cp.Problem(cp.Minimize(cp.trace(d["C"] @ X)),
                      [cp.trace(d["A1"] @ X) == d["b1"], X >> 0])


def _window_scalar(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable()
    # (x - 2)(x - 4) <= 0 written as the convex quadratic x^2 - 6x + 8 <= 0.
    return cp.Problem(cp.Minimize(cp.square(x) + 1), [cp.square(x) - 6 * x + 8 <= 0])


def _disk_scalar(d: Data) -> Any:
    import cvxpy as cp
    x1, x2 = cp.Variable(), cp.Variable()
    return cp.Problem(cp.Minimize(x1 + x2), [cp.square(x1) + cp.square(x2) <= 2])


def _pump_share_domain(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1], nonneg=True)
    objective = d["c"] @ x + 0.5 * cp.sum_squares(x)
    return cp.Problem(cp.Minimize(objective), [d["A"] @ x == d["b"]])


def _charging_box(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(d["c"] @ x), [x >= 0, x <= 1, d["A"] @ x <= d["b"]])


def _lab_budget_max(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(int(d["n"]))
    return cp.Problem(cp.Maximize(cp.sum(cp.log(x))), [cp.sum(x) == d["B"], x >= 0])


def _orchard_mean_variance(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["r"].shape[0])
    objective = d["r"] @ x - d["gamma"] * cp.quad_form(x, d["S"])
    return cp.Problem(cp.Maximize(objective), [cp.sum(x) == 1, x >= 0])


def _sensor_hinge(d: Data) -> Any:
    import cvxpy as cp
    w = cp.Variable(d["X"].shape[1])
    hinge = cp.pos(1 - cp.multiply(d["y"], d["X"] @ w))
    return cp.Problem(cp.Minimize(0.5 * cp.sum_squares(w) + d["C"] * cp.sum(hinge)))


def _kiln_minimax(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(cp.norm(d["A"] @ x - d["b"], "inf")))


def _robot_analytic_center(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(-cp.sum(cp.log(d["b"] - d["A"] @ x))))


def _traffic_softmax(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    return cp.Problem(cp.Minimize(cp.log_sum_exp(d["A"] @ x + d["b"])))


def _weighbridge_ridge(d: Data) -> Any:
    import cvxpy as cp
    x = cp.Variable(d["A"].shape[1])
    fit = cp.sum_squares(d["A"] @ x - d["b"])
    return cp.Problem(cp.Minimize(fit + d["w"] * cp.sum_squares(x)))


CONVEX: dict[str, tuple[Builder, tuple[str, ...]]] = {
    "antenna_norm_min": (_antenna_norm_min, ("A", "b")),
    "charging_box": (_charging_box, ("A", "b", "c")),
    "disk_scalar": (_disk_scalar, ()),
    "drone_thrust_qp": (_drone_thrust_qp, ("G", "P", "h", "q")),
    "flour_blend_lp": (_flour_blend_lp, ("A", "b", "c")),
    "joinery_lp": (_joinery_lp, ("A", "b", "c")),
    "kiln_minimax": (_kiln_minimax, ("A", "b")),
    "lab_budget_max": (_lab_budget_max, ("B", "n")),
    "orchard_mean_variance": (_orchard_mean_variance, ("S", "gamma", "r")),
    "parts_soft_margin": (_parts_soft_margin, ("C", "X", "y")),
    "pipe_leaks_l1": (_pipe_leaks_l1, ("A", "b")),
    "pump_share_domain": (_pump_share_domain, ("A", "b", "c")),
    "robot_analytic_center": (_robot_analytic_center, ("A", "b")),
    "route_entropy": (_route_entropy, ("A", "b")),
    "sensor_hinge": (_sensor_hinge, ("C", "X", "y")),
    "spectrum_lasso": (_spectrum_lasso, ("A", "lambda", "y")),
    "survey_least_norm": (_survey_least_norm, ("A", "b")),
    "traffic_softmax": (_traffic_softmax, ("A", "b")),
    "vibration_sdp": (_vibration_sdp, ("A1", "C", "b1", "n")),
    "weighbridge_ridge": (_weighbridge_ridge, ("A", "b", "w")),
    "window_scalar": (_window_scalar, ()),
}

NONCONVEX = ("shift_partition",)


def as_arrays(raw: dict[str, Any]) -> Data:
    """JSON lists as float arrays; scalars stay Python numbers."""
    return {k: np.asarray(v, dtype=float) if isinstance(v, list) else v for k, v in raw.items()}

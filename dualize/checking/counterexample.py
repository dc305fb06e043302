"""An instance on which a claim fails, saved so that the failure can be replayed.

The file is an ordinary instance (JSON), readable by ``--data``: every data
value of the primal and every dimension size, nothing else (an instance file
may hold no other keys).  It is written atomically, to a temporary file in the
target's folder that then replaces the target, so a reader never sees half a
file and an interrupted run leaves the old file intact.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import numpy as np

from dualize.numeric.instance import Instance


def instance_data(instance: Instance) -> dict[str, Any]:
    """The instance as JSON-ready data, keys sorted; floats keep every digit."""
    out: dict[str, Any] = {}
    for name in sorted(instance.values):
        arr = np.asarray(instance.values[name], dtype=float)
        out[name] = float(arr) if arr.ndim == 0 else arr.tolist()
    for name in sorted(instance.dims):
        out[name] = int(instance.dims[name])
    return dict(sorted(out.items()))


def default_path(claim_path: str) -> str:
    """``<claim>.counterexample.json`` beside the claim: ``x.prob`` gives
    ``x.counterexample.json``."""
    path = Path(claim_path)
    stem = path.name[:-len(path.suffix)] if path.suffix else path.name
    return str(path.with_name(f"{stem}.counterexample.json"))


def save(instance: Instance, target: str) -> str:
    """Write ``instance`` to ``target`` atomically; returns the path written."""
    from dualize.outfile import write_output

    write_output(target, json.dumps(instance_data(instance), indent=2) + "\n")
    return target

"""The commands behind the editor's "derive the dual" and "write the LaTeX".

Both derive from the open buffer's text (what the user sees, saved or not).
They run in a worker thread under the server's time limit; a problem with
errors is refused with the count of its errors, never derived half-way.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

from dualize.duality.result import Derivation
from dualize.errors import DualizeError
from dualize.lsp.state import Snapshot


@dataclass(frozen=True)
class Derived:
    """A derivation of one document version (hovers read it; reports also analyse)."""

    derivation: Derivation

    def analysis(self) -> Any:
        """The analysis a report shows (verdicts, findings), computed when one is made."""
        from dualize.analysis import analyze

        return analyze(self.derivation.problem)


def derive_snapshot(snap: Snapshot, seconds: float) -> Derived:
    """Derive the dual of the snapshot's problem within ``seconds`` (past them the engine
    keeps what it has and its notes say which step was cut); a problem with errors is
    refused."""
    from dualize.deadline import Deadline
    from dualize.duality import derive

    problem = snap.loaded.problem
    errors = [d for d in snap.loaded.diagnostics if d.severity == "error"]
    if problem is None or errors:
        raise DualizeError(f"{snap.path}: the problem has {len(errors) or 'syntax'} "
                           f"error(s); nothing was derived", exit_code=2)
    return Derived(derive(problem, Deadline(seconds)))


def markdown(derived: Derived) -> str:
    """The derivation as Markdown (the same text as ``dualize derive --format markdown``)."""
    from dualize.api import render

    return render(derived.derivation, "markdown", derived.analysis())


def latex_target(snap: Snapshot) -> Path:
    """Where the LaTeX goes: beside the problem file, same name with ``.tex``."""
    if snap.file is None:
        raise DualizeError(f"{snap.uri}: the document is not a file on disk; save it first",
                           exit_code=2)
    return snap.file.with_suffix(".tex")


def write_latex(snap: Snapshot, derived: Derived, standalone: bool = False) -> Path:
    """Write the derivation's LaTeX beside the file, atomically (the project's writer:
    a temporary file in the same folder, then a rename)."""
    from dualize.api import render, write_atomically

    target = latex_target(snap)
    text = render(derived.derivation, "latex", derived.analysis(), standalone=standalone)
    try:
        write_atomically(str(target), text)
    except OSError as err:
        raise DualizeError(f"cannot write {target}: {err.strerror or err}", exit_code=2) from err
    return target

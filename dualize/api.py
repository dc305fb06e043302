"""The library's one way in: each job of the command line as one documented function.

``lint``, ``derive``, ``verify``, ``check``, ``check_draft`` and
``generate_solver`` do what the commands of the same names do; the commands in
``dualize.commands`` only parse options, call one of these and format the
result.  Results are data objects (``dualize.results``) that show themselves in
a notebook.  A problem is given as text, as a path to a ``.prob`` file, or as a
loaded ``Problem``.  Bad input raises ``DualizeError`` (or its subclass
``ProblemError``, which carries the located diagnostics) with the exit code the
command line uses; nothing is printed here.

This module sits above every stage, so it is where what a lower stage needs
from a higher one is passed in (the numeric evaluator to the analysis).  See
docs/python-api.md for a walk-through.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping, Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dualize.deadline import Deadline
from dualize.errors import DualizeError
from dualize.render.formats import render
from dualize.results import (
    CheckVerdict,
    DerivedDual,
    DraftVerdicts,
    GeneratedSolver,
    LintResult,
    Verification,
    shown,
)

if TYPE_CHECKING:
    from dualize.analysis.report import Analysis
    from dualize.diagnostics import Diagnostic
    from dualize.model.problem import Problem

__all__ = ["CheckVerdict", "DerivedDual", "DraftVerdicts", "GeneratedSolver", "LintResult",
           "ProblemError", "Verification", "analyze", "check", "check_draft", "derive",
           "generate_solver", "instance_of", "lint", "load_problem", "other_form", "price_count",
           "prices",
           "render", "sibling_instance", "trade_off", "verify", "write_atomically",
           "write_bytes_atomically"]

Progress = Callable[[list[Any], str], Iterable[Any]]
DEFAULT_RANDOM = 3  # random instances when none are asked for


def _budget(time_limit: float | Deadline | None) -> Deadline | None:
    """The run's deadline: a ``Deadline`` as given, one of ``time_limit`` seconds, or
    None (no limit: a library call waits as long as the derivation takes)."""
    if time_limit is None or isinstance(time_limit, Deadline):
        return time_limit
    return Deadline(time_limit)


def _each(items: list[Any], label: str) -> Iterable[Any]:
    return items


class ProblemError(DualizeError):
    """A problem with errors: one line to say so, the located diagnostics with it."""

    def __init__(self, diagnostics: tuple[Diagnostic, ...], source: str, where: str,
                 outcome: str = "nothing was done") -> None:
        super().__init__(f"{where}: the problem has errors; {outcome}", exit_code=2)
        self.diagnostics = diagnostics
        self.source = source

    def __str__(self) -> str:
        from dualize.render.diagnostics import format_text

        path = self.diagnostics[0].path if self.diagnostics else "<string>"
        return format_text(self.diagnostics, {path: self.source}) + "\n" + self.message


def _is_path(source: str | Path) -> bool:
    """A ``Path``, or one line of text naming a ``.prob`` file (problem text never ends
    so); anything else is problem text."""
    return isinstance(source, Path) or ("\n" not in source and source.endswith(".prob"))


def load_problem(source: str | Path | Problem, outcome: str = "nothing was done") -> Problem:
    """A resolved problem from text, a path, or a problem (returned as is).

    A missing file or a problem with errors raises (exit code 2); ``outcome`` ends
    the message (``"nothing was derived"``).
    """
    from dualize.model import load, load_file
    from dualize.model.problem import Problem

    if isinstance(source, Problem):
        return source
    is_path = _is_path(source)
    if is_path and not Path(source).is_file():
        raise DualizeError(f"{source}: no such problem file", exit_code=2)
    loaded = load_file(source) if is_path else load(str(source))
    errors = tuple(d for d in loaded.diagnostics if d.severity == "error")
    if loaded.problem is None or errors:
        text = _text(Path(source)) if is_path else str(source)
        raise ProblemError(errors or loaded.diagnostics, text,
                           str(source) if is_path else "<string>", outcome)
    return loaded.problem


def _text(path: Path) -> str:
    try:
        return path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        return ""


def analyze(problem: Problem, instance: Any | None = None,
            deadline: Deadline | None = None) -> Analysis:
    """Convexity, constraint classes, the strong-duality verdict and the lint findings.

    ``instance`` (an ``Instance``, or a mapping name -> value) decides Slater's
    condition on numbers; the numeric evaluator is handed to the analysis here.  Past
    ``deadline`` the symbolic Slater search stops between candidate points and the
    verdict says the time limit was reached.
    """
    from dualize.analysis import analyze as _analyze

    if instance is None:
        return _analyze(problem, deadline=deadline)
    from dualize.numeric.evaluate import evaluate_2d

    return _analyze(problem, instance, evaluate_2d, deadline)


def lint(paths: Sequence[str | Path], select: Iterable[str] = (), ignore: Iterable[str] = (),
         fail_on: str | None = None, data: str | None = None) -> LintResult:
    """Lint problem files and folders of them (searched for ``*.prob``).

    ``select`` and ``ignore`` pick rules by id or id prefix, ``fail_on`` is the
    least severity that fails; they replace the ``[tool.dualize]`` settings of the
    nearest pyproject.toml key by key.  ``data`` is an instance for a single file
    (Slater's condition and dependent equalities decided on its values).
    """
    from dualize.lint import lint_paths
    from dualize.lint_config import configured, filtered

    config = configured(select, ignore, fail_on)
    return LintResult(filtered(lint_paths(paths, data=data), config), config)


def derive(source: str | Path | Problem, data: str | None = None,
           with_analysis: bool = False,
           time_limit: float | Deadline | None = None) -> DerivedDual:
    """The Lagrange dual, with its steps, KKT conditions and recovery.

    ``with_analysis`` adds the strong-duality verdict and the lint findings (the
    printers then state the verdict); ``data``, an instance file, decides the
    verdict on its values.  Past ``time_limit`` (seconds, or a ``Deadline``) the
    steps not done are kept unevaluated and the derivation says which was cut.
    """
    from dualize.duality.engine import derive as _derive

    problem = load_problem(source, "nothing was derived")
    deadline = _budget(time_limit)
    derivation = _derive(problem, deadline)
    if not (with_analysis or data is not None):
        return shown(derivation)
    return shown(derivation, analyze(problem, _read(data, problem), deadline))


def _read(data: str | None, problem: Problem) -> Any:
    if data is None:
        return None
    from dualize.numeric.instance import read_instance

    return read_instance(data, problem).values


def _dims(dims: str | Mapping[str, int] | None) -> dict[str, int] | None:
    """Sizes for random instances: ``"m=50,n=10"`` or a mapping."""
    from dualize.numeric.instance import parse_dims

    if isinstance(dims, str):
        return parse_dims(dims) or None
    return dict(dims) if dims else None


def sibling_instance(path: str | Path) -> str | None:
    """The instance beside a problem file: same name with .json, else .toml."""
    for suffix in (".json", ".toml"):
        candidate = Path(path).with_suffix(suffix)
        if candidate.is_file():
            return str(candidate)
    return None


def verify(source: str | Path | Problem, data: str | None = None, random: int | None = None,
           seed: int = 0, dims: str | Mapping[str, int] | None = None,
           progress: Progress = _each,
           time_limit: float | Deadline | None = None) -> Verification:
    """The derived dual against the primal, solved on instances by an independent reference.

    Instances: ``data`` (a file), or ``random`` random ones from seed ``seed`` on
    (``dims`` fixes sizes); with neither, the instance beside a problem file
    (same name, .json or .toml) if there is one, else three random ones.
    ``progress(items, label)`` may wrap the instances (a progress bar);
    ``time_limit`` bounds the derivation (see ``derive``).
    """
    from dualize.analysis.convexity import analyse_convexity
    from dualize.duality.engine import derive as _derive
    from dualize.numeric.verify import check_instance, summarize

    if data is not None and random is not None:
        raise DualizeError("give --data or --random, not both", exit_code=2)
    problem = load_problem(source, "nothing was checked")
    sizes = _dims(dims)
    derivation = _derive(problem, _budget(time_limit))
    items = _verify_items(derivation, source, data, random, seed, sizes)
    checks = [check_instance(derivation, *item) for item in progress(items, "verifying")]
    convex = analyse_convexity(problem).convex
    return Verification(shown(derivation), summarize(tuple(checks)), convex)


def _verify_items(derivation: Any, source: Any, data: str | None, random: int | None,
                  seed: int, sizes: dict[str, int] | None) -> list[tuple[Any, int | None]]:
    """(instance, seed) pairs in the order they are checked."""
    from dualize.numeric.dual_data import make_dual_feasible
    from dualize.numeric.instance import read_instance
    from dualize.numeric.random_data import random_instance

    beside = sibling_instance(source) if random is None and _is_source_path(source) else None
    path = data if data is not None else beside
    if path is not None:
        return [(read_instance(path, derivation.problem), None)]
    seeds = [seed + k for k in range(DEFAULT_RANDOM if random is None else random)]
    return [(make_dual_feasible(derivation, random_instance(derivation.problem, sizes, s), s),
             s) for s in seeds]


def _is_source_path(source: Any) -> bool:
    return isinstance(source, str | Path) and _is_path(source)


def check(source: str | Path | Problem, claim: str | Path, name_map: str = "",
          data: str | None = None, random: int = DEFAULT_RANDOM, seed: int = 0,
          dims: str | Mapping[str, int] | None = None, save_counterexample: str | None = None,
          progress: Progress = _each,
          time_limit: float | Deadline | None = None) -> CheckVerdict:
    """A dual written by hand against the derived one, symbolically and on instances.

    ``claim`` is a claim file (a problem whose variables are the multipliers; it may
    omit the primal's data lines), its text (several lines), or a LaTeX draft
    ``draft.tex`` / ``draft.tex#LABEL``.

    ``name_map`` ("alpha=a,w=w") maps a LaTeX claim's names to the problem's.  A
    refuting instance is written to ``save_counterexample`` (default: beside the
    claim).  The verdict is ``equivalent`` only with a proof or agreement everywhere;
    ``time_limit`` bounds the derivation (see ``derive``).
    """
    from dualize.checking import check_claim
    from dualize.checking.counterexample import default_path
    from dualize.duality.engine import derive as _derive
    from dualize.numeric.instance import read_instance

    problem = load_problem(source, "nothing was checked")
    sizes, claim = _dims(dims), str(claim)
    text, note = _claim_text(claim, problem, source, name_map)
    instances = [read_instance(data, problem)] if data is not None else []
    if not instances and random == 0:
        raise DualizeError("nothing to check on: give --data or --random N with N >= 1", 2)
    given = "\n" in claim  # the claim's text itself: no file beside which to save
    save = save_counterexample or (None if given else default_path(claim.partition("#")[0]))
    derivation = _derive(problem, _budget(time_limit))
    report = check_claim(derivation, text, instances, [seed + k for k in range(random)], sizes,
                         "<claim>" if given else claim, save,
                         progress=lambda items: progress(items, "checking"))
    return CheckVerdict(report, note)


def _claim_text(claim: str, problem: Problem, source: Any, name_map: str
                ) -> tuple[str, str | None]:
    """The claim's text (given, read from its file, or translated from a LaTeX draft,
    then with a note of where it was found)."""
    from dualize.paper.draft import describe, is_paper_path, translation_for
    from dualize.paper.locate import parse_map

    if "\n" in claim:
        return claim, None
    if not is_paper_path(claim):
        return _read_claim(claim), None
    where = str(source) if _is_source_path(source) else None
    translation = translation_for(claim, problem, parse_map(name_map), where)
    return translation.text or "", describe(translation)


def _read_claim(path: str) -> str:
    try:
        return Path(path).read_bytes().decode("utf-8").removeprefix("\ufeff")
    except OSError as err:
        raise DualizeError(f"cannot read {path}: {err.strerror or err}", 2) from None
    except UnicodeDecodeError:
        raise DualizeError(f"{path}: the claim is not UTF-8 text", 2) from None


def check_draft(draft: str | Path, name_map: str = "", random: int = DEFAULT_RANDOM,
                time_limit: float | Deadline | None = None) -> DraftVerdicts:
    """Every dual marked ``% dualize: claim for FILE.prob`` in a LaTeX draft, checked
    against the dual derived from its problem file on ``random`` instances each;
    ``time_limit`` bounds the derivations of the whole draft (see ``derive``)."""
    from dualize.paper.draft import check_draft as _check_draft
    from dualize.paper.draft import read_draft
    from dualize.paper.locate import parse_map

    draft = str(draft)
    checks = _check_draft(read_draft(draft), draft, name_map=parse_map(name_map),
                          seeds=tuple(range(random)), deadline=_budget(time_limit))
    return DraftVerdicts(draft, tuple(checks))


def generate_solver(source: str | Path | Problem,
                    time_limit: float | Deadline | None = None) -> GeneratedSolver:
    """A standalone Python module (numpy and scipy only) that solves the dual on an
    instance, recovers the primal solution and reports the duality gap;
    ``time_limit`` bounds the derivation (see ``derive``)."""
    from dualize.duality.engine import derive as _derive
    from dualize.solvergen.solver import render_solver

    problem = load_problem(source, "no solver was written")
    return GeneratedSolver(render_solver(_derive(problem, _budget(time_limit))))


def write_atomically(path: str, text: str) -> None:
    """Write ``text`` to ``path`` (``-`` is standard output) so that a failure leaves no
    partial file and an existing file untouched; the rules are in ``dualize.outfile``."""
    from dualize.outfile import write_output

    write_output(path, text)


def write_bytes_atomically(path: str, data: bytes) -> None:
    """``write_atomically`` for any content (a PNG picture), by the same rules."""
    from dualize.outfile import write_output

    write_output(path, data)


def instance_of(problem: Problem, data: object) -> object:
    """An instance from a path (JSON or TOML) or an ``Instance`` as it is."""
    from dualize.numeric.instance import Instance, read_instance

    if isinstance(data, Instance):
        return data
    return read_instance(str(data), problem)


def price_count(problem: Problem, instance: object) -> int:
    """How many constraint entries ``prices`` would price on ``instance``."""
    from dualize.multipliers.entries import entries

    return len(entries(problem, instance))  # type: ignore[arg-type]


def prices(source: str | Path | Problem, data: object, limit: int = 200,
           deadline: Deadline | None = None,
           tick: object = None):  # type: ignore[no-untyped-def]
    """Every constraint entry priced on an instance, each rate checked by re-solving.

    Returns a ``Sensitivity`` (a table in a notebook); ``data`` is an instance file's
    path or an ``Instance``; past ``deadline`` the entries left are not checked.
    """
    from dualize.multipliers.sensitivity import sensitivity
    from dualize.multipliers.views import shown as view

    problem = load_problem(source)
    return view(sensitivity(problem, instance_of(problem, data), limit, deadline,  # type: ignore[arg-type]
                            tick))  # type: ignore[arg-type]


def other_form(source: str | Path | Problem, weight: str | None = None,
               bound: str | None = None, name: str | None = None):  # type: ignore[no-untyped-def]
    """The penalized and constrained forms of a problem (a ``Pair``), the other one
    written as a problem file's text (``pair.other_text``)."""
    from dualize.multipliers.reform import other_form as _other
    from dualize.multipliers.views import shown as view

    return view(_other(load_problem(source), weight=weight, bound=bound, new_name=name))


def trade_off(source: object, data: object, weights: list[float] | None = None,
              bounds: list[float] | None = None, weight: str | None = None,
              bound: str | None = None, tick: object = None,
              deadline: Deadline | None = None):  # type: ignore[no-untyped-def]
    """The weight and the bound matched at each value given (a ``Curve``: a table and
    the plot in a notebook).  ``source`` is a problem (or path) or a ``Pair``."""
    from dualize.multipliers.forms import Pair
    from dualize.multipliers.path import Forms, sweep
    from dualize.multipliers.views import shown as view

    if (weights is None) == (bounds is None):
        raise DualizeError("give weights or bounds, not both and not neither", exit_code=2)
    if isinstance(source, Pair):
        pair, original = source, (source.penalized if source.given == "penalized"
                                  else source.constrained)
    else:
        original = load_problem(source)  # type: ignore[arg-type]
        pair = other_form(original, weight=weight, bound=bound)
    instance = instance_of(original, data)
    given = "weight" if weights is not None else "bound"
    return view(sweep(Forms(pair, instance), given, list(weights or bounds or []),  # type: ignore[arg-type]
                      tick, deadline))  # type: ignore[arg-type]

"""``check_claim``: a user's dual against the derived one, symbolically and numerically."""

from __future__ import annotations

from collections.abc import Callable, Iterable, Sequence
from dataclasses import dataclass
from typing import Any

from dualize.checking.claims import Claim, ClaimError, load_claim
from dualize.checking.matching import Matching, match_variables
from dualize.checking.numeric import Values, claim_as_dual, solve_three, usable
from dualize.checking.ray import Ray, approach
from dualize.checking.symbolic import SymbolicResult, compare_symbolically
from dualize.checking.verdict import (
    EQUIVALENT,
    INFEASIBLE,
    INVALID,
    NOT_TIGHT,
    TIGHT_NOT_ATTAINED,
    Reading,
    decide,
    largest_gap,
    read,
    witness,
)
from dualize.duality.result import Derivation, DualProblem
from dualize.model.problem import Problem
from dualize.numeric.instance import Instance
from dualize.numeric.solution import status_word

Progress = Callable[[list[Any]], Iterable[Any]]


@dataclass(frozen=True)
class ClaimInstance:
    """One instance's three values and what they say about the claim."""

    values: Values
    gap: float
    exceeds: bool
    agrees: bool


@dataclass(frozen=True)
class ClaimReport:
    """The verdict, how it was reached, every instance and the evidence kept."""

    verdict: str
    method: str
    instances: tuple[ClaimInstance, ...]
    max_gap: float
    matching: Matching
    symbolic: SymbolicResult
    sense: str
    counterexample: Instance | None = None
    counterexample_path: str | None = None
    borrowed: tuple[str, ...] = ()
    messages: tuple[str, ...] = ()

    @property
    def ok(self) -> bool:
        """The claim's optimal value is the primal optimum (attained or not)."""
        return self.verdict in (EQUIVALENT, TIGHT_NOT_ATTAINED)


def check_claim(problem: Problem | Derivation, claim: str | Problem | Claim,
                instances: Sequence[Instance] = (), seeds: Sequence[int] = (0, 1, 2),
                dims: dict[str, int] | None = None, claim_path: str = "<claim>",
                counterexample_path: str | None = None,
                progress: Progress | None = None) -> ClaimReport:
    """Check ``claim`` (text, a loaded problem or a ``Claim``) as a dual of ``problem``.

    The derived dual is computed unless a derivation is given.  Random instances
    for ``seeds`` are made as ``verify`` makes them (primal and derived dual
    feasible).  When the verdict is invalid (or the claim unbounded) and
    ``counterexample_path`` is given, the witnessing instance is written there.
    ``progress`` wraps the list of instances as they are solved (a progress bar).
    """
    from dualize.duality.engine import derive

    derivation = problem if isinstance(problem, Derivation) else derive(problem)
    loaded = _as_claim(derivation.problem, claim, claim_path)
    matching = match_variables(loaded.problem, derivation.dual)
    symbolic = compare_symbolically(loaded.problem, derivation.dual, matching)
    try:
        posed = claim_as_dual(loaded.problem)
    except ValueError as err:
        raise ClaimError(f"{claim_path}: {err}") from None
    pairs = instance_list(derivation, instances, seeds, dims)
    steps = progress(pairs) if progress is not None else pairs
    values = [solve_three(derivation, posed, inst, seed) for inst, seed in steps]
    return _report(loaded, matching, symbolic, values, [inst for inst, _ in pairs],
                   derivation.problem.sense, counterexample_path, posed)


def _as_claim(primal: Problem, claim: str | Problem | Claim, path: str) -> Claim:
    if isinstance(claim, Claim):
        return claim
    if isinstance(claim, Problem):
        from dualize.checking.claims import check_fits

        check_fits(primal, claim, path)
        return Claim(claim, claim.source, ())
    return load_claim(primal, claim, path)


def instance_list(derivation: Derivation, given: Sequence[Instance], seeds: Sequence[int],
                  dims: dict[str, int] | None) -> list[tuple[Instance, int | None]]:
    """The given instances, then one random instance per seed, made as ``verify`` makes
    them, so that a claim is tested where the primal and the true dual are finite."""
    from dualize.numeric.dual_data import make_dual_feasible
    from dualize.numeric.random_data import random_instance

    out: list[tuple[Instance, int | None]] = [(inst, None) for inst in given]
    for seed in seeds:
        drawn = random_instance(derivation.problem, dims, seed)
        out.append((make_dual_feasible(derivation, drawn, seed), seed))
    return out


def _report(claim: Claim, matching: Matching, symbolic: SymbolicResult, values: list[Values],
            instances: list[Instance], sense: str, target: str | None,
            posed: DualProblem) -> ClaimReport:
    from dualize.checking.counterexample import save

    readings = [read(v, sense) for v in values]
    verdict, method = decide(readings, symbolic.proved)
    rays: list[Ray] = []
    if verdict == NOT_TIGHT:
        rays = _rays(posed, readings, values, instances)
        if rays:
            verdict = TIGHT_NOT_ATTAINED
    index = witness(readings, verdict)
    found = instances[index] if index is not None else None
    written = save(found, target) if found is not None and target else None
    rows = tuple(ClaimInstance(v, r.gap, r.exceeds, r.agrees)
                 for v, r in zip(values, readings, strict=True))
    return ClaimReport(verdict, method, rows, largest_gap(readings), matching, symbolic,
                       sense, found, written, claim.borrowed,
                       _messages(verdict, symbolic, readings, values, rays))


def _rays(posed: DualProblem, readings: list[Reading], values: list[Values],
          instances: list[Instance]) -> list[Ray]:
    """A ray for every instance where the claim fell short, or none at all."""
    out = []
    for reading, value, instance in zip(readings, values, instances, strict=True):
        if not reading.below:
            continue
        ray = approach(posed, value.claim_point, instance, value.primal_value)
        if ray is None:
            return []
        out.append(ray)
    return out


def _messages(verdict: str, symbolic: SymbolicResult, readings: list[Reading],
              values: list[Values], rays: Sequence[Ray] = ()) -> tuple[str, ...]:
    """Sentences that say why the verdict is what it is, with the numbers behind it."""
    if verdict == TIGHT_NOT_ATTAINED:
        return (_unattained_sentence(rays[0]), *_cautions(symbolic, readings, values, verdict))
    pairs = list(zip(readings, values, strict=True))
    if verdict == EQUIVALENT:
        first = _equivalent_sentence(symbolic, len(values))
    elif verdict in _HEADLINES:
        first = _HEADLINES[verdict](pairs)
    else:
        first = _undecided_sentence(values)
    return (first, *_cautions(symbolic, readings, values, verdict))


Pairs = list[tuple[Reading, Values]]


def _invalid_sentence(pairs: Pairs) -> str:
    r, v = min(((r, v) for r, v in pairs if r.exceeds), key=lambda rv: rv[0].gap)
    return (f"on {_where(v)} the claim's optimum {v.claim_value:.10g} passes the primal "
            f"optimum {v.primal_value:.10g} by {-r.gap:.6g}: weak duality forbids it")


def _broken_sentence(pairs: Pairs) -> str:
    v = next(v for r, v in pairs if r.broken)
    return f"on {_where(v)} the claim is {status_word(v.claim_status)}, while " + _finite_side(v)


def _loose_sentence(pairs: Pairs) -> str:
    r, v = max(((r, v) for r, v in pairs if r.below), key=lambda rv: rv[0].gap)
    return ("the claim is never on the wrong side of the primal optimum, but falls short "
            f"of it by up to {r.gap:.6g} (on {_where(v)})")


_HEADLINES = {INVALID: _invalid_sentence, INFEASIBLE: _broken_sentence,
              NOT_TIGHT: _loose_sentence}


def _unattained_sentence(ray: Ray) -> str:
    return ("the solver's value falls short of the primal optimum, but the claim rises to it "
            "along a ray and never passes it: its supremum equals the optimum and is not "
            "attained by any multiplier (ray: " + ray.describe() + ")")


def _undecided_sentence(values: list[Values]) -> str:
    if not values:
        return "no instance was checked"
    statuses = sorted({"/".join(map(status_word, (v.primal_status, v.dual_status,
                                                   v.claim_status))) for v in values})
    return ("no instance decided the question (primal/dual/claim statuses: "
            + ", ".join(statuses) + ")")


def _finite_side(v: Values) -> str:
    if usable(v.dual_value, v.dual_status):
        return (f"the derived dual has the value {v.dual_value:.10g} "
                f"({status_word(v.dual_status)})")
    return f"the primal has the value {v.primal_value:.10g} ({status_word(v.primal_status)})"


def _where(v: Values) -> str:
    return f"seed {v.seed}" if v.seed is not None else v.source


def _equivalent_sentence(symbolic: SymbolicResult, count: int) -> str:
    if symbolic.proved:
        return ("proved equal to the derived dual symbolically: the same objective and the "
                "same constraints up to positive factors, variable sets included")
    return (f"agrees with the derived dual's optimum on all {count} instance(s) to tolerance; "
            "no symbolic proof (" + "; ".join(symbolic.reasons) + ")")


def _cautions(symbolic: SymbolicResult, readings: list[Reading], values: list[Values],
              verdict: str) -> list[str]:
    out = []
    if symbolic.proved and not all(r.agrees for r in readings):
        out.append("the numeric solves do not all agree with the symbolic proof (solver "
                   "statuses or tolerances): see the instances")
    if any(v.primal_status == "local" for v in values):
        out.append("the primal is not certifiably convex: its values come from local solves "
                   "and only bound the optimum; an exceeding claim is still caught, but "
                   "'tight' means tight against those values")
    if any(v.claim_status == "local" for v in values):
        out.append("the claim is not certifiably concave (convex for a maximization): it was "
                   "solved by local searches, which can show it passes the primal optimum "
                   "but not that it is a bound")
    if verdict == NOT_TIGHT and any(r.agrees for r in readings):
        out.append("the claim matches the derived dual on some instances but not all")
    return out

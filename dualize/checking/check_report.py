"""The reports of ``verify`` and ``check`` as text tables and as JSON-ready data.

Numbers that are not finite (an infeasible problem's +inf, a failed solve's
NaN) are written as ``null`` in JSON; the status beside them says why.  The
text form states the caution that numbers hold for the model as written and
within solver tolerances, and closes with the verdict.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from dualize.numeric.solution import status_word
from dualize.render.caution import REVIEW

if TYPE_CHECKING:
    from dualize.checking.report import ClaimReport
    from dualize.numeric.verify import InstanceCheck, VerifyReport

CAUTION = ("These numbers hold for the model as written, on these instances, and within "
           "solver tolerances (about 1e-6 absolute plus 1e-5 relative). " + REVIEW)
WEAK_ONLY = ("weak duality only: the primal is not certifiably convex, so the dual optimum "
             "is only guaranteed to be a lower bound, and a positive gap is no error")
WEAK_ONLY_MAX = ("weak duality only: the primal is not certifiably convex, so the dual "
                 "optimum is only guaranteed to be an upper bound, and a positive gap is no "
                 "error")


def number(value: float | None) -> float | None:
    """A JSON number, or None for NaN and infinities."""
    if value is None or not math.isfinite(value):
        return None
    return float(value)


def cell(value: float | None) -> str:
    """A table cell: ten significant digits, or the sign of an infinity, or a dash."""
    if value is None or math.isnan(value):
        return "-"
    if math.isinf(value):
        return "+inf" if value > 0 else "-inf"
    return f"{value:.10g}"


def table(header: list[str], rows: list[list[str]]) -> list[str]:
    """Left-aligned columns two spaces apart."""
    widths = [max(len(r[i]) for r in [header] + rows) for i in range(len(header))]
    def line(r: list[str]) -> str:
        return "  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)).rstrip()
    return [line(header), line(["-" * w for w in widths])] + [line(r) for r in rows]


def markdown_table(header: list[str], rows: list[list[str]]) -> list[str]:
    """A Markdown (GitHub) table; pipes inside cells are escaped."""
    def line(r: list[str]) -> str:
        return "| " + " | ".join(c.replace("|", "\\|") for c in r) + " |"
    return [line(header), "|" + "---|" * len(header)] + [line(r) for r in rows]


# -- verify ----------------------------------------------------------------------


def verify_dict(report: VerifyReport, convex: bool | None) -> dict[str, Any]:
    """The verify report as JSON-ready data."""
    return {
        "verdict": report.verdict,
        "weak_duality_only": convex is not True,
        "max_abs_gap": number(report.max_abs_gap),
        "instances": [_verify_instance(c) for c in report.checks],
        "messages": list(report.messages),
        "caution": CAUTION,
    }


def _verify_instance(c: InstanceCheck) -> dict[str, Any]:
    return {
        "source": c.source, "seed": c.seed,
        "primal_value": number(c.primal_value), "dual_value": number(c.dual_value),
        "gap": number(c.gap), "primal_status": status_word(c.primal_status),
        "dual_status": status_word(c.dual_status),
        "multiplier_error": number(c.multiplier_error), "weak_duality_ok": c.weak_duality_ok,
        "note": c.note,
    }


VERIFY_HEADER = ["instance", "primal", "dual", "gap", "statuses", "multiplier error"]


def _verify_rows(report: VerifyReport) -> list[list[str]]:
    return [[_label(c.source, c.seed), cell(c.primal_value), cell(c.dual_value), cell(c.gap),
             _statuses(c.primal_status, c.dual_status), cell(c.multiplier_error)]
            for c in report.checks]


def _verify_verdict(report: VerifyReport, convex: bool | None, sense: str) -> str:
    return (f"verdict: {report.verdict} (largest |gap| {cell(report.max_abs_gap)})"
            + _weak_clause(convex, sense))


def verify_text(report: VerifyReport, convex: bool | None, sense: str = "minimize") -> str:
    """A table of the instances, the messages, the caution and a closing verdict line."""
    lines = table(VERIFY_HEADER, _verify_rows(report)) + [""]
    lines += [f"note: {m}" for m in report.messages]
    lines.append(CAUTION)
    lines.append(_verify_verdict(report, convex, sense))
    return "\n".join(lines)


def verify_markdown(report: VerifyReport, convex: bool | None, sense: str = "minimize") -> str:
    """The verify report for a notebook: the verdict first, then the table and the caution."""
    blocks = [[f"**{_verify_verdict(report, convex, sense)}**"],
              markdown_table(VERIFY_HEADER, _verify_rows(report)),
              [f"- {m}" for m in report.messages], [f"*{CAUTION}*"]]
    return "\n\n".join("\n".join(b) for b in blocks if b)


def _weak_clause(convex: bool | None, sense: str) -> str:
    if convex is True:
        return ""
    return "; " + (WEAK_ONLY if sense == "minimize" else WEAK_ONLY_MAX)


def _statuses(*statuses: str) -> str:
    """``solved/solved``: each solve's status in the program's own words."""
    return "/".join(map(status_word, statuses))


def _label(source: str, seed: int | None) -> str:
    return f"seed {seed}" if seed is not None else source


# -- check -----------------------------------------------------------------------


def check_dict(report: ClaimReport) -> dict[str, Any]:
    """The check report as JSON-ready data."""
    return {
        "verdict": report.verdict,
        "method": report.method,
        "max_gap": number(report.max_gap),
        "counterexample": report.counterexample_path,
        "matched_variables": [{"claim": m.claim, "derived": m.derived, "how": m.how}
                              for m in report.matching.pairs],
        "unmatched_claim_variables": list(report.matching.unmatched_claim),
        "unmatched_derived_variables": list(report.matching.unmatched_derived),
        "symbolic": {"proved": report.symbolic.proved,
                     "reasons": list(report.symbolic.reasons),
                     "sign_turned": list(report.symbolic.flipped)},
        "data_taken_from_primal": list(report.borrowed),
        "instances": [_check_instance(i) for i in report.instances],
        "messages": list(report.messages),
        "caution": CAUTION,
    }


def _check_instance(i: Any) -> dict[str, Any]:
    v = i.values
    return {
        "source": v.source, "seed": v.seed,
        "primal_value": number(v.primal_value), "primal_status": status_word(v.primal_status),
        "dual_value": number(v.dual_value), "dual_status": status_word(v.dual_status),
        "claim_value": number(v.claim_value), "claim_status": status_word(v.claim_status),
        "gap": number(i.gap), "exceeds_primal": i.exceeds, "agrees_with_dual": i.agrees,
        "note": v.note,
    }


CHECK_HEADER = ["instance", "primal p", "derived dual d", "claim c", "p - c", "statuses p/d/c"]


def _check_rows(report: ClaimReport) -> list[list[str]]:
    return [[_label(i.values.source, i.values.seed), cell(i.values.primal_value),
             cell(i.values.dual_value), cell(i.values.claim_value), cell(_signed(i, report)),
             _statuses(i.values.primal_status, i.values.dual_status, i.values.claim_status)]
            for i in report.instances]


def _check_notes(report: ClaimReport) -> list[str]:
    lines = [] if report.symbolic.proved else [
        f"no symbolic proof: {r}" for r in report.symbolic.reasons]
    lines += [f"note: {m}" for m in report.messages]
    if report.counterexample_path:
        lines.append(f"counterexample written to {report.counterexample_path}")
    return lines


def _check_verdict(report: ClaimReport) -> str:
    return (f"verdict: {report.verdict} (by {report.method} means)"
            if report.method != "none" else f"verdict: {report.verdict}")


def _check_head(report: ClaimReport) -> list[str]:
    lines = [_matching_line(report)]
    if report.borrowed:
        lines.append("data taken from the primal: " + ", ".join(report.borrowed))
    return lines


def check_text(report: ClaimReport) -> str:
    """Matched variables, a table of the instances, the reasons, the caution, the verdict."""
    lines = _check_head(report) + [""] + table(CHECK_HEADER, _check_rows(report)) + [""]
    lines += _check_notes(report) + [CAUTION, _check_verdict(report)]
    return "\n".join(lines)


def check_markdown(report: ClaimReport) -> str:
    """The check report for a notebook: the verdict first, then what led to it."""
    blocks = [[f"**{_check_verdict(report)}**"], [f"- {x}" for x in _check_head(report)],
              markdown_table(CHECK_HEADER, _check_rows(report)),
              [f"- {x}" for x in _check_notes(report)], [f"*{CAUTION}*"]]
    return "\n\n".join("\n".join(b) for b in blocks if b)


def _signed(i: Any, report: ClaimReport) -> float:
    """p - c as printed: the gap turned back into the primal's own direction."""
    return i.gap if report.sense == "minimize" else -i.gap


def _pair_text(claim: str, derived: str, how: str, turned: bool) -> str:
    if turned:
        return f"{claim} = -{derived} (by {how}, sign turned)"
    return f"{claim} = {derived} (by {how})" if claim != derived else f"{claim} (by {how})"


def _matching_line(report: ClaimReport) -> str:
    turned = set(report.symbolic.flipped)
    pairs = [_pair_text(m.claim, m.derived, m.how, m.claim in turned)
             for m in report.matching.pairs]
    text = "matched variables: " + (", ".join(pairs) if pairs else "none")
    if report.matching.unmatched_claim:
        text += "; claim only: " + ", ".join(report.matching.unmatched_claim)
    if report.matching.unmatched_derived:
        text += "; derived only: " + ", ".join(report.matching.unmatched_derived)
    return text

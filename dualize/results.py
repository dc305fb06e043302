"""What the public API (``dualize.api``) returns: data objects that show themselves.

Each result keeps the library's own record (the lint report, the derivation,
the verification report, the check report) and adds what a reader needs:
whether the job passed (``ok``), the text and JSON the commands print, and a
notebook display (``_repr_markdown_``, and ``_repr_latex_`` for the derivation).
The printers are imported when a result is shown, never when it is made.
"""

from __future__ import annotations

from dataclasses import dataclass, fields
from typing import TYPE_CHECKING, Any

from dualize.duality.result import Derivation

if TYPE_CHECKING:
    from dualize.analysis.report import Analysis
    from dualize.checking.report import ClaimReport
    from dualize.diagnostics import Diagnostic
    from dualize.lint import LintReport
    from dualize.lint_config import LintConfig
    from dualize.numeric.verify import VerifyReport
    from dualize.paper.draft import DraftCheck


@dataclass(frozen=True)
class LintResult:
    """The findings of ``lint`` that the settings keep, and the settings themselves."""

    report: LintReport
    config: LintConfig

    @property
    def diagnostics(self) -> tuple[Diagnostic, ...]:
        return self.report.diagnostics

    @property
    def ok(self) -> bool:
        """No finding at or above the ``fail_on`` severity."""
        return not self.config.fails(self.report.diagnostics)

    def text(self) -> str:
        """Compiler-style findings with source excerpts, then a one-line summary."""
        from dualize.render.diagnostics import format_text

        lines = [format_text(self.diagnostics, self.report.sources)] if self.diagnostics else []
        errors, warnings = self.report.count("error"), self.report.count("warning")
        lines.append(f"{len(self.report.files)} file(s) checked: {errors} error(s), "
                     f"{warnings} warning(s)")
        return "\n".join(lines)

    def json(self) -> list[dict[str, object]]:
        from dualize.render.diagnostics import diagnostics_json

        return diagnostics_json(self.diagnostics)

    def sarif(self, version: str) -> dict[str, Any]:
        """A SARIF 2.1.0 log naming every rule kind of the program."""
        from dualize.lint import rule_table
        from dualize.render.sarif import sarif_log

        return sarif_log(self.diagnostics, rule_table(), version)

    def _repr_markdown_(self) -> str:
        from dualize.render.diagnostics import diagnostics_markdown

        return diagnostics_markdown(self.diagnostics, len(self.report.files))


@dataclass(frozen=True)
class DerivedDual(Derivation):
    """A derivation that shows itself: the primal and its dual in display math (LaTeX)
    or as a Markdown document.  ``analysis`` holds the strong-duality verdict and the
    lint findings when they were asked for (the printers then state the verdict)."""

    analysis: Analysis | None = None

    def _repr_latex_(self) -> str:
        from dualize.render.latex import repr_latex

        return repr_latex(self)

    def _repr_markdown_(self) -> str:
        from dualize.render.markdown import repr_markdown

        return repr_markdown(self)

    def render(self, fmt: str = "text", standalone: bool = False, color: bool = False) -> str:
        """The whole derivation in ``fmt``: text, latex, markdown or json."""
        from dualize.render.formats import render

        return render(self, fmt, self.analysis, standalone=standalone, color=color)


def shown(derivation: Derivation, analysis: Analysis | None = None) -> DerivedDual:
    """``derivation`` with its display (and ``analysis`` beside it)."""
    return DerivedDual(*(getattr(derivation, f.name) for f in fields(Derivation)),
                       analysis=analysis)


@dataclass(frozen=True)
class Verification:
    """The derived dual against the primal on instances: the report and its verdict."""

    derivation: DerivedDual
    report: VerifyReport
    convex: bool | None

    @property
    def verdict(self) -> str:
        """``zero-gap``, ``infinite-agree`` (infinite optima as weak duality predicts),
        ``gap`` or ``failed``."""
        return self.report.verdict

    @property
    def ok(self) -> bool:
        from dualize.numeric.verify_words import CONSISTENT

        return self.report.verdict in ("zero-gap", CONSISTENT)

    def text(self) -> str:
        from dualize.checking.check_report import verify_text

        return verify_text(self.report, self.convex, self.derivation.problem.sense)

    def json(self) -> dict[str, Any]:
        from dualize.checking.check_report import verify_dict

        return verify_dict(self.report, self.convex)

    def _repr_markdown_(self) -> str:
        from dualize.checking.check_report import verify_markdown

        return verify_markdown(self.report, self.convex, self.derivation.problem.sense)


@dataclass(frozen=True)
class CheckVerdict:
    """A claimed dual against the derived one: the verdict and how it was reached.
    ``note`` says where a claim read from a LaTeX draft was found."""

    report: ClaimReport
    note: str | None = None

    @property
    def verdict(self) -> str:
        return self.report.verdict

    @property
    def ok(self) -> bool:
        """The claim's optimum is the primal's: ``equivalent`` or ``tight, not attained``."""
        return bool(self.report.ok)

    def text(self) -> str:
        from dualize.checking.check_report import check_text

        return check_text(self.report)

    def json(self) -> dict[str, Any]:
        from dualize.checking.check_report import check_dict

        return check_dict(self.report)

    def _repr_markdown_(self) -> str:
        from dualize.checking.check_report import check_markdown

        return check_markdown(self.report)


@dataclass(frozen=True)
class DraftVerdicts:
    """Every marked claim of a LaTeX draft, each with its verdict and line."""

    draft: str
    checks: tuple[DraftCheck, ...]

    @property
    def ok(self) -> bool:
        """At least one claim, and every claim's optimum the primal's (``equivalent`` or
        ``tight, not attained``)."""
        passing = ("equivalent", "tight, not attained")
        return bool(self.checks) and all(c.verdict in passing for c in self.checks)

    def rows(self) -> list[dict[str, Any]]:
        return [{"line": c.line, "problem": c.problem_path, "verdict": c.verdict,
                 "error": c.error} for c in self.checks]

    def json(self) -> dict[str, Any]:
        return {"draft": self.draft, "claims": self.rows()}

    def text(self) -> str:
        """``draft.tex:LINE: verdict  [problem]`` per claim, so an editor can jump there."""
        lines = [f"{self.draft}:{r['line']}: {r['verdict']}  [{_where(r)}]{_tail(r)}"
                 for r in self.rows()]
        return "\n".join(lines) or f"{self.draft}: no claim for a problem file"

    def _repr_markdown_(self) -> str:
        rows = [f"| {r['line']} | {r['verdict']} | {_where(r)} | {r['error'] or ''} |"
                for r in self.rows()]
        head = ["| line | verdict | problem | remark |", "|---|---|---|---|"]
        return "\n".join(head + rows) if rows else f"`{self.draft}`: no claim"


def _where(row: dict[str, Any]) -> str:
    return f"{row['problem']}" if row["problem"] else "no problem file"


def _tail(row: dict[str, Any]) -> str:
    return f" ({row['error']})" if row["error"] else ""


@dataclass(frozen=True)
class GeneratedSolver:
    """A standalone Python module (numpy and scipy only) that solves the dual."""

    code: str

    def _repr_markdown_(self) -> str:
        return "```python\n" + self.code.rstrip("\n") + "\n```"

"""Which findings ``dualize lint`` reports and when it fails: options and pyproject.toml.

Rules are chosen by id or by id prefix (``nonconvex`` picks every
``nonconvex-...`` rule).  When several selectors match a rule the longest one
wins, and ``ignore`` wins a tie, so ``--select nonconvex --ignore
nonconvex-equality`` keeps every nonconvex rule but one, and ``--ignore slater
--select slater-fails`` keeps that one rule.  Settings come from
``[tool.dualize]`` in the nearest pyproject.toml (searched upwards from the
current directory); command-line options replace them key by key.  A rule's
former id (``curvature-unknown``, now ``convexity-undecided``) still selects it.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from dualize.diagnostics import SEVERITY_ORDER, Diagnostic, RuleKind
from dualize.errors import DualizeError

KEYS = ("select", "ignore", "fail-on")
FAIL_ON = tuple(SEVERITY_ORDER)


@dataclass(frozen=True)
class LintConfig:
    select: tuple[str, ...] = ()
    ignore: tuple[str, ...] = ()
    fail_on: str = "error"
    source: str = "defaults"

    def keeps(self, rule: str) -> bool:
        """Whether a finding of ``rule`` is reported."""
        chosen = [(len(s), 0) for s in self.select if rule.startswith(s)]
        if not self.select:
            chosen.append((0, 0))
        chosen += [(len(s), 1) for s in self.ignore if rule.startswith(s)]
        return bool(chosen) and max(chosen)[1] == 0

    def filter(self, diagnostics: Iterable[Diagnostic]) -> tuple[Diagnostic, ...]:
        return tuple(d for d in diagnostics if self.keeps(d.rule))

    def fails(self, diagnostics: Iterable[Diagnostic]) -> bool:
        """True when a reported finding is at least as severe as ``fail_on``."""
        bar = SEVERITY_ORDER[self.fail_on]
        return any(SEVERITY_ORDER[d.severity] >= bar for d in diagnostics)


def find_pyproject(start: Path) -> Path | None:
    """The nearest pyproject.toml at or above ``start`` that has a [tool.dualize] table."""
    for folder in (start, *start.parents):
        candidate = folder / "pyproject.toml"
        if candidate.is_file() and "dualize" in _read_toml(candidate).get("tool", {}):
            return candidate
    return None


def _read_toml(path: Path) -> dict:
    import tomllib

    try:
        return tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as err:
        raise DualizeError(f"cannot read {path}: {err}", exit_code=2) from err


def from_table(table: Mapping[str, object], source: str) -> LintConfig:
    """A config from a ``[tool.dualize]`` table; unknown keys and bad values are errors."""
    unknown = sorted(k for k in table if k.replace("_", "-") not in KEYS)
    if unknown:
        raise DualizeError(f"{source}: unknown [tool.dualize] key(s): {', '.join(unknown)} "
                           f"(known: {', '.join(KEYS)})", exit_code=2)
    values = {k.replace("_", "-"): v for k, v in table.items()}
    return LintConfig(_selectors(values.get("select", ()), "select", source),
                      _selectors(values.get("ignore", ()), "ignore", source),
                      _severity(values.get("fail-on", "error"), source), source)


def _selectors(raw: object, key: str, source: str) -> tuple[str, ...]:
    items = [raw] if isinstance(raw, str) else raw
    if not isinstance(items, (list, tuple)) or not all(isinstance(i, str) for i in items):
        raise DualizeError(f"{source}: '{key}' must be a list of rule ids or prefixes",
                           exit_code=2)
    return tuple(sorted({p.strip() for i in items for p in i.split(",") if p.strip()}))


def _severity(raw: object, source: str) -> str:
    if raw not in FAIL_ON:
        raise DualizeError(f"{source}: 'fail-on' must be one of {', '.join(FAIL_ON)}",
                           exit_code=2)
    return str(raw)


def load_config(start: Path | None = None) -> LintConfig:
    """Settings of the nearest pyproject.toml with [tool.dualize], else the defaults."""
    found = find_pyproject((start or Path.cwd()).resolve())
    if found is None:
        return LintConfig()
    table = _read_toml(found)["tool"]["dualize"]
    if not isinstance(table, dict):
        raise DualizeError(f"{found}: [tool.dualize] must be a table", exit_code=2)
    return from_table(table, str(found))


def with_options(config: LintConfig, select: Iterable[str] = (), ignore: Iterable[str] = (),
                 fail_on: str | None = None) -> LintConfig:
    """Command-line options replace the file's settings, key by key."""
    changes: dict[str, object] = {}
    if select:
        changes["select"] = _selectors(list(select), "--select", "command line")
    if ignore:
        changes["ignore"] = _selectors(list(ignore), "--ignore", "command line")
    if fail_on is not None:
        changes["fail_on"] = _severity(fail_on, "command line")
    return replace(config, **changes) if changes else config


def check_selectors(config: LintConfig, known: Iterable[str]) -> None:
    """A selector that matches no registered rule is a typo: say so (exit code 2)."""
    ids = sorted(known)
    bad = [s for s in config.select + config.ignore if not any(i.startswith(s) for i in ids)]
    if bad:
        raise DualizeError(f"unknown rule id or prefix: {', '.join(bad)} ({config.source}); "
                           f"known ids: {', '.join(ids)}", exit_code=2)


def former_ids(config: LintConfig, table: Mapping[str, RuleKind]) -> LintConfig:
    """Selectors that name a rule by a former id (or a prefix of one that no current id
    has) replaced by the current ids, so old settings keep working."""
    def current(selector: str) -> tuple[str, ...]:
        if any(i.startswith(selector) for i in table):
            return (selector,)
        renamed = tuple(k.id for k in table.values()
                        if any(a.startswith(selector) for a in k.aliases))
        return renamed or (selector,)

    def each(selectors: tuple[str, ...]) -> tuple[str, ...]:
        return tuple(dict.fromkeys(n for s in selectors for n in current(s)))

    return replace(config, select=each(config.select), ignore=each(config.ignore))


def configured(select: Iterable[str] = (), ignore: Iterable[str] = (),
               fail_on: str | None = None, start: Path | None = None) -> LintConfig:
    """The nearest pyproject.toml's settings with command-line options on top, former
    rule ids translated, checked against the rule table."""
    return checked(with_options(load_config(start), select, ignore, fail_on))


def checked(config: LintConfig) -> LintConfig:
    """``config`` with former rule ids translated and every selector checked against the
    rule table (an unknown one raises, exit code 2)."""
    from dualize.lint import rule_table

    table = rule_table()
    config = former_ids(config, table)
    check_selectors(config, table)
    return config


def filtered(report: Any, config: LintConfig) -> Any:
    """A lint report with only the findings ``config`` keeps, files and order unchanged."""
    files = tuple(replace(f, diagnostics=config.filter(f.diagnostics)) for f in report.files)
    return replace(report, files=files)

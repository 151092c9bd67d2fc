"""Run the selected rules over entries and collect their findings."""

from __future__ import annotations

from dataclasses import dataclass, field

from normform.lint.entry import Entry
from normform.lint.findings import Finding
from normform.lint.registry import Rule
from normform.lint.services import Unavailable
from normform.lint.settings import LintSettings


@dataclass
class Context:
    settings: LintSettings
    known_ids: dict[str, str] = field(default_factory=dict)  # id -> file, for entry files beside the run
    skipped: dict[str, str] = field(default_factory=dict)   # slug -> why (a service is missing)
    failed: dict[str, str] = field(default_factory=dict)    # slug -> the error (a rule crashed)


def _apply_overrides(finding: Finding, settings: LintSettings) -> Finding:
    override = settings.severity.get(finding.slug)
    if override:
        finding.severity = override
    return finding


def _run(rule: Rule, subject, ctx: Context, findings: list[Finding]) -> None:
    try:
        findings.extend(rule.check(subject, ctx))
    except (Unavailable, ImportError) as exc:
        ctx.skipped[rule.slug] = str(exc)
    except Exception as exc:  # noqa: BLE001 - one broken rule must not stop a batch
        where = getattr(subject, "path", "the catalogue")
        ctx.failed.setdefault(rule.slug, f"{where}: {type(exc).__name__}: {exc}")


def lint(entries: list[Entry], rules: list[Rule], ctx: Context) -> list[Finding]:
    findings: list[Finding] = []
    per_entry = [r for r in rules if r.scope == "entry"]
    catalogue = [r for r in rules if r.scope == "catalogue"]
    for entry in entries:
        for r in per_entry:
            if r.slug in ctx.skipped:
                continue
            _run(r, entry, ctx, findings)
    for r in catalogue:
        _run(r, entries, ctx, findings)
    for f in findings:
        _apply_overrides(f, ctx.settings)
    findings.sort(key=Finding.sort_key)
    return findings

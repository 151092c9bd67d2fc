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
    known_ids: set[str] = field(default_factory=set)   # ids of entries outside this run
    skipped: dict[str, str] = field(default_factory=dict)   # slug -> why


def _apply_overrides(finding: Finding, settings: LintSettings) -> Finding:
    override = settings.severity.get(finding.slug)
    if override:
        finding.severity = override
    return finding


def lint(entries: list[Entry], rules: list[Rule], ctx: Context) -> list[Finding]:
    findings: list[Finding] = []
    per_entry = [r for r in rules if r.scope == "entry"]
    catalogue = [r for r in rules if r.scope == "catalogue"]
    for entry in entries:
        for r in per_entry:
            if r.slug in ctx.skipped:
                continue
            try:
                findings.extend(r.check(entry, ctx))
            except Unavailable as exc:
                ctx.skipped[r.slug] = str(exc)
    for r in catalogue:
        try:
            findings.extend(r.check(entries, ctx))
        except Unavailable as exc:
            ctx.skipped[r.slug] = str(exc)
    for f in findings:
        _apply_overrides(f, ctx.settings)
    findings.sort(key=Finding.sort_key)
    return findings

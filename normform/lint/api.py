"""Python API of the linter: lint entry texts or files, get findings back."""

from __future__ import annotations

from normform.lint.engine import Context, lint
from normform.lint.entry import EntrySyntaxError, entry_files, parse_entry, read_entry
from normform.lint.findings import Finding
from normform.lint.refs_facts import reference_from_table
from normform.lint.registry import select_rules
from normform.lint.settings import LintSettings


def _syntax_finding(path: str, exc: EntrySyntaxError) -> Finding:
    return Finding("file-syntax", "error", exc.message, path, exc.line, exc.column, category="entry")


def lint_text(text: str, path: str = "entry.toml", *, settings: LintSettings | None = None,
              select=(), ignore=()) -> list[Finding]:
    """Findings for one entry given as text (``path`` ending ``.json`` means JSON)."""
    try:
        entry = parse_entry(path, text)
    except EntrySyntaxError as exc:
        return [_syntax_finding(path, exc)]
    return lint([entry], select_rules(select, ignore), Context(settings or LintSettings()))


def lint_paths(paths: list[str], *, settings: LintSettings | None = None, select=(), ignore=()) -> list[Finding]:
    """Findings for entry files and directories (cross-entry rules see all of them)."""
    entries, found = [], []
    for path in entry_files(list(paths)):
        try:
            entries.append(read_entry(path))
        except EntrySyntaxError as exc:
            found.append(_syntax_finding(path, exc))
    found.extend(lint(entries, select_rules(select, ignore), Context(settings or LintSettings())))
    return sorted(found, key=Finding.sort_key)


__all__ = ["lint_text", "lint_paths", "LintSettings", "Finding", "reference_from_table"]

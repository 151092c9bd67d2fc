"""Apply fixes to an entry's text: non-overlapping edits, re-lint, repeat until stable.

A fixed text is accepted only when it still parses and keeps every key and
array element it had (a fix may change values or add a key, never drop one).
"""

from __future__ import annotations

from normform.lint.entry import Entry, EntrySyntaxError, parse_entry
from normform.lint.findings import Edit, Finding

MAX_ROUNDS = 4


def apply_edits(text: str, edits: list[Edit]) -> tuple[str, int]:
    """``text`` with every edit that does not overlap an earlier-chosen one; and how many applied."""
    chosen: list[Edit] = []
    for edit in sorted(edits, key=lambda e: (e.start, e.end)):
        if chosen and edit.start < chosen[-1].end:
            continue
        if chosen and edit.start == chosen[-1].end == edit.end:  # two inserts at one point
            continue
        chosen.append(edit)
    out = text
    for edit in reversed(chosen):
        out = out[: edit.start] + edit.text + out[edit.end:]
    return out, len(chosen)


def shape(value) -> object:
    """The key skeleton of a value: what a fix must never change."""
    if isinstance(value, dict):
        return {k: shape(v) for k, v in value.items()}
    if isinstance(value, list):
        return [shape(v) for v in value]
    return None


def covers(old, new) -> bool:
    """True when ``new`` keeps every key and array element of ``old``."""
    if isinstance(old, dict):
        return isinstance(new, dict) and all(k in new and covers(v, new[k]) for k, v in old.items())
    if isinstance(old, list):
        return isinstance(new, list) and len(new) == len(old) and all(map(covers, old, new))
    return not isinstance(new, (dict, list))


class FixRefused(RuntimeError):
    """A fix would break the file or drop a field; nothing is written."""


def fix_text(entry: Entry, lint_one) -> tuple[str, int]:
    """Fixed text of ``entry`` and the number of edits; ``lint_one(entry) -> findings``."""
    text, total = entry.text, 0
    current = entry
    findings: list[Finding] = lint_one(current)
    for _ in range(MAX_ROUNDS):
        edits = [e for f in findings if f.fix is not None for e in f.fix.edits]
        if not edits:
            break
        new_text, count = apply_edits(text, edits)
        if new_text == text:
            break
        try:
            current = parse_entry(entry.path, new_text)
        except EntrySyntaxError as exc:
            raise FixRefused(f"a fix would make the file invalid ({exc.message}); nothing written") from None
        if not covers(entry.data, current.data):
            raise FixRefused("a fix would drop a key or an array element; nothing written")
        text, total = new_text, total + count
        findings = lint_one(current)
    return text, total


def unified_diff(path: str, old: str, new: str) -> str:
    import difflib

    return "".join(difflib.unified_diff(old.splitlines(keepends=True), new.splitlines(keepends=True),
                                        fromfile=f"a/{path}", tofile=f"b/{path}"))
